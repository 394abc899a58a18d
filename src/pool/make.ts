import { availableParallelism } from 'node:os';
import { InlineEvaluator } from './inline.js';
import type { Evaluator } from './task.js';
import { ThreadEvaluator, type ThreadOptions } from './threads.js';

/** The machine's available parallelism: the default worker count. */
export function defaultWorkerCount(): number {
  return availableParallelism();
}

/** `workers` = 0 runs in the calling thread; otherwise that many persistent worker threads. */
export function makeEvaluator(workers: number, options: ThreadOptions = {}): Evaluator {
  return workers === 0 ? new InlineEvaluator() : new ThreadEvaluator(workers, options);
}
