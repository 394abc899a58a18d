import { existsSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { BodyPlan } from '../body/index.js';
import { lineageRollouts, type BestOnCourse, type ConfirmRule, type CourseRecord } from '../coevo/index.js';
import type { EsConfig } from '../evolve/index.js';
import { readJsonFile, UserError } from '../core/index.js';
import { bodyOf, CURRICULUM_FORMAT, courseOf as exportedCourse, loadCurriculum, loadSafetensorsWalker, rolloutOptionsOf, type Curriculum, type CurriculumEntry } from '../export/index.js';
import type { PolicyShape } from '../policy/index.js';
import type { RolloutOptions } from '../sim/index.js';
import { RECIPE } from '../store/index.js';
import { buildCourse, difficulty, loadFamily, type Course, type TerrainFamily, type TerrainGenome } from '../terrain/index.js';
import { Run } from './run.js';

/** One walker of a source: its id, the iteration its weights date from, and the weights exactly. */
export interface SourceWalker {
  readonly walkerId: number;
  readonly iteration: number;
  /** Progress the source recorded for it on the course it belongs to. */
  readonly progress: number;
  readonly params: readonly number[];
}

/** One course of a source with the walker that holds it (its solver, else its best) and, when different, its best. */
export interface SourceCourse {
  readonly id: number;
  readonly genome: TerrainGenome;
  /** The geometry as the source built it. */
  readonly course: Course;
  readonly holder: SourceWalker;
  readonly others: readonly SourceWalker[];
  /** The source's bookkeeping of the course; null for an export written before it recorded crossings and rollouts. */
  readonly figures: CourseFigures | null;
}

/** What a source recorded about one course. */
export interface CourseFigures {
  readonly difficulty: number;
  /** Best progress any walker reached on it under the run's own solver. */
  readonly bestProgress: number;
  readonly crossedAt: number | null;
  readonly solvedAt: number | null;
  /** Rollouts the run spent on the course and all its ancestors. */
  readonly lineageRollouts: number;
}

/** How the source run trained walkers and confirmed solves. */
export interface SourceTraining {
  readonly es: EsConfig;
  /** Largest horizontal push on ES candidates, N·s. */
  readonly trainingPush: number;
  readonly solve: ConfirmRule;
}

/** A run directory or curriculum export read as courses with walkers: what branching and lookup draw on. */
export interface Source {
  readonly kind: 'run' | 'export';
  readonly path: string;
  /** Fingerprint of the source run's state (an export records its run's). */
  readonly fingerprint: string;
  /** Iteration of the state read (an export records its run's). */
  readonly iteration: number;
  /** The run's ES and solve settings; null for an export written before it recorded them. */
  readonly training: SourceTraining | null;
  readonly plan: BodyPlan;
  readonly family: TerrainFamily;
  readonly shape: PolicyShape;
  /** The source run's own rollout settings. */
  readonly rollout: RolloutOptions;
  readonly courses: readonly SourceCourse[];
}

function walkerOfRun(b: BestOnCourse): SourceWalker {
  return { walkerId: b.walkerId, iteration: b.iteration, progress: b.progress, params: b.params };
}

function fromRun(dir: string): Source {
  const run = Run.open(dir);
  const { state } = run.latest();
  const lineage = lineageRollouts(state.courses);
  const figures = (c: CourseRecord): CourseFigures => ({
    difficulty: difficulty(c.genome, run.inputs.family), bestProgress: c.best.progress, crossedAt: c.crossedAt, solvedAt: c.solvedAt, lineageRollouts: lineage.get(c.id)!,
  });
  const courses = state.courses.map((c): SourceCourse => {
    const holder = walkerOfRun(c.solvedBy ?? c.best);
    return { id: c.id, genome: c.genome, course: buildCourse(c.genome, run.inputs.family), holder, others: c.solvedBy ? [walkerOfRun(c.best)] : [], figures: figures(c) };
  });
  const { recipe } = run.inputs;
  const training = { es: run.ctx.es, trainingPush: recipe.episode.trainingPush, solve: { threshold: recipe.solve.threshold, checks: recipe.solve.checks, push: recipe.solve.push } };
  return {
    kind: 'run', path: run.dir, fingerprint: run.fingerprint(state), iteration: state.iteration, training,
    plan: run.inputs.plan, family: run.inputs.family, shape: run.ctx.shape, rollout: run.ctx.rollout, courses,
  };
}

function fromExport(file: string): Source {
  const head = readJsonFile(file, 'Source') as { format?: unknown } | null;
  if (head === null || typeof head !== 'object' || head.format !== CURRICULUM_FORMAT) {
    throw new UserError(`Source ${file} is not a curriculum export (expected a JSON object with format "${CURRICULUM_FORMAT}") nor a run directory`);
  }
  const cur: Curriculum = loadCurriculum(file);
  const walker = (ref: CurriculumEntry['best']): SourceWalker => {
    const w = loadSafetensorsWalker(join(cur.dir, ref.walker.file), ref.walker.sha256);
    return { walkerId: ref.walker.id, iteration: ref.walker.iteration, progress: ref.progress, params: Array.from(w.params) };
  };
  const figures = (e: CurriculumEntry): CourseFigures | null => (e.crossedAt === undefined || e.lineageRollouts === undefined ? null : {
    difficulty: e.difficulty, bestProgress: e.best.progress, crossedAt: e.crossedAt, solvedAt: e.solvedAt, lineageRollouts: e.lineageRollouts,
  });
  const courses = cur.courses.map((e): SourceCourse => {
    return { id: e.id, genome: e.genome, course: exportedCourse(e), holder: walker(e.solvedBy ?? e.best), others: e.solvedBy ? [walker(e.best)] : [], figures: figures(e) };
  });
  const t = cur.training;
  return {
    kind: 'export', path: cur.path, fingerprint: cur.run.fingerprint, iteration: cur.run.iteration,
    training: t ? { es: t.es, trainingPush: t.trainingPush, solve: { threshold: cur.solveThreshold, ...t.solve } } : null,
    plan: bodyOf(cur), family: loadFamily(join(cur.dir, cur.family.file)),
    shape: cur.policy, rollout: rolloutOptionsOf(cur), courses,
  };
}

/**
 * Opens `path` as a source: a run directory (its newest verified checkpoint), an export
 * directory, or an export's curriculum.json. Anything else is refused.
 */
export function openSource(path: string): Source {
  const abs = resolve(path);
  const st = statSync(abs, { throwIfNoEntry: false });
  if (!st) throw new UserError(`Source ${path} not found: expected a run directory or a curriculum export`);
  if (st.isDirectory() && existsSync(join(abs, RECIPE))) return fromRun(abs);
  if (st.isDirectory() && existsSync(join(abs, 'curriculum.json'))) return fromExport(join(abs, 'curriculum.json'));
  if (st.isFile()) return fromExport(abs);
  throw new UserError(`Source ${path} is neither a cairn run directory (no ${RECIPE}) nor a curriculum export (no curriculum.json)`);
}

/** The course `id` of a source; refused with the ids it has. */
export function sourceCourse(src: Source, id: number): SourceCourse {
  const c = src.courses.find((x) => x.id === id);
  if (!c) throw new UserError(`Source ${src.path} has no course ${id}; it has ${src.courses.map((x) => x.id).join(', ') || 'none'}`);
  return c;
}

/** Splits `PATH:ID` at its last colon. */
export function parseSourceSpec(spec: string): { path: string; courseId: number } {
  const m = /^(.+):(\d+)$/.exec(spec);
  if (!m || !Number.isSafeInteger(Number(m[2]))) throw new UserError(`Source ${JSON.stringify(spec)}: expected RUN_OR_EXPORT:COURSE_ID, e.g. runs/demo:4`);
  return { path: m[1], courseId: Number(m[2]) };
}

/** Opens each distinct source path once. */
export function sourceCache(): (path: string) => Source {
  const opened = new Map<string, Source>();
  return (path) => {
    const key = resolve(path);
    let s = opened.get(key);
    if (!s) {
      s = openSource(path);
      opened.set(key, s);
    }
    return s;
  };
}
