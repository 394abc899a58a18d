import type { RolloutResult } from '../sim/index.js';
import { runTask } from './run-task.js';
import type { Batch, Evaluator } from './task.js';

/** Runs every task in the calling thread, in order. For tests, `--workers 0` and tiny batches. */
export class InlineEvaluator implements Evaluator {
  readonly workers = 0;

  async evaluate(batch: Batch): Promise<RolloutResult[]> {
    return batch.tasks.map((t) => runTask(batch, t, 0));
  }

  async close(): Promise<void> {}
}
