import type { BodyPlan } from '../body/index.js';
import type { PolicyShape } from '../policy/index.js';
import type { RolloutOptions, RolloutResult } from '../sim/index.js';
import type { Course } from '../terrain/index.js';
import type { BackendStatus } from './transport.js';

/**
 * The controller weights of a task: given outright, or rebuilt in the worker as
 * base + sign·σ·ε(seed), where `base` indexes the batch's shared vectors. The second form
 * sends an ES mean once per batch instead of once per candidate.
 */
export type PolicyRef =
  | { readonly kind: 'params'; readonly params: readonly number[] }
  | { readonly kind: 'perturbed'; readonly base: number; readonly seed: number; readonly sign: 1 | -1; readonly sigma: number };

/** One rollout. Indices point into the batch's shared tables. */
export interface RolloutTask {
  readonly kind: 'rollout';
  readonly course: number;
  readonly plan: number;
  readonly shape: number;
  readonly options: number;
  readonly policy: PolicyRef;
}

export type Task = RolloutTask;

/** Inputs shared by many tasks of a batch, sent to each worker once per batch. */
export interface BatchTables {
  readonly courses: readonly Course[];
  readonly plans: readonly BodyPlan[];
  readonly shapes: readonly PolicyShape[];
  readonly options: readonly RolloutOptions[];
  /** Base weight vectors for perturbed policies (ES means). */
  readonly bases: readonly (readonly number[])[];
}

/** A self-contained, serialisable unit of work: tables plus tasks that refer into them. */
export interface Batch extends BatchTables {
  readonly tasks: readonly Task[];
}

/** What a pool reports about itself as it works: a job was lost (its worker died, threw or overran) and its tasks re-queued. */
export interface PoolEvent {
  readonly kind: 'retried';
  readonly reason: string;
  /** Task indices (in the batch) that were re-queued. */
  readonly tasks: readonly number[];
}

/** Runs batches of rollouts. Results come back in task order, whoever computed them. */
export interface Evaluator {
  evaluate(batch: Batch): Promise<RolloutResult[]>;
  /** Stops all threads and connections; the evaluator cannot be used afterwards. */
  close(): Promise<void>;
  /** Live facts for progress lines (workers, rollouts per second, what it waits for). */
  status?(): BackendStatus;
}

/** A batch under construction: every table and the task list can be appended to. */
export interface MutableBatch { courses: Course[]; plans: BodyPlan[]; shapes: PolicyShape[]; options: RolloutOptions[]; bases: number[][]; tasks: Task[] }

/** An empty batch to fill. */
export function emptyBatch(): MutableBatch {
  return { courses: [], plans: [], shapes: [], options: [], bases: [], tasks: [] };
}

/**
 * A batch over one scene: the course, plan, shape and options at index 0 of their tables, and
 * (when `params` are given) one rollout of those weights as task 0.
 */
export function sceneBatch(course: Course, plan: BodyPlan, shape: PolicyShape, options: RolloutOptions, params?: readonly number[]): MutableBatch {
  const b: MutableBatch = { courses: [course], plans: [plan], shapes: [shape], options: [options], bases: [], tasks: [] };
  if (params) b.tasks.push({ kind: 'rollout', course: 0, plan: 0, shape: 0, options: 0, policy: { kind: 'params', params } });
  return b;
}
