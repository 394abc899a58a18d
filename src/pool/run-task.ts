import { candidate } from '../core/index.js';
import { rollout, type RolloutResult } from '../sim/index.js';
import type { BatchTables, Task } from './task.js';

/** Runs one task against a batch's tables. The same code runs in worker threads, queue workers and the calling thread. */
export function runTask(tables: BatchTables, task: Task): RolloutResult {
  const p = task.policy;
  const params = p.kind === 'params' ? Float64Array.from(p.params) : candidate(tables.bases[p.base], p.seed, p.sign, p.sigma);
  return rollout(tables.courses[task.course], tables.plans[task.plan], tables.shapes[task.shape], params, tables.options[task.options]);
}
