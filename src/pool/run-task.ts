import { candidate } from '../core/index.js';
import { rollout, type RolloutResult } from '../sim/index.js';
import type { BatchTables, Task } from './task.js';

/** Result a fault task returns once it stops failing. */
const FAULT_RESULT: RolloutResult = { progress: 0.5, fitness: 0.5, steps: 1, fell: false, end: 'budget' };

function runFault(task: Extract<Task, { kind: 'fault' }>, attempt: number): RolloutResult {
  if (attempt < task.untilAttempt) {
    if (task.mode === 'throw') throw new Error('injected fault: throw');
    if (task.mode === 'exit') process.exit(3);
    for (;;) {
      // injected fault: never returns
    }
  }
  return FAULT_RESULT;
}

/** Runs one task against a batch's tables. The same code runs in worker threads and in the calling thread. */
export function runTask(tables: BatchTables, task: Task, attempt: number): RolloutResult {
  if (task.kind === 'fault') return runFault(task, attempt);
  const p = task.policy;
  const params = p.kind === 'params' ? Float64Array.from(p.params) : candidate(tables.bases[p.base], p.seed, p.sign, p.sigma);
  return rollout(tables.courses[task.course], tables.plans[task.plan], tables.shapes[task.shape], params, tables.options[task.options]);
}
