import type { RolloutResult } from '../sim/index.js';
import type { BatchTables } from './task.js';
import type { JobItem } from './transport.js';

/** Main thread → worker. */
export type ToWorker =
  | { readonly type: 'tables'; readonly batch: number; readonly tables: BatchTables }
  | { readonly type: 'run'; readonly batch: number; readonly job: number; readonly items: readonly JobItem[] };

/** Worker → main thread. */
export type FromWorker = { readonly type: 'done'; readonly batch: number; readonly job: number; readonly results: readonly RolloutResult[] };
