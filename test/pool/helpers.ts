import { join } from 'node:path';
import { actionSize, loadBodyPlan, observationSize } from '../../src/body/index.js';
import { stream } from '../../src/core/index.js';
import { initParams, type PolicyShape } from '../../src/policy/index.js';
import { InlineEvaluator, ThreadEvaluator, emptyBatch, type Batch, type PolicyRef, type Task, type ThreadOptions } from '../../src/pool/index.js';
import { defaultRolloutOptions, type RolloutResult } from '../../src/sim/index.js';
import { buildCourse, loadFamily } from '../../src/terrain/index.js';

export { ROOT, WORKER_JS } from '../build.js';
import { ROOT } from '../build.js';

/** Worker script of the fault tests: cairn's worker plus a task kind that fails on purpose. */
export const FAULT_WORKER = join(ROOT, 'test/fixtures/fault-worker.mjs');

/**
 * A deliberately faulty task, understood only by {@link FAULT_WORKER}: on attempts before
 * `untilAttempt` it throws, exits its thread or loops forever; afterwards it returns `result`.
 */
export interface FaultTask {
  readonly kind: 'fault';
  readonly mode: 'throw' | 'exit' | 'hang';
  readonly untilAttempt: number;
  readonly result: RolloutResult;
}

/** What a fault task returns once it stops failing: unlike any rollout's result. */
const FAULT_RESULT: RolloutResult = { progress: 0.5, fitness: 0.5, steps: 1, fell: false, end: 'budget' };

/** A fault task, typed as a task so it can travel in a batch to {@link FAULT_WORKER}. */
export function faultTask(mode: FaultTask['mode'], untilAttempt: number): Task {
  const t: FaultTask = { kind: 'fault', mode, untilAttempt, result: FAULT_RESULT };
  return t as unknown as Task;
}

/** Threads running {@link FAULT_WORKER}. */
export function faultThreads(workers: number, options: ThreadOptions = {}): ThreadEvaluator {
  return new ThreadEvaluator(workers, { ...options, workerFile: FAULT_WORKER });
}

export { ensureBuilt } from '../build.js';

/**
 * Step budgets of the fault tests' rollouts. Short, because those tests give each task a time
 * limit of {@link TASK_LIMIT_MS}, and a rollout on a freshly started thread, still unoptimised
 * by the JIT, may run many times slower on a CPU shared with other test runs.
 */
export const SHORT: readonly [number, number] = [80, 120];

/**
 * Time limit of one task in the fault tests, ms: tens of ms of warm work, ~1 s of it cold. It was
 * 4 s until a normal rollout on a fresh thread ran past it while the 2-core machine ran the test
 * suite beside a baseline with two threads of its own (2026-12-03); 8 s leaves room for that.
 */
export const TASK_LIMIT_MS = 8000;

/**
 * Vitest's limit for one fault test, ms: a task that hangs on both attempts costs 2 × TASK_LIMIT_MS,
 * plus thread replacements and the batch that follows, with room for a loaded machine.
 */
export const FAULT_TEST_MS = 7.5 * TASK_LIMIT_MS;

const family = loadFamily(join(ROOT, 'envs/terrain/starter.json'));
const plan = loadBodyPlan(join(ROOT, 'envs/bodies/trestle.json'));
const shape: PolicyShape = { inputs: observationSize(plan), hidden: [], outputs: actionSize(plan), activation: 'tanh' };

/** Random linear weights; full-size outputs (not the 0.1 default) so every walker moves differently. */
function weights(seed: number, label: string): number[] {
  return Array.from(initParams(shape, stream(seed, label), { outputScale: 1 }));
}

/**
 * `count` short rollouts on the flat starter course with the trestle body. Every task has its
 * own weights (alternately given outright and as ± perturbations of one of two bases) and
 * alternates between two step budgets, so the tasks' results are told apart. `salt` makes
 * another batch of the same shape with different weights.
 */
export function rolloutBatch(count: number, salt = 0, maxSteps: readonly [number, number] = [200, 300]): Batch {
  const b = emptyBatch();
  b.courses.push(buildCourse(family.start, family));
  b.plans.push(plan);
  b.shapes.push(shape);
  b.options.push(...maxSteps.map((n) => ({ ...defaultRolloutOptions(), maxSteps: n })));
  b.bases.push(weights(salt, 'pool-test/base-0'), weights(salt, 'pool-test/base-1'));
  for (let i = 0; i < count; i++) {
    const seed = 1000 * salt + i;
    const policy: PolicyRef = i % 3 === 0
      ? { kind: 'params', params: weights(seed, 'pool-test/params') }
      : { kind: 'perturbed', base: i % 2, seed, sign: i % 4 < 2 ? 1 : -1, sigma: 0.1 };
    b.tasks.push({ kind: 'rollout', course: 0, plan: 0, shape: 0, options: i % 2, policy });
  }
  return b;
}

/** A copy of `batch` with `task` inserted at index `at`. */
export function withTask(batch: Batch, at: number, task: Task): Batch {
  const tasks = [...batch.tasks];
  tasks.splice(at, 0, task);
  return { ...batch, tasks };
}

/** A copy of `batch` with its tasks in reverse order. */
export function reversed(batch: Batch): Batch {
  return { ...batch, tasks: [...batch.tasks].reverse() };
}

/** Results computed in this thread: the reference every worker count must reproduce. */
export function inline(batch: Batch): Promise<RolloutResult[]> {
  return new InlineEvaluator().evaluate(batch);
}

/**
 * Inline results of `batch` once its fault tasks stop failing: each fault task gives the fixed
 * result it returns after its last failing attempt. (Run as they are, they would throw, exit
 * or hang this thread: the inline evaluator has no such task kind.)
 */
export async function inlineRecovered(batch: Batch): Promise<RolloutResult[]> {
  const isFault = (t: Task): boolean => (t as unknown as FaultTask).kind === 'fault';
  const rollouts = await inline({ ...batch, tasks: batch.tasks.filter((t) => !isFault(t)) });
  let k = 0;
  return batch.tasks.map((t) => (isFault(t) ? FAULT_RESULT : rollouts[k++]));
}

/** The fixed result a fault task returns once it stops failing. */
export function faultResult(): RolloutResult {
  return FAULT_RESULT;
}
