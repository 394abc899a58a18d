import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { canonicalJson } from '../../src/core/index.js';
import { emptyBatch, type Batch } from '../../src/pool/index.js';
import { ensureBuilt, faultTask, inlineRecovered, ROOT, rolloutBatch, withTask } from './helpers.js';

const FIXTURE = join(ROOT, 'test/fixtures/pool-exit.mjs');

beforeAll(() => ensureBuilt(), 180_000);

/**
 * Runs the fixture (two worker threads) on `batch` in a fresh node. The limit is far above the
 * few seconds a run takes on a shared CPU; a process kept alive by idle threads would reach it.
 */
function child(batch: Batch, mode: 'close' | 'return') {
  const env = { ...process.env };
  delete env.NODE_OPTIONS; // nothing from the test runner may hide or add warnings
  // canonicalJson keeps -0 and every double exactly, and JSON.parse reads both back as they were.
  return spawnSync(process.execPath, [FIXTURE, mode], {
    cwd: ROOT, env, input: canonicalJson(batch), encoding: 'utf8', timeout: 25_000, killSignal: 'SIGKILL',
  });
}

const six = rolloutBatch(6);
const cases: [string, Batch, 'close' | 'return'][] = [
  ['evaluating a batch and returning without close()', six, 'return'],
  ['evaluating a batch and calling close()', six, 'close'],
  ['an empty batch, so its threads never ran a job', emptyBatch(), 'return'],
  ['one task on two threads, so one thread stayed idle', rolloutBatch(1), 'return'],
  ['a thread terminated for hanging and replaced', withTask(six, 2, faultTask('hang', 1)), 'return'],
];

describe('a program that used a ThreadEvaluator', () => {
  it.each(cases)('exits by itself with status 0 and no warning after %s', async (_, batch, mode) => {
    const run = child(batch, mode);
    expect(run.signal, 'killed at the time limit: the process did not exit by itself').toBeNull();
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toBe(canonicalJson(await inlineRecovered(batch)));
    // worker-threads-pool's destroy() passes a callback to Worker.terminate, which Node 20
    // deprecates (DEP0132); close() must stop threads without it.
    expect(run.stderr).not.toMatch(/DEP0132|Warning/);
  }, 60_000);
});
