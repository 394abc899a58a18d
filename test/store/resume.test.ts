/**
 * A run stopped and resumed is the same run as one never stopped: equal fingerprints (from
 * `cairn status --json`) and byte-identical metrics and event logs, whatever the worker count of
 * each part. The recipe checkpoints every 2 iterations, so stops also land between checkpoints.
 */
import { rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cliOk, ensureBuilt, outcome, status, tempDir, tempFiles, writeTinyRecipe, SLOW } from './helpers.js';

const N = 6;
let root = '';
let recipe = '';
let reference: Awaited<ReturnType<typeof outcome>>;

beforeAll(async () => {
  ensureBuilt();
  root = tempDir('resume');
  recipe = writeTinyRecipe(root, { budget: { iterations: N } });
  const dir = join(root, 'reference');
  await cliOk(['run', recipe, '--out', dir, '--workers', '1', '--quiet']);
  reference = await outcome(dir);
}, SLOW);
afterAll(() => rmSync(root, { recursive: true, force: true }));

describe('the uninterrupted reference run', () => {
  it('reached the target and logged every kind of record the comparison relies on', () => {
    expect(reference.iteration).toBe(N);
    expect(reference.fingerprint).toMatch(/^[0-9a-f]{64}$/);
    expect(reference.metrics.trim().split('\n')).toHaveLength(N);
    const types = new Set(reference.events.trim().split('\n').map((l) => (JSON.parse(l) as { type: string }).type));
    expect([...types].sort()).toEqual(expect.arrayContaining(['candidate', 'retired', 'takeover']));
  });
});

describe('stop and resume', () => {
  it('--iterations 3, then resume --iterations 6 on another worker count, equals the uninterrupted run', async () => {
    const dir = join(root, 'early');
    const first = await cliOk(['run', recipe, '--out', dir, '--workers', '1', '--iterations', '3', '--quiet']);
    expect(first.stdout).toContain('iteration 3,');
    const second = await cliOk(['resume', dir, '--workers', '2', '--iterations', String(N)]);
    expect(second.stderr).toContain('resuming');
    expect(second.stderr).toContain('at iteration 3');
    expect(await outcome(dir)).toEqual(reference);
    expect((await status(dir)).targetIterations).toBe(N);
    expect(tempFiles(dir)).toEqual([]);
  }, SLOW);

  it('a short --minutes budget, resumed with --minutes again and again, equals the uninterrupted run', async () => {
    const dir = join(root, 'minutes');
    // 0.01 minutes = 0.6 s: each invocation stops after an iteration or two, at a point set by the clock.
    const reached = (stdout: string): number => Number(/: iteration (\d+),/.exec(stdout)?.[1]);
    const seen = [reached((await cliOk(['run', recipe, '--out', dir, '--workers', '0', '--minutes', '0.01', '--quiet'])).stdout)];
    const workers = ['1', '0', '2'];
    while (seen[seen.length - 1] < N) {
      if (seen.length > 2 * N) throw new Error(`no end after ${seen.length} invocations: ${seen.join(', ')}`);
      const r = await cliOk(['resume', dir, '--workers', workers[seen.length % 3], '--minutes', '0.01', '--quiet']);
      const it = reached(r.stdout);
      expect(it, 'each invocation finishes at least one iteration').toBeGreaterThan(seen[seen.length - 1]);
      expect(r.stdout).toContain(it < N ? 'stopped: minutes' : 'target reached');
      seen.push(it);
    }
    expect(seen.length).toBeGreaterThan(1); // it really was stopped by the clock at least once
    expect(await outcome(dir)).toEqual(reference);
  }, SLOW);
});
