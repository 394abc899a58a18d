import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { canonicalJson } from '../../src/core/index.js';
import { ThreadEvaluator, type Batch } from '../../src/pool/index.js';
import type { RolloutResult } from '../../src/sim/index.js';
import { ensureBuilt, inline, reversed, rolloutBatch } from './helpers.js';

// More tasks than workers, so every worker runs several jobs and finishes them out of order.
const batch: Batch = rolloutBatch(24);
let expected: RolloutResult[];
// One evaluator per worker count, shared by the tests below: each fresh thread pays about 1 s of
// JIT warm-up, and the CPU is shared.
const evaluators = new Map<number, ThreadEvaluator>();

function threads(workers: number): ThreadEvaluator {
  if (!evaluators.has(workers)) evaluators.set(workers, new ThreadEvaluator(workers));
  return evaluators.get(workers)!;
}

beforeAll(async () => {
  ensureBuilt();
  expected = await inline(batch);
}, 180_000);

afterAll(async () => {
  await Promise.all([...evaluators.values()].map((e) => e.close()));
});

describe('results do not depend on the number of worker threads', () => {
  it('gives every task of the batch a different result in the calling thread', () => {
    // Without this, equal arrays would not show that results come back in task order.
    expect(new Set(expected.map((r) => canonicalJson(r))).size).toBe(batch.tasks.length);
  });

  it.each([1, 2, 3])('returns the inline results bit for bit, in task order, with %i worker(s)', async (workers) => {
    const results = await threads(workers).evaluate(batch);
    expect(results).toHaveLength(batch.tasks.length);
    results.forEach((r, i) => expect(canonicalJson(r), `task ${i}`).toBe(canonicalJson(expected[i])));
    expect(canonicalJson(results)).toBe(canonicalJson(expected));
  });

  it('returns results in the order of the tasks, not of their completion, when the batch is reversed', async () => {
    const results = await threads(3).evaluate(reversed(batch));
    expect(canonicalJson(results)).toBe(canonicalJson([...expected].reverse()));
  });

  it('sends each batch its own tables: a second, different batch on the same threads matches its inline results', async () => {
    const other = rolloutBatch(10, 1);
    const first = await threads(2).evaluate(batch);
    const second = await threads(2).evaluate(other);
    expect(canonicalJson(first)).toBe(canonicalJson(expected));
    expect(canonicalJson(second)).toBe(canonicalJson(await inline(other)));
    expect(canonicalJson(second)).not.toBe(canonicalJson(expected.slice(0, 10)));
  });
});
