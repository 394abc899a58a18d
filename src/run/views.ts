import { basename, dirname, join } from 'node:path';
import { existsSync, mkdirSync } from 'node:fs';
import { gridSpec, liveLineages, type CourseRecord, type IterationMetrics, type LiveLineage, type RunState } from '../coevo/index.js';
import { readJsonFile, UserError } from '../core/index.js';
import { loadAnyWalker, writeExport, type ExportResult, type Only, type Order } from '../export/index.js';
import { makeEvaluator, sceneBatch, threads, type Backend } from '../pool/index.js';
import { compareHtml, initialCourse, parseBaseline, reportData, reportHtml, strobeSvg, type Baseline } from '../report/index.js';
import { readLive, wallSeconds, writeFileAtomic, type LiveRecord, type SkippedCheckpoint } from '../store/index.js';
import { buildCourse, difficulty } from '../terrain/index.js';
import type { Run } from './run.js';

/** What `status` shows: the metrics line's figures plus identity and budget, and the active pairs. */
export interface RunStatus extends Omit<IterationMetrics, 'hardestSolved' | 'hardestCrossed'> {
  /**
   * Difficulty of the hardest solved course, or null while no course beyond the start course is
   * solved (the start course is flat ground, difficulty 0, so 0 would not tell the two apart).
   */
  readonly hardestSolved: number | null;
  /** Difficulty of the hardest crossed course, null while no course beyond the start course is crossed (as for hardestSolved). */
  readonly hardestCrossed: number | null;
  /** The coverage grid: its descriptor components, bins per component, and its number of cells (bins ^ components). */
  readonly grid: { readonly components: readonly string[]; readonly bins: number; readonly cells: number };
  /** Lineages with an active pair: id, active courses, dominant feature kind, hardest active difficulty. */
  readonly liveLineages: readonly LiveLineage[];
  /** Share of candidate courses refused as too easy, tooEasy / candidates (null before the first candidate). */
  readonly tooEasyShare: number | null;
  readonly fingerprint: string;
  readonly targetIterations: number;
  readonly skippedCheckpoints: number;
  /** While a process runs the run: where rollouts run, connected workers, rollouts per second (null otherwise). */
  readonly live: LiveRecord | null;
  /** For a branched run: where each starting course came from (path as given, source fingerprint, course id there). */
  readonly sources?: readonly { readonly courseId: number; readonly path: string; readonly fingerprint: string; readonly sourceCourseId: number; readonly clipped: boolean }[];
}

export interface PairRow {
  readonly course: CourseRecord;
  readonly walkerId: number;
  readonly progress: number;
  readonly age: number;
  readonly difficulty: number;
}

export function runStatus(run: Run, state: RunState, skipped: readonly SkippedCheckpoint[]): { status: RunStatus; pairs: PairRow[] } {
  const metrics = run.metrics(state);
  const beyondStart = (at: (c: CourseRecord) => number | null): boolean => state.courses.some((c) => at(c) !== null && c.parent !== null);
  const { components, bins } = gridSpec(run.inputs.recipe);
  const diff = (g: CourseRecord['genome']): number => difficulty(g, run.inputs.family);
  const { sources, sourcePaths } = run.inputs;
  const lineage = sources.map((s, i) => ({ courseId: i, path: sourcePaths[i] ?? '?', fingerprint: s.fingerprint, sourceCourseId: s.courseId, clipped: s.clipped }));
  const status = {
    ...metrics,
    hardestSolved: beyondStart((c) => c.solvedAt) ? metrics.hardestSolved : null,
    hardestCrossed: beyondStart((c) => c.crossedAt) ? metrics.hardestCrossed : null,
    grid: { components, bins, cells: bins ** components.length },
    liveLineages: liveLineages(state, diff),
    tooEasyShare: metrics.candidates > 0 ? metrics.tooEasy / metrics.candidates : null,
    fingerprint: run.fingerprint(state), targetIterations: run.inputs.recipe.budget.iterations,
    skippedCheckpoints: skipped.length, live: readLive(run.dir), ...(lineage.length > 0 ? { sources: lineage } : {}),
  };
  const pairs = state.pairs.map((p) => {
    const course = state.courses.find((r) => r.id === p.courseId)!;
    return { course, walkerId: p.walkerId, progress: p.progress, age: state.iteration - course.admittedAt, difficulty: diff(course.genome) };
  });
  return { status, pairs };
}

