/**
 * Stopping a run with a signal. The exit codes are the shell convention 128 + signal number
 * (SIGINT 2 → 130, SIGTERM 15 → 143; POSIX signal numbers), which the DESIGN contract adopts.
 * The recipe checkpoints only every 1000 iterations, so any checkpoint past iteration 0 is the
 * one written on the way out.
 */
import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listCheckpoints } from '../../src/store/index.js';
import { ensureBuilt, lineCount, startCli, status, tempDir, waitFor, writeTinyRecipe, SLOW } from './helpers.js';

let root = '';
let recipe = '';

beforeAll(() => {
  ensureBuilt();
  root = tempDir('signals');
  recipe = writeTinyRecipe(root, { checkpoint: { interval: 1000 }, budget: { iterations: 10_000 } });
}, SLOW);
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** Starts a run, waits for its first finished iteration, sends the signal(s), and returns how it ended. */
async function interrupt(label: string, signals: NodeJS.Signals[]) {
  const dir = join(root, label);
  const run = startCli(['run', recipe, '--out', dir, '--workers', '1']);
  try {
    await waitFor('the first metrics line', () => lineCount(join(dir, 'metrics.jsonl')) >= 1 || run.child.exitCode !== null);
    for (const [i, s] of signals.entries()) {
      // A second signal is sent once the first was handled, so the two are not merged into one.
      if (i > 0) await waitFor('the stop note', () => run.out().stderr.includes('stopping after this iteration') || run.child.exitCode !== null);
      run.child.kill(s);
    }
    return { dir, result: await run.done };
  } finally {
    run.child.kill('SIGKILL'); // only if a failed expectation left it running
  }
}

/** The run stopped cleanly: newest checkpoint is the last finished iteration, and the logs end there too. */
async function expectCheckpointOfLastIteration(dir: string): Promise<number> {
  const s = await status(dir);
  expect(s.iteration).toBeGreaterThanOrEqual(1);
  expect(s.skippedCheckpoints).toBe(0);
  expect(listCheckpoints(dir)).toEqual([s.iteration, 0]);
  expect(lineCount(join(dir, 'metrics.jsonl'))).toBe(s.iteration);
  const last = readFileSync(join(dir, 'metrics.jsonl'), 'utf8').trim().split('\n').pop()!;
  expect((JSON.parse(last) as { iteration: number }).iteration).toBe(s.iteration);
  return s.iteration;
}

describe('signals to a running `cairn run`', () => {
  it('SIGINT: finishes the iteration, checkpoints it, exits 130', async () => {
    const { dir, result } = await interrupt('int', ['SIGINT']);
    expect(result.code, result.stderr).toBe(130);
    expect(result.stderr).toContain('stopping after this iteration');
    const it = await expectCheckpointOfLastIteration(dir);
    expect(result.stdout).toContain(`iteration ${it},`);
    expect(result.stdout).toContain('stopped: sigint');
  }, SLOW);

  it('SIGTERM: finishes the iteration, checkpoints it, exits 143', async () => {
    const { dir, result } = await interrupt('term', ['SIGTERM']);
    expect(result.code, result.stderr).toBe(143);
    const it = await expectCheckpointOfLastIteration(dir);
    expect(result.stdout).toContain(`iteration ${it},`);
    expect(result.stdout).toContain('stopped: sigterm');
  }, SLOW);

  it('a second SIGINT quits at once with 130, leaving a run that still opens', async () => {
    const { dir, result } = await interrupt('twice', ['SIGINT', 'SIGINT']);
    expect(result.code, result.stderr).toBe(130);
    const s = await status(dir);
    expect(s.skippedCheckpoints).toBe(0);
    expect(s.iteration).toBe(listCheckpoints(dir)[0]);
  }, SLOW);
});
