import { parentPort } from 'node:worker_threads';
import type { RolloutResult } from '../sim/index.js';
import type { FromWorker, ToWorker } from './messages.js';
import { runTask } from './run-task.js';
import type { BatchTables } from './task.js';

/**
 * A pool worker: holds the current batch's tables and runs jobs of tasks. It holds no run
 * state and never writes files. An exception is left uncaught on purpose: the thread dies
 * and the pool replaces it and re-runs its tasks.
 */
let tables: BatchTables | undefined;
let tablesBatch = -1;

parentPort!.on('message', (msg: ToWorker) => {
  if (msg.type === 'tables') {
    tables = msg.tables;
    tablesBatch = msg.batch;
    return;
  }
  if (!tables || tablesBatch !== msg.batch) throw new Error(`worker has no tables for batch ${msg.batch}`);
  const results: RolloutResult[] = [];
  for (const item of msg.items) results.push(runTask(tables, item.task, item.attempt));
  const reply: FromWorker = { type: 'done', batch: msg.batch, job: msg.job, results };
  parentPort!.postMessage(reply);
});
