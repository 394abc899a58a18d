import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import { canonicalJson } from '../../src/core/index.js';
import { emptyBatch, InlineEvaluator, makeEvaluator, threads, ThreadEvaluator, type Batch } from '../../src/pool/index.js';
import { ensureBuilt, inline, rolloutBatch } from './helpers.js';

const small: Batch = rolloutBatch(3);
let evaluator: ThreadEvaluator | undefined;

beforeAll(() => ensureBuilt(), 180_000);

afterEach(async () => {
  await evaluator?.close();
  evaluator = undefined;
});

describe('an empty batch', () => {
  it('resolves to no results in the calling thread and on threads', async () => {
    expect(await new InlineEvaluator().evaluate(emptyBatch())).toEqual([]);
    evaluator = new ThreadEvaluator(2);
    expect(await evaluator.evaluate(emptyBatch())).toEqual([]);
  });
});

describe('a closed evaluator', () => {
  it('rejects evaluate, and closing it again is harmless', async () => {
    evaluator = new ThreadEvaluator(1);
    await evaluator.close();
    await expect(evaluator.evaluate(small)).rejects.toThrow(/closed/);
    await expect(evaluator.close()).resolves.toBeUndefined();
  });

  it('rejects the batch that was running when it was closed', async () => {
    evaluator = new ThreadEvaluator(1);
    const running = evaluator.evaluate(small);
    await evaluator.close();
    await expect(running).rejects.toThrow(/closed while a batch was running/);
  });
});

describe('overlapping batches', () => {
  it('rejects a second evaluate while one runs, and the first still completes correctly', async () => {
    evaluator = new ThreadEvaluator(1);
    const first = evaluator.evaluate(small);
    await expect(evaluator.evaluate(small)).rejects.toThrow(/while a batch is running/);
    expect(canonicalJson(await first)).toBe(canonicalJson(await inline(small)));
  });
});

describe('worker counts', () => {
  it.each([0, -1, 1.5, Number.NaN])('refuses %s worker threads', (n) => {
    expect(() => new ThreadEvaluator(n)).toThrow(/at least one worker/);
  });

  it('makes an in-thread evaluator for 0 workers and threads otherwise', async () => {
    expect(makeEvaluator(threads(0))).toBeInstanceOf(InlineEvaluator);
    const ev = makeEvaluator(threads(2));
    evaluator = ev as ThreadEvaluator;
    expect(ev).toBeInstanceOf(ThreadEvaluator);
    expect(evaluator.workers).toBe(2);
  });
});
