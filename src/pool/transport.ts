import type { RolloutResult } from '../sim/index.js';
import type { BatchTables, Task } from './task.js';

/** One task of a job: its index in the batch, and how many times it was tried before. */
export interface JobItem {
  readonly index: number;
  readonly task: Task;
  readonly attempt: number;
}

/** The batch a job belongs to: a number unique within one evaluator, and the tables its tasks refer to. */
export interface BatchRef {
  readonly id: number;
  readonly tables: BatchTables;
}

/** A job handed to a transport: its results (in item order) or the reason it was lost. */
export interface RunningJob {
  readonly result: Promise<RolloutResult[]>;
  /** Gives the job up after it overran its time (a thread running it is stopped). */
  abandon(): void;
  /** Resolves when the job reaches whatever runs it (absent: at once); its time limit counts from then. */
  readonly started?: Promise<void>;
}

/**
 * How jobs reach whatever runs them: this thread, worker threads, or a queue. A transport only
 * carries jobs; chunking, ordering of results, retries and time limits belong to the scheduler.
 */
export interface Transport {
  /** What runs the jobs, for messages ("worker threads"). */
  readonly name: string;
  /** Most jobs worth keeping in flight at once. */
  capacity(): number;
  /** Tasks per job for a batch of `n` tasks (small jobs balance rollouts of uneven length). */
  jobSize(n: number): number;
  /** Starts one job. */
  run(batch: BatchRef, items: readonly JobItem[]): RunningJob;
  /** Stops everything; the transport cannot be used afterwards. */
  close(): Promise<void>;
  /** Who is there to run jobs, and what the transport waits for, if anything. */
  status?(): BackendStatus;
}

/** Live facts for progress lines: not part of any result. */
export interface BackendStatus {
  /** Worker processes connected (queue backends). */
  readonly workers?: number;
  /** Threads running rollouts, over all workers. */
  readonly threads?: number;
  /** Rollouts finished per second over the last few seconds. */
  readonly rolloutsPerSecond?: number;
  /** Why no work is being done right now, when that is so. */
  readonly waiting?: string;
}
