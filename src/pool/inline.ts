import type { RolloutResult } from '../sim/index.js';
import { runTask } from './run-task.js';
import { ScheduledEvaluator } from './scheduler.js';
import type { BatchRef, JobItem, RunningJob, Transport } from './transport.js';

/** Runs jobs in the calling thread, one at a time. */
export class InlineTransport implements Transport {
  readonly name = 'this thread';

  capacity(): number {
    return 1;
  }

  jobSize(n: number): number {
    return n;
  }

  run(batch: BatchRef, items: readonly JobItem[]): RunningJob {
    const result = new Promise<RolloutResult[]>((resolve) => resolve(items.map((i) => runTask(batch.tables, i.task))));
    return { result, abandon: () => undefined };
  }

  async close(): Promise<void> {}
}

/** Runs every task in the calling thread, in order. For tests, `--workers 0` and tiny batches. */
export class InlineEvaluator extends ScheduledEvaluator {
  readonly workers = 0;

  constructor() {
    super(new InlineTransport(), { taskTimeoutMs: Infinity });
  }
}