/** The file `cairn baseline` writes into a run directory. */
export const BASELINE_FILE = 'baseline.json';

/**
 * The run's baseline.json: null when there is none; when it is unreadable or not valid, null
 * and a warning that says why (the report is written without it).
 */
function readBaseline(dir: string): { baseline: Baseline | null; warning: string | null } {
  const path = join(dir, BASELINE_FILE);
  if (!existsSync(path)) return { baseline: null, warning: null };
  try {
    return { baseline: parseBaseline(readJsonFile(path, 'Baseline'), path), warning: null };
  } catch (e) {
    if (!(e instanceof UserError)) throw e;
    return { baseline: null, warning: `${e.message}\nThe report leaves the direct baseline out.` };
  }
}

/**
 * Replays every course's walker on the backend and writes the report page to `out` (default
 * <run>/report/index.html), with the run's direct baseline when it has a valid baseline.json.
 * Returns the file and warnings (a baseline.json that could not be used).
 */
export async function writeReport(run: Run, state: RunState, out: string | undefined, backend: Backend): Promise<{ file: string; warnings: string[] }> {
  const file = out ?? join(run.dir, 'report', 'index.html');
  const { baseline, warning } = readBaseline(run.dir);
  const evaluator = makeEvaluator(backend);
  try {
    const data = { ...(await reportData(run.ctx, state, run.metricsLog(state.iteration), evaluator)), baseline };
    mkdirSync(dirname(file), { recursive: true });
    writeFileAtomic(file, reportHtml({ ...data, initialCourse: initialCourse(data) }));
    return { file, warnings: warning ? [warning] : [] };
  } finally {
    await evaluator.close();
  }
}

/** A strobe picture of one course's walker (its solver or best, or a walker file), written as SVG. */
export async function writeStrobe(run: Run, state: RunState, courseId: number, walkerFile: string | undefined, every: number, out: string): Promise<{ progress: number }> {
  const rec = state.courses.find((c) => c.id === courseId);
  if (!rec) throw new UserError(`Run ${run.dir} has no course ${courseId}; it has ${state.courses.map((c) => c.id).join(', ')}`);
  let params: readonly number[] = (rec.solvedBy ?? rec.best).params;
  let shape = run.ctx.shape;
  if (walkerFile) {
    const w = loadAnyWalker(walkerFile);
    params = Array.from(w.params);
    shape = w.shape;
  }
  const course = buildCourse(rec.genome, run.inputs.family);
  const evaluator = makeEvaluator(threads(0));
  try {
    const [r] = await evaluator.evaluate(sceneBatch(course, run.inputs.plan, shape, { ...run.ctx.rollout, traceEvery: 5 }, params));
    writeFileAtomic(out, strobeSvg(course, run.inputs.plan.segments, r.trace?.frames ?? [], `course ${rec.id}: progress ${r.progress.toFixed(3)}`, every));
    return { progress: r.progress };
  } finally {
    await evaluator.close();
  }
}

/** Writes the run's courses as a curriculum export (default <run>/exports/curriculum). */
export function exportRun(run: Run, state: RunState, out: string | undefined, order: Order, only: Only): ExportResult {
  return writeExport(run.ctx, state, out ?? join(run.dir, 'exports', 'curriculum'), order, only);
}

/**
 * Writes one page comparing several runs (each run's newest verified state and metrics) to
 * `out` (default compare/index.html beside the first run directory). No replays: nothing is simulated.
 */
export function writeComparison(runs: readonly Run[], out: string | undefined): string {
  const file = out ?? join(dirname(runs[0].dir), 'compare', 'index.html');
  const names = runs.map((r) => basename(r.dir));
  const rows = runs.map((run, k) => {
    const { state } = run.latest();
    const name = names.indexOf(names[k]) === k ? names[k] : `${names[k]} (${k + 1})`;
    return { name, dir: run.dir, seed: run.inputs.recipe.seed, fingerprint: run.fingerprint(state), recipeHash: run.recipeHash, metrics: run.metricsLog(state.iteration), seconds: wallSeconds(run.dir) };
  });
  mkdirSync(dirname(file), { recursive: true });
  writeFileAtomic(file, compareHtml(rows));
  return file;
}
