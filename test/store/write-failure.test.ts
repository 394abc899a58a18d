/**
 * A run whose disk refuses a write mid-run. Root ignores permissions, so the failures come from
 * paths that cannot be written for anyone: a folder standing where the next checkpoint or a log
 * file must go. The driver must stop with a WriteError naming that path, keep the last good
 * checkpoint, and leave a directory that resumes to the same run as one never disturbed.
 */
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { canonicalJson } from '../../src/core/index.js';
import { fingerprint, type RunState } from '../../src/coevo/index.js';
import { InlineEvaluator } from '../../src/pool/index.js';
import {
  checkpointPath, EVENTS, listCheckpoints, loadNewestCheckpoint, METRICS, openRun, readCheckpoint, truncateLogs, WriteError, type RunInputs,
} from '../../src/store/index.js';
import { advance, lineCount, makeRun, SLOW, tempDir, tempFiles } from './helpers.js';
import { loop, Run } from '../../src/run/index.js';

let root = '';
/** An undisturbed run of the same recipe to iteration 3. */
let reference: { dir: string; state: RunState };

beforeAll(async () => {
  root = tempDir('wfail');
  const run = makeRun(root, { checkpoint: { interval: 1 } }, 'reference');
  reference = { dir: run.inputs.dir, state: (await advance(run.inputs, run.state, 3)).state };
}, SLOW);
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** Drives to iteration 3, returning the error it stopped with and the states it finished. */
async function driveUntilFailure(inputs: RunInputs, start: RunState): Promise<{ error: unknown; finished: RunState[] }> {
  const finished: RunState[] = [];
  try {
    await loop(Run.of(inputs), start, { evaluator: new InlineEvaluator(), targetIterations: 3, minutes: 0, stopRequested: () => null, onIteration: (o) => finished.push(o.state) });
  } catch (error) {
    return { error, finished };
  }
  throw new Error('drive did not fail');
}

/** Resumes the run as `cairn resume` does and checks it ends where the undisturbed run did. */
async function expectResumesToReference(dir: string): Promise<void> {
  const opened = openRun(dir);
  truncateLogs(dir, opened.state.iteration);
  const { state } = await advance(opened.inputs, opened.state, 3);
  expect(fingerprint(state, opened.inputs.recipeHash)).toBe(fingerprint(reference.state, opened.inputs.recipeHash));
  for (const log of [METRICS, EVENTS]) expect(readFileSync(join(dir, log), 'utf8'), log).toBe(readFileSync(join(reference.dir, log), 'utf8'));
}

describe('drive when a checkpoint cannot be written', () => {
  it('rejects with a WriteError naming the checkpoint, and the previous checkpoint survives intact', async () => {
    const { inputs, state } = makeRun(root, { checkpoint: { interval: 1 } }, 'ckpt');
    const blocked = checkpointPath(inputs.dir, 2);
    mkdirSync(blocked);
    writeFileSync(join(blocked, 'occupant'), 'x'); // rename(2) cannot replace a non-empty folder

    const { error, finished } = await driveUntilFailure(inputs, state);
    expect(error).toBeInstanceOf(WriteError);
    expect((error as WriteError).path).toBe(blocked);
    expect(finished.map((s) => s.iteration)).toEqual([1, 2]);

    // Checkpoint 1, written before the failure, is still there and still verifies; no temp file is left.
    const one = readCheckpoint(checkpointPath(inputs.dir, 1), inputs.recipeHash);
    expect('state' in one && canonicalJson(one.state)).toBe(canonicalJson(finished[0]));
    expect(tempFiles(inputs.dir)).toEqual([]);
    // The failed write did not prune: 0 and 1 remain beside the blocked name.
    expect(listCheckpoints(inputs.dir)).toEqual([2, 1, 0]);
    const loaded = loadNewestCheckpoint(inputs.dir, inputs.recipeHash);
    expect(loaded.skipped.map((s) => s.file)).toEqual([blocked]);
    expect(loaded.state?.iteration).toBe(1);

    // Iteration 2 reached the logs before its checkpoint failed; a resume drops it and redoes it.
    expect(lineCount(join(inputs.dir, METRICS))).toBe(2);
    rmSync(blocked, { recursive: true });
    await expectResumesToReference(inputs.dir);
  });
});

describe('drive when a log cannot be appended to', () => {
  it('rejects with a WriteError naming the log, after checkpointing the last finished iteration', async () => {
    // Checkpoints every 2 iterations: iteration 1 is finished but not yet saved when 2 fails.
    const { inputs, state } = makeRun(root, { checkpoint: { interval: 2 } }, 'log');
    const events = join(inputs.dir, EVENTS);
    // Iteration 1 logs no events in this recipe (no admission or transfer yet); iteration 2
    // admits courses, so its append is the first to meet the obstacle.
    rmSync(events); // created empty with the run directory; a folder takes its place
    mkdirSync(events);
    const { error, finished } = await driveUntilFailure(inputs, state);
    expect(error).toBeInstanceOf(WriteError);
    expect((error as WriteError).path).toBe(events);
    expect(finished.map((s) => s.iteration)).toEqual([1]);
    expect(listCheckpoints(inputs.dir)).toEqual([1, 0]);
    expect(existsSync(join(inputs.dir, METRICS))).toBe(true);
    expect(lineCount(join(inputs.dir, METRICS))).toBe(1);

    rmSync(events, { recursive: true });
    await expectResumesToReference(inputs.dir);
  });
});
