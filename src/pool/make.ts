import { availableParallelism } from 'node:os';
import { InlineEvaluator } from './inline.js';
import type { SchedulerOptions } from './scheduler.js';
import type { Evaluator } from './task.js';
import { ThreadEvaluator } from './threads.js';

/** The machine's available parallelism: the default worker count. */
export function defaultWorkerCount(): number {
  return availableParallelism();
}

/** Where rollouts run: threads of this process (0 = the calling thread itself). */
export type Backend = { readonly kind: 'threads'; readonly workers: number };

/** A backend of `workers` threads of this process. */
export function threads(workers: number): Backend {
  return { kind: 'threads', workers };
}

/** The evaluator a backend description names. */
export function makeEvaluator(backend: Backend, options: SchedulerOptions = {}): Evaluator {
  return backend.workers === 0 ? new InlineEvaluator() : new ThreadEvaluator(backend.workers, options);
}

/** A short description for progress lines and logs ("2 worker threads"). */
export function describeBackend(backend: Backend): string {
  return backend.workers === 0 ? 'this thread' : `${backend.workers} worker thread${backend.workers === 1 ? '' : 's'}`;
}
