import type { RolloutResult } from '../sim/index.js';
import type { BatchTables, Task } from './task.js';

/** Main thread → worker. */
export type ToWorker =
  | { readonly type: 'tables'; readonly batch: number; readonly tables: BatchTables }
  | { readonly type: 'run'; readonly batch: number; readonly job: number; readonly items: readonly { readonly index: number; readonly task: Task; readonly attempt: number }[] };

/** Worker → main thread. */
export type FromWorker = { readonly type: 'done'; readonly batch: number; readonly job: number; readonly results: readonly RolloutResult[] };
