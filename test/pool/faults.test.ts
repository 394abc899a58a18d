import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import { canonicalJson } from '../../src/core/index.js';
import type { Batch, PoolEvent, ThreadEvaluator } from '../../src/pool/index.js';
import type { RolloutResult } from '../../src/sim/index.js';
import { ensureBuilt, faultResult, faultTask, faultThreads, inline, rolloutBatch, SHORT, TASK_LIMIT_MS, FAULT_TEST_MS, withTask, type FaultTask } from './helpers.js';

// Eight tasks on two workers make one task a job, so only the fault task's own job fails.
const FAULT_AT = 3;
const normal: Batch = rolloutBatch(7, 0, SHORT);
const after: Batch = rolloutBatch(5, 2, SHORT);
let expected: RolloutResult[];
let expectedAfter: RolloutResult[];
let evaluator: ThreadEvaluator | undefined;
let events: PoolEvent[];

/** Two threads, with a task limit short enough for the hang test and far above a rollout's time. */
function twoWorkers(): ThreadEvaluator {
  events = [];
  evaluator = faultThreads(2, { taskTimeoutMs: TASK_LIMIT_MS, onEvent: (e) => events.push(e) });
  return evaluator;
}

beforeAll(async () => {
  ensureBuilt();
  expected = await inline(normal);
  expectedAfter = await inline(after);
}, 180_000);

afterEach(async () => {
  await evaluator?.close();
  evaluator = undefined;
});

describe.each<FaultTask['mode']>(['throw', 'exit', 'hang'])('a worker whose task does "%s" once', (mode) => {
  const fault = faultTask(mode, 1);

  it('is replaced, the task re-run, and the batch completes with the inline results', async () => {
    const results = await twoWorkers().evaluate(withTask(normal, FAULT_AT, fault));
    expect(results).toHaveLength(normal.tasks.length + 1);
    expect(canonicalJson(results[FAULT_AT])).toBe(canonicalJson(faultResult()));
    const others = results.filter((_, i) => i !== FAULT_AT);
    others.forEach((r, i) => expect(canonicalJson(r), `normal task ${i}`).toBe(canonicalJson(expected[i])));
    const replaced = events.filter((e) => e.kind === 'retried' && e.tasks.includes(FAULT_AT));
    expect(replaced.length, JSON.stringify(events)).toBeGreaterThanOrEqual(1);
    // The next batch runs on the replacement thread and the surviving one.
    expect(canonicalJson(await evaluator!.evaluate(after))).toBe(canonicalJson(expectedAfter));
  }, FAULT_TEST_MS);
});

describe('the checks above', () => {
  it('can tell every task apart: rollout results all differ, and differ from the fault result', async () => {
    // Were two results equal, a mix-up of tasks or a fault result in a rollout's place would pass.
    const all = [...expected, faultResult()].map((r) => canonicalJson(r));
    expect(new Set(all).size).toBe(all.length);
  });
});
