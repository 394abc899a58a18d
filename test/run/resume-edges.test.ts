/**
 * The resume sequence at its edges: a run stopped between creating its directory and writing
 * checkpoint 0, and a target below the iteration already reached.
 */
import { existsSync, readdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Run } from '../../src/run/index.js';
import { cli, cliOk, ensureBuilt, outcome, SLOW, tempDir, writeTinyRecipe } from '../store/helpers.js';

let root = '';
let recipe = '';

beforeAll(() => {
  ensureBuilt();
  root = tempDir('resume-edges');
  recipe = writeTinyRecipe(root);
}, SLOW);
afterAll(() => rmSync(root, { recursive: true, force: true }));

describe('a run stopped before its first checkpoint', () => {
  it('is resumed from iteration 0 and ends where an uninterrupted run ends', async () => {
    const whole = join(root, 'whole');
    await cliOk(['run', recipe, '--out', whole, '--workers', '0', '--iterations', '3', '--quiet']);
    // What a kill right after the directory was created leaves behind: inputs, no checkpoint.
    const early = join(root, 'early');
    Run.create(recipe, early, { iterations: 3 });
    expect(readdirSync(join(early, 'checkpoints'))).toEqual([]);
    const r = await cliOk(['resume', early, '--workers', '0']);
    expect(r.stderr).toMatch(/no checkpoint yet/);
    expect(await outcome(early)).toEqual({ ...(await outcome(whole)) });
  }, SLOW);

  it('is refused by status with a message that says how to continue it', async () => {
    const early = join(root, 'early-status');
    Run.create(recipe, early, { iterations: 3 });
    const r = await cli(['status', early]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/stopped before writing its first one; `cairn resume .*early-status` starts it from iteration 0/);
    expect(r.stderr).not.toMatch(/^\s+at /m);
  });
});

describe('resume --iterations below the current iteration', () => {
  it('exits 2 saying so, and leaves the run as it was', async () => {
    const dir = join(root, 'ahead');
    await cliOk(['run', recipe, '--out', dir, '--workers', '0', '--iterations', '2', '--quiet']);
    const before = await outcome(dir);
    const r = await cli(['resume', dir, '--iterations', '1', '--workers', '0']);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/--iterations 1 is below the run's current iteration 2/);
    expect(await outcome(dir)).toEqual(before);
    expect(existsSync(join(dir, 'lock'))).toBe(false);
  }, SLOW);
});
