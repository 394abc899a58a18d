import type { MessagePort } from 'node:worker_threads';
import type { RolloutResult } from '../sim/index.js';
import type { FromWorker, ToWorker } from './messages.js';
import type { BatchTables, Task } from './task.js';

/** Runs one task; `attempt` counts earlier tries of the same task (0 on the first). */
export type TaskRunner = (tables: BatchTables, task: Task, attempt: number) => RolloutResult;

/**
 * A pool thread's message loop: holds the current batch's tables and runs jobs of tasks. It
 * holds no run state and never writes files. An exception is left uncaught on purpose: the
 * thread dies, and the transport replaces it and the scheduler re-runs its tasks.
 */
export function serveTasks(port: MessagePort, run: TaskRunner): void {
  let tables: BatchTables | undefined;
  let tablesBatch = -1;
  port.on('message', (msg: ToWorker) => {
    if (msg.type === 'tables') {
      tables = msg.tables;
      tablesBatch = msg.batch;
      return;
    }
    if (!tables || tablesBatch !== msg.batch) throw new Error(`worker has no tables for batch ${msg.batch}`);
    const results = msg.items.map((item) => run(tables!, item.task, item.attempt));
    const reply: FromWorker = { type: 'done', batch: msg.batch, job: msg.job, results };
    port.postMessage(reply);
  });
}
