import { actionSize, observationSize, type BodyPlan } from '../body/index.js';
import { addConfirmationTasks, confirmationHolds, confirmationPushes, strictRolloutOf, type ConfirmRule } from '../coevo/index.js';
import { stream, type Stream } from '../core/index.js';
import { emptyBatch, makeEvaluator, type Backend, type Evaluator } from '../pool/index.js';
import type { Activation, PolicyShape } from '../policy/index.js';
import { policyMisfit, type RolloutOptions, type RolloutResult } from '../sim/index.js';
import { buildCourse, loadTerrainSource, type Course } from '../terrain/index.js';
import { openSource, parseSourceSpec, sourceCourse, type Source, type SourceWalker } from './sources.js';

/** A course named on the command line: `RUN_OR_EXPORT:COURSE_ID`, or a terrain family / genome file. */
export function namedCourse(spec: string, familyPath?: string): { course: Course; label: string } {
  if (/:\d+$/.test(spec)) {
    const { path, courseId } = parseSourceSpec(spec);
    return { course: sourceCourse(openSource(path), courseId).course, label: spec };
  }
  const src = loadTerrainSource(spec, familyPath);
  return { course: buildCourse(src.genome, src.family), label: spec };
}

/** The network of a fresh walker for `plan`: its sensors in, its motors out, the given hidden layers between. */
export function freshShape(plan: BodyPlan, hidden: readonly number[], activation: Activation): PolicyShape {
  return { inputs: observationSize(plan), hidden, outputs: actionSize(plan), activation };
}

/** Runs `body` on the backend's evaluator, then closes it. */
export async function withEvaluator<T>(backend: Backend, body: (evaluator: Evaluator) => Promise<T>): Promise<T> {
  const evaluator = makeEvaluator(backend);
  try {
    return await body(evaluator);
  } finally {
    await evaluator.close();
  }
}

/** One walker of a repertoire and the courses whose record names it. */
export interface RepertoireWalker extends SourceWalker {
  /** Ids of the source courses it holds (solver, else best) or is the best walker of. */
  readonly courses: readonly number[];
}

/** Every distinct walker of a source (by exact weights), in course order. */
export function repertoire(src: Source): RepertoireWalker[] {
  const byWeights = new Map<string, { w: SourceWalker; courses: number[] }>();
  for (const c of src.courses) {
    for (const w of [c.holder, ...c.others]) {
      const key = Buffer.from(Float64Array.from(w.params).buffer).toString('base64');
      const at = byWeights.get(key);
      if (at) { if (!at.courses.includes(c.id)) at.courses.push(c.id); } else byWeights.set(key, { w, courses: [c.id] });
    }
  }
  return [...byWeights.values()].map(({ w, courses }) => ({ ...w, courses }));
}

/** A walker's confirmation on the looked-up course: the run's rule (stricter solver, pushes), every check at the threshold. */
export interface LookupConfirmation {
  readonly ok: boolean;
  /** Progress of each check: the first unpushed, the others pushed. */
  readonly checks: readonly number[];
  /** Each check's push, N·s (0 for the first). */
  readonly pushes: readonly number[];
}

export interface LookupRow {
  readonly walker: RepertoireWalker;
  readonly result: RolloutResult;
  /** Present when the lookup confirmed every walker (`--confirm`). */
  readonly confirmation?: LookupConfirmation;
}

/** How to confirm walkers in a lookup: the source run's rule and the seed its pushes are drawn from. */
export interface LookupConfirm {
  readonly rule: ConfirmRule;
  readonly seed: number;
}

export interface LookupResult {
  readonly ranked: readonly LookupRow[];
  readonly skipped: readonly { readonly walker: RepertoireWalker; readonly reason: string }[];
}

/**
 * Ranking order: progress (highest first), then not fallen before fallen, then fewer steps; ties
 * keep repertoire order. With confirmations: confirmed walkers first, then the higher worst
 * check, then the order above.
 */
export function compareRows(a: LookupRow, b: LookupRow): number {
  if (a.confirmation && b.confirmation) {
    const worst = (r: LookupConfirmation) => Math.min(...r.checks);
    const by = Number(b.confirmation.ok) - Number(a.confirmation.ok) || worst(b.confirmation) - worst(a.confirmation);
    if (by !== 0) return by;
  }
  return b.result.progress - a.result.progress || Number(a.result.fell) - Number(b.result.fell) || a.result.steps - b.result.steps;
}

/** The stream a lookup draws walker `w`'s confirmation pushes from: one per walker, so a walker's checks do not depend on which others are in the source. */
function lookupPushStream(seed: number, w: { readonly walkerId: number; readonly iteration: number }): Stream {
  return stream(seed, `lookup/confirm/walker/${w.walkerId}/iteration/${w.iteration}`);
}

/**
 * Runs every walker of `src` once on `course` with `plan` under `rollout` (one batch on the
 * backend's evaluator) and ranks them. Walkers whose network does not fit the plan are skipped
 * with the reason. With `confirm`, every walker is also confirmed in the same batch, as a run's
 * solve phase confirms: `rule.checks` rollouts under the stricter solver, the first unpushed and
 * the others pushed as {@link confirmationPushes} draws from {@link lookupPushStream}.
 */
export async function lookup(src: Source, course: Course, plan: BodyPlan, rollout: RolloutOptions, backend: Backend, confirm?: LookupConfirm): Promise<LookupResult> {
  const walkers = repertoire(src);
  // A run's walkers share one network shape, so they all fit the plan or none does.
  const reason = policyMisfit(src.shape, plan);
  if (reason) return { ranked: [], skipped: walkers.map((walker) => ({ walker, reason })) };
  const batch = emptyBatch();
  batch.courses.push(course);
  batch.plans.push(plan);
  batch.shapes.push(src.shape);
  batch.options.push(rollout);
  for (const w of walkers) batch.tasks.push({ kind: 'rollout', course: 0, plan: 0, shape: 0, options: 0, policy: { kind: 'params', params: w.params } });
  const pushes = confirm ? walkers.map((w) => confirmationPushes(confirm.rule, lookupPushStream(confirm.seed, w))) : [];
  const strict = strictRolloutOf(rollout);
  pushes.forEach((list, i) => addConfirmationTasks(batch, strict, walkers[i].params, list));
  const evaluator = makeEvaluator(backend);
  try {
    const results = batch.tasks.length > 0 ? await evaluator.evaluate(batch) : [];
    let next = walkers.length;
    const rows: LookupRow[] = walkers.map((walker, i) => {
      if (!confirm) return { walker, result: results[i] };
      const checks = pushes[i].map(() => results[next++].progress);
      return { walker, result: results[i], confirmation: { ok: confirmationHolds(confirm.rule, checks), checks, pushes: pushes[i] } };
    });
    return { ranked: [...rows].sort(compareRows), skipped: [] };
  } finally {
    await evaluator.close();
  }
}
