import { existsSync, mkdirSync, statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { confirmWalker, crossedOrSolved, freshEsState, strictRolloutOf, trainWalker, type TrainLogLine } from '../coevo/index.js';
import { canonicalJson, readJsonFile, stream, UserError } from '../core/index.js';
import { makeEvaluator, type Backend, type Evaluator } from '../pool/index.js';
import { writeFileAtomic } from '../store/index.js';
import {
  BASELINE_FORMAT, BASELINE_VERSION, baselineCsv, baselineRow,
  type BaselineReport, type BaselineSettings, type BudgetSetting, type DirectSeed,
} from './baseline-report.js';
import { openSource, type CourseFigures, type Source, type SourceCourse, type SourceTraining } from './sources.js';

export const BASELINE_JSON = 'baseline.json';
export const BASELINE_CSV = 'baseline.csv';
/** Finished (course, seed) results, rewritten atomically after each one: what a second invocation skips. */
export const BASELINE_RESULTS = 'baseline.results.json';
const RESULTS_FORMAT = 'cairn-baseline-results';

export interface BaselineOptions {
  /** How many of the hardest crossed or solved courses. */
  readonly top: number;
  readonly seeds: readonly number[];
  /** Rollouts per course and seed; absent = the course's lineage rollouts. */
  readonly rollouts?: number;
  /** Where the outputs go (default: the run directory, or the export's directory). */
  readonly out?: string;
}

export interface BaselineHooks {
  /** Polled between ES iterations: true stops, keeping what is finished. */
  readonly stopRequested?: () => boolean;
  /** Progress of the (course, seed) in training. */
  readonly onIteration?: (what: { course: number; seed: number; line: TrainLogLine; iterations: number }) => void;
  /** A (course, seed) already finished and recorded is skipped. */
  readonly onSkip?: (course: number, seed: number) => void;
}

export interface BaselineOutcome {
  /** The finished report, or null when stopped first. */
  readonly report: BaselineReport | null;
  readonly dir: string;
  /** (course, seed) runs found finished and skipped; trained this time. */
  readonly skipped: number;
  readonly trained: number;
}

interface Pick { readonly course: SourceCourse; readonly figures: CourseFigures; readonly budget: number; readonly iterations: number }
interface Recorded extends DirectSeed { readonly course: number }
interface ResultsFile { format: string; version: number; fingerprint: string; settings: BaselineSettings; done: Recorded[] }

class Stopped extends Error {}

/** The source run's training settings; an export too old to record them is refused. */
function trainingOf(src: Source): SourceTraining {
  if (src.training) return src.training;
  throw new UserError(`Source ${src.path} does not record the run's ES and solve settings (an export written by an earlier cairn); export the run again`);
}

/**
 * The `top` hardest courses crossed or solved (by difficulty, highest first; ties by id), each
 * with its rollout budget and the whole ES iterations that fit it: each iteration is the mean
 * plus `population` candidates, then one final evaluation and the confirmation's checks.
 */
export function pickCourses(src: Source, top: number, budget: BudgetSetting): Pick[] {
  const t = trainingOf(src);
  if (src.courses.some((c) => c.figures === null)) {
    throw new UserError(`Source ${src.path} does not record which courses were crossed nor their rollouts (an export written by an earlier cairn); export the run again`);
  }
  const crossed = src.courses.filter((c) => crossedOrSolved(c.figures!));
  if (crossed.length === 0) throw new UserError(`Source ${src.path} has no crossed or solved course (iteration ${src.iteration}): there is nothing to compare with; run it longer`);
  const hardest = [...crossed].sort((a, b) => b.figures!.difficulty - a.figures!.difficulty || a.id - b.id).slice(0, top);
  const fixed = 1 + t.solve.checks;
  return hardest.map((course) => {
    const figures = course.figures!;
    const rollouts = budget === 'lineage' ? figures.lineageRollouts : budget;
    const iterations = Math.floor((rollouts - fixed) / (t.es.population + 1));
    if (iterations < 1) {
      const need = t.es.population + 1 + fixed;
      const what = budget === 'lineage' ? `its lineage's ${rollouts} rollouts` : `--rollouts ${rollouts}`;
      throw new UserError(`Course ${course.id}: ${what} do not fit one ES iteration; at least ${need} are needed (${t.es.population + 1} for an iteration, 1 for the final evaluation, ${t.solve.checks} to confirm)`);
    }
    return { course, figures, budget: rollouts, iterations };
  });
}

/**
 * Finished results recorded in `dir`; refused when they were made for another source or
 * another budget. One (course, seed) result depends on nothing else, so `--top` and `--seeds`
 * may change between calls: finished results are reused and kept, and the report shows the
 * courses and seeds asked for.
 */
function readResults(file: string, fingerprint: string, settings: BaselineSettings): Recorded[] {
  if (!existsSync(file)) return [];
  const r = readJsonFile(file, 'Baseline results') as Partial<ResultsFile> | null;
  if (r === null || typeof r !== 'object' || r.format !== RESULTS_FORMAT || !Array.isArray(r.done)) {
    throw new UserError(`${file} is not a baseline results file (expected format "${RESULTS_FORMAT}"); remove it or choose another --out`);
  }
  const was = canonicalJson({ fingerprint: r.fingerprint, budget: r.settings?.budget });
  if (was !== canonicalJson({ fingerprint, budget: settings.budget })) {
    throw new UserError(`${file} holds results for another source or budget (${canonicalJson({ fingerprint: r.fingerprint, budget: r.settings?.budget })}), not ${canonicalJson({ fingerprint, budget: settings.budget })}; give the same source and --rollouts to continue it, or remove it or choose another --out to start afresh`);
  }
  return r.done;
}

/** Where the outputs go: `out`, else the run directory, else the export's directory. */
function outputDir(src: Source, out: string | undefined): string {
  const dir = resolve(out ?? (src.kind === 'run' ? src.path : dirname(src.path)));
  const st = statSync(dir, { throwIfNoEntry: false });
  if (st && !st.isDirectory()) throw new UserError(`Output ${dir} is a file, not a directory; choose another --out`);
  return dir;
}

/** Trains one fresh walker on `pick` with `seed` and confirms its best weights. */
async function trainSeed(src: Source, t: SourceTraining, pick: Pick, seed: number, evaluator: Evaluator, hooks: BaselineHooks): Promise<Recorded> {
  const { course } = pick;
  const settings = { iterations: pick.iterations, es: t.es, rollout: src.rollout, seed, candidatePush: t.trainingPush };
  const out = await trainWalker(course.course, src.plan, src.shape, freshEsState(src.shape, seed), settings, evaluator, (line) => {
    if (hooks.stopRequested?.()) throw new Stopped();
    hooks.onIteration?.({ course: course.id, seed, line, iterations: pick.iterations });
  });
  const s = stream(seed, `baseline/course/${course.id}/confirm`);
  const confirm = await confirmWalker(course.course, src.plan, src.shape, strictRolloutOf(src.rollout), out.best.params, t.solve, s, evaluator);
  return {
    course: course.id, seed, progress: out.best.progress, finalProgress: out.finalProgress,
    rollouts: out.rollouts + confirm.checks.length, iterations: out.log.length, confirmed: confirm.ok,
  };
}

function report(src: Source, settings: BaselineSettings, picks: readonly Pick[], done: readonly Recorded[]): BaselineReport {
  const rows = picks.map((p) => {
    const f = p.figures;
    const seeds = settings.seeds.map((seed) => {
      const { course: _c, ...d } = done.find((r) => r.course === p.course.id && r.seed === seed)!;
      return d;
    });
    const coevolved = { progress: f.bestProgress, crossedAt: f.crossedAt, solvedAt: f.solvedAt, confirmed: f.solvedAt !== null };
    return baselineRow({ course: p.course.id, difficulty: f.difficulty, coevolved, budget: p.budget }, seeds);
  });
  return { format: BASELINE_FORMAT, version: BASELINE_VERSION, source: { path: src.path, kind: src.kind, fingerprint: src.fingerprint, iteration: src.iteration }, settings, rows };
}

/**
 * The direct baseline of a run or export: fresh walkers trained by plain ES directly on its
 * hardest crossed courses, each seed under the course's rollout budget, with the source run's
 * body plan, network, ES settings, episode rules, training push and solve confirmation. Each
 * finished (course, seed) is saved at once; a second call with the same settings skips those.
 * Everything is checked before anything is written.
 */
export async function runBaseline(path: string, o: BaselineOptions, backend: Backend, hooks: BaselineHooks = {}): Promise<BaselineOutcome> {
  const src = openSource(path);
  const t = trainingOf(src);
  const settings: BaselineSettings = { top: o.top, seeds: [...o.seeds], budget: o.rollouts ?? 'lineage' };
  const picks = pickCourses(src, o.top, settings.budget);
  const dir = outputDir(src, o.out);
  const resultsFile = join(dir, BASELINE_RESULTS);
  const done = readResults(resultsFile, src.fingerprint, settings);
  const save = (): void => writeFileAtomic(resultsFile, `${JSON.stringify({ format: RESULTS_FORMAT, version: 1, fingerprint: src.fingerprint, settings, done }, null, 1)}\n`);
  let skipped = 0;
  let trained = 0;
  const evaluator = makeEvaluator(backend);
  try {
    for (const pick of picks) {
      for (const seed of o.seeds) {
        if (done.some((r) => r.course === pick.course.id && r.seed === seed)) {
          skipped++;
          hooks.onSkip?.(pick.course.id, seed);
          continue;
        }
        if (hooks.stopRequested?.()) return { report: null, dir, skipped, trained };
        const r = await trainSeed(src, t, pick, seed, evaluator, hooks);
        mkdirSync(dir, { recursive: true });
        done.push(r);
        save();
        trained++;
      }
    }
  } catch (e) {
    if (e instanceof Stopped) return { report: null, dir, skipped, trained };
    throw e;
  } finally {
    await evaluator.close();
  }
  const rep = report(src, settings, picks, done);
  writeFileAtomic(join(dir, BASELINE_JSON), `${JSON.stringify(rep, null, 1)}\n`);
  writeFileAtomic(join(dir, BASELINE_CSV), baselineCsv(rep));
  return { report: rep, dir, skipped, trained };
}
