import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import { canonicalJson } from '../../src/core/index.js';
import { emptyBatch, type Batch, type PoolEvent, type ThreadEvaluator } from '../../src/pool/index.js';
import type { RolloutResult } from '../../src/sim/index.js';
import { ensureBuilt, faultTask, faultThreads, inline, rolloutBatch, SHORT, TASK_LIMIT_MS, FAULT_TEST_MS, withTask, type FaultTask } from './helpers.js';

const FAULT_AT = 3;
const NEVER = 1_000_000;
const normal: Batch = rolloutBatch(7, 0, SHORT);
const after: Batch = rolloutBatch(5, 2, SHORT);
let expectedAfter: RolloutResult[];
let evaluator: ThreadEvaluator | undefined;
let events: PoolEvent[];

function threads(workers: number): ThreadEvaluator {
  events = [];
  evaluator = faultThreads(workers, { taskTimeoutMs: TASK_LIMIT_MS, onEvent: (e) => events.push(e) });
  return evaluator;
}

beforeAll(async () => {
  ensureBuilt();
  expectedAfter = await inline(after);
}, 180_000);

afterEach(async () => {
  await evaluator?.close();
  evaluator = undefined;
});

describe.each<FaultTask['mode']>(['throw', 'exit', 'hang'])('a task that does "%s" on every attempt', (mode) => {
  it('makes evaluate reject naming the task and saying it failed twice, and the next batch still runs', async () => {
    const ev = threads(2);
    const batch = withTask(normal, FAULT_AT, faultTask(mode, NEVER));
    await expect(ev.evaluate(batch)).rejects.toThrow(new RegExp(`^task ${FAULT_AT} \\(fault\\) failed twice`));
    expect(events.filter((e) => e.tasks.includes(FAULT_AT)).length, JSON.stringify(events)).toBeGreaterThanOrEqual(2);
    expect(canonicalJson(await ev.evaluate(after))).toBe(canonicalJson(expectedAfter));
  }, FAULT_TEST_MS);
});

describe('threads that keep failing', () => {
  it('make this and every later batch reject instead of waiting for threads that are no longer started', async () => {
    // One thread, and batches with no task that could succeed: every failure counts towards the
    // limit of 2·workers + 2 failures in a row, after which failed threads are not replaced.
    const ev = threads(1);
    const doomed: Batch = { ...emptyBatch(), tasks: [faultTask('throw', NEVER)] };
    const messages: string[] = [];
    for (let k = 0; k < 3; k++) messages.push(await ev.evaluate(doomed).then(() => 'resolved', (e: Error) => e.message));
    expect(messages.slice(0, 2)).toEqual(['task 0 (fault) failed twice: worker threw: injected fault: throw', 'task 0 (fault) failed twice: worker threw: injected fault: throw']);
    expect(messages[2]).toMatch(/^worker threads keep failing \(5 times in a row\)/);
    await expect(ev.evaluate(after)).rejects.toThrow(/keep failing/);
  }, FAULT_TEST_MS);
});
