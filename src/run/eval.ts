import { loadBodyPlan } from '../body/index.js';
import { crossedOrSolved, strictRolloutOf, type Solver } from '../coevo/index.js';
import { stream, UserError } from '../core/index.js';
import { bodyOf, courseOf, findCourse, loadAnyWalker, loadCurriculum, loadSafetensorsWalker, rolloutOptionsOf, walkerRefOf } from '../export/index.js';
import { sceneBatch, type Backend, type Batch } from '../pool/index.js';
import { initParams, type Activation } from '../policy/index.js';
import { assertPolicyFits, defaultRolloutOptions, type RolloutResult } from '../sim/index.js';
import { writeFileAtomic } from '../store/index.js';
import { buildCourse, loadTerrainSource, type Course } from '../terrain/index.js';
import { freshShape, withEvaluator } from './scene.js';

/** `cairn eval` on a terrain family or genome file. */
export interface CourseEvalOptions {
  /** Terrain family (its start genome) or genome file. */
  readonly terrain: string;
  /** Terrain family of a bare genome file. */
  readonly family?: string;
  /** Body plan file. */
  readonly body: string;
  /** Walker file (cairn walker JSON or exported .safetensors); absent = a fresh walker from `seed`. */
  readonly walker?: string;
  readonly seed: number;
  /** Network of a fresh walker. */
  readonly hidden: readonly number[];
  readonly activation: Activation;
  /** Step budget. */
  readonly steps: number;
  /** File for the course and the walker's poses (every 5 steps) as JSON. */
  readonly trace?: string;
  readonly backend: Backend;
}

/** One rollout's figures; `seconds` is simulated time (s). */
export interface CourseEval {
  readonly progress: number;
  readonly fitness: number;
  readonly steps: number;
  readonly fell: boolean;
  readonly end: RolloutResult['end'];
  readonly seconds: number;
}

/** `cairn eval --curriculum`: one course of an exported curriculum. */
export interface ExportedEvalOptions {
  /** The exported curriculum.json. */
  readonly curriculum: string;
  /** Course id in it. */
  readonly course: number;
  /** Body plan file; absent = the exported one. */
  readonly body?: string;
  /** Walker file; absent = the one the export records for the course (its SHA-256 checked). */
  readonly walker?: string;
  readonly trace?: string;
  readonly backend: Backend;
}

/** The rollout's figures beside the exported ones (null when another walker was given). */
export interface ExportedEval {
  readonly course: number;
  readonly progress: number;
  readonly fitness: number;
  readonly steps: number;
  readonly fell: boolean;
  readonly end: RolloutResult['end'];
  readonly exportedProgress: number | null;
  readonly matchesExport: boolean | null;
  /**
   * The solver of the figures above: the run's own, or the stricter one that confirms solves. A
   * course is trained under the stricter solver after its first confirmation, so the figure the
   * export records may have been measured under it; the run's solver is tried first.
   */
  readonly solver: Solver;
  /** The same walker under the run's own solver, when the figures above are the stricter solver's. */
  readonly runSolver: Pick<RolloutResult, 'progress' | 'steps' | 'fell' | 'end'> | null;
}

/** Writes a rollout's trace, when asked, beside the course and plan name. */
function writeTrace(trace: string | undefined, course: Course, planName: string, r: RolloutResult): void {
  if (trace && r.trace) writeFileAtomic(trace, `${JSON.stringify({ course, plan: planName, trace: r.trace })}\n`);
}

/** Runs a one-task batch on the backend's evaluator and writes its trace, when asked. */
async function rolloutOnce(batch: Batch, planName: string, backend: Backend, trace: string | undefined): Promise<RolloutResult> {
  const [r] = await withEvaluator(backend, (evaluator) => evaluator.evaluate(batch));
  writeTrace(trace, batch.courses[0], planName, r);
  return r;
}

/** One rollout of a given walker (or a fresh one from the seed) on a course built from a terrain file. */
export async function evalOnCourse(o: CourseEvalOptions): Promise<CourseEval> {
  const src = loadTerrainSource(o.terrain, o.family);
  const course = buildCourse(src.genome, src.family);
  const walker = o.walker ? loadAnyWalker(o.walker) : undefined;
  const plan = loadBodyPlan(o.body);
  if (walker?.bodyName !== undefined && walker.bodyName !== plan.name) {
    throw new UserError(`Walker ${o.walker} was made for body plan "${walker.bodyName}", but --body ${o.body} is "${plan.name}"`);
  }
  const shape = walker?.shape ?? freshShape(plan, o.hidden, o.activation);
  assertPolicyFits(shape, plan, String(o.walker));
  const params = walker ? Array.from(walker.params) : Array.from(initParams(shape, stream(o.seed, 'walker/init')));
  const batch = sceneBatch(course, plan, shape, { ...defaultRolloutOptions(), maxSteps: o.steps, traceEvery: o.trace ? 5 : 0 }, params);
  const r = await rolloutOnce(batch, plan.name, o.backend, o.trace);
  return { progress: r.progress, fitness: r.fitness, steps: r.steps, fell: r.fell, end: r.end, seconds: r.steps * batch.options[0].physics.timeStep };
}

/** One rollout of an exported walker (or a given one) on an exported course, under the run's own settings. */
export async function evalOnExportedCourse(o: ExportedEvalOptions): Promise<ExportedEval> {
  const cur = loadCurriculum(o.curriculum);
  const entry = findCourse(cur, o.course);
  const plan = o.body === undefined ? bodyOf(cur) : loadBodyPlan(o.body);
  const ref = walkerRefOf(cur, entry);
  const w = o.walker ? loadSafetensorsWalker(o.walker) : loadSafetensorsWalker(ref.path, ref.sha256);
  assertPolicyFits(w.shape, plan, o.walker ?? ref.path);
  const course = courseOf(entry);
  const params = Array.from(w.params);
  const options = { ...rolloutOptionsOf(cur), traceEvery: o.trace ? 5 : 0 };
  const expected = o.walker ? null : ref.progress;
  // Only a crossed course can have had a confirmation, and so training under the stricter solver.
  const mayBeStrict = expected !== null && o.body === undefined && crossedOrSolved({ crossedAt: entry.crossedAt ?? null, solvedAt: entry.solvedAt });
  const { r, strict } = await withEvaluator(o.backend, async (evaluator) => {
    const [own] = await evaluator.evaluate(sceneBatch(course, plan, w.shape, options, params));
    if (!mayBeStrict || own.progress === expected) return { r: own, strict: null };
    const [s] = await evaluator.evaluate(sceneBatch(course, plan, w.shape, strictRolloutOf(options), params));
    return { r: own, strict: s.progress === expected ? s : null };
  });
  const shown = strict ?? r;
  writeTrace(o.trace, course, plan.name, shown);
  return {
    course: entry.id, progress: shown.progress, fitness: shown.fitness, steps: shown.steps, fell: shown.fell, end: shown.end,
    exportedProgress: expected, matchesExport: expected === null ? null : shown.progress === expected,
    solver: strict ? 'strict' : 'run', runSolver: strict ? { progress: r.progress, steps: r.steps, fell: r.fell, end: r.end } : null,
  };
}
