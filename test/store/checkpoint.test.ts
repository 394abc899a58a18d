/**
 * Checkpoints: exact round trips of the run state, and what loading does with damaged or
 * foreign files. Checksums are SHA-256 (FIPS 180-4) of the state's canonical JSON; doubles
 * survive because canonical JSON writes each in the shortest form that reads back as the same
 * double (ECMA-262 Number::toString), which JSON.parse reads back exactly.
 */
import { cpSync, mkdirSync, readFileSync, rmSync, truncateSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { canonicalJson, sha256, UserError } from '../../src/core/index.js';
import type { RunState } from '../../src/coevo/index.js';
import {
  CHECKPOINT_VERSION, checkpointPath, listCheckpoints, loadNewestCheckpoint, openRun, readCheckpoint, writeCheckpoint, type RunInputs,
} from '../../src/store/index.js';
import { advance, flipDigitInState, makeRun, SLOW, tempDir } from './helpers.js';

let root = '';
let inputs: RunInputs;
/** Real states of a tiny run at iterations 0, 1, 2 (each also on disk as a checkpoint). */
const states: RunState[] = [];

beforeAll(async () => {
  root = tempDir('ckpt');
  const run = makeRun(root, { checkpoint: { interval: 1, keep: 3 } });
  inputs = run.inputs;
  states.push(run.state, ...(await advance(inputs, run.state, 2)).outcomes.map((o) => o.state));
}, SLOW);
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** Every number in a value, depth first in key order, so two values can be compared with Object.is. */
function numbers(v: unknown, out: number[] = []): number[] {
  if (typeof v === 'number') out.push(v);
  else if (Array.isArray(v)) for (const x of v) numbers(x, out);
  else if (v && typeof v === 'object') for (const k of Object.keys(v).sort()) numbers((v as Record<string, unknown>)[k], out);
  return out;
}

/** Writes `state` as a checkpoint in a folder of its own and reads it back. */
function roundTrip(state: RunState, label: string): RunState {
  const dir = join(root, `rt-${label}`);
  mkdirSync(join(dir, 'checkpoints'), { recursive: true });
  writeCheckpoint(dir, state, inputs.recipeHash, 1);
  const r = readCheckpoint(checkpointPath(dir, state.iteration), inputs.recipeHash);
  if (!('state' in r)) throw new Error(r.problem);
  return r.state;
}

function expectIdentical(back: RunState, state: RunState): void {
  expect(canonicalJson(back)).toBe(canonicalJson(state));
  const a = numbers(back);
  const b = numbers(state);
  expect(a.length).toBe(b.length);
  const differing = a.flatMap((x, i) => (Object.is(x, b[i]) ? [] : [`#${i}: ${x} vs ${b[i]}`]));
  expect(differing).toEqual([]);
}

const AWKWARD = [-0, 0, 1e-300, 5e-324, 2.2250738585072014e-308, 0.1 + 0.2, 1 / 3, -1e-7, 2 ** 53 - 1, -(2 ** 53), 2 ** 53 + 2, 1e21, 1.7976931348623157e308, -123.456e-10];

/** A real state with awkward numbers put into its first pair's optimiser moments and its counters. */
function awkward(state: RunState): RunState {
  const [p, ...rest] = state.pairs;
  const m = p.es.m.map((x, i) => AWKWARD[i % AWKWARD.length] ?? x);
  return {
    ...state,
    pairs: [{ ...p, es: { ...p.es, m, v: [...p.es.v].reverse() } }, ...rest],
    counters: { ...state.counters, steps: 2 ** 53 - 1, rollouts: 2 ** 31 },
  };
}

describe('checkpoint round trip', () => {
  it('reads back a real run state identically, every number the same double', () => {
    const state = states[2];
    expect(state.iteration).toBe(2);
    expect(numbers(state).length).toBeGreaterThan(100); // the ES means and moments are in it
    expectIdentical(roundTrip(state, 'real'), state);
  });

  it('keeps -0, subnormals, 0.1 + 0.2, the largest safe integers and 1e21 exactly', () => {
    const state = awkward(states[2]);
    const back = roundTrip(state, 'awkward');
    expectIdentical(back, state);
    expect(Object.is(back.pairs[0].es.m[0], -0)).toBe(true);
    expect(back.pairs[0].es.m[5]).toBe(0.30000000000000004);
  });

  it('keeps any finite doubles in the ES mean (property)', () => {
    const base = states[1];
    fc.assert(
      fc.property(fc.array(fc.double({ noNaN: true, noDefaultInfinity: true }), { minLength: 1, maxLength: 40 }), (mean) => {
        const [p, ...rest] = base.pairs;
        const state: RunState = { ...base, pairs: [{ ...p, es: { ...p.es, mean } }, ...rest] };
        expectIdentical(roundTrip(state, 'prop'), state);
      }),
      { numRuns: 40, seed: 17 },
    );
  });
});

/** A copy of the run directory, checkpoints 0, 1 and 2 included, to damage. */
function copy(label: string): string {
  const dir = join(root, `bad-${label}`);
  cpSync(inputs.dir, dir, { recursive: true });
  expect(listCheckpoints(dir)).toEqual([2, 1, 0]);
  return dir;
}

const checksumIn = (path: string): string => (JSON.parse(readFileSync(path, 'utf8')) as { checksum: string }).checksum;

describe('loading the newest checkpoint', () => {
  it('loads the newest when all verify, skipping nothing', () => {
    const r = loadNewestCheckpoint(inputs.dir, inputs.recipeHash);
    expect(r.skipped).toEqual([]);
    expect(canonicalJson(r.state)).toBe(canonicalJson(states[2]));
  });

  it('falls back past a checkpoint with a flipped byte, reporting the expected and found checksums', () => {
    const dir = copy('flip');
    const newest = checkpointPath(dir, 2);
    const expected = sha256(canonicalJson(states[2]));
    expect(checksumIn(newest)).toBe(expected);
    flipDigitInState(newest);
    const found = sha256(canonicalJson((JSON.parse(readFileSync(newest, 'utf8')) as { state: unknown }).state));
    expect(found).not.toBe(expected);
    const r = loadNewestCheckpoint(dir, inputs.recipeHash);
    expect(r.skipped).toEqual([{ file: newest, reason: `checksum mismatch: expected ${expected}, found ${found}` }]);
    expect(canonicalJson(r.state)).toBe(canonicalJson(states[1]));
  });

  it('falls back past a truncated checkpoint, reporting it unreadable', () => {
    const dir = copy('trunc');
    const newest = checkpointPath(dir, 2);
    truncateSync(newest, Math.floor(readFileSync(newest).length / 2));
    const r = loadNewestCheckpoint(dir, inputs.recipeHash);
    expect(r.skipped).toHaveLength(1);
    expect(r.skipped[0].file).toBe(newest);
    expect(r.skipped[0].reason).toMatch(/^unreadable \(/);
    expect(canonicalJson(r.state)).toBe(canonicalJson(states[1]));
  });

  it('reports every damaged checkpoint it passes, newest first, and what else it cannot use', () => {
    const dir = copy('several');
    truncateSync(checkpointPath(dir, 2), 0);
    flipDigitInState(checkpointPath(dir, 1));
    const r = loadNewestCheckpoint(dir, inputs.recipeHash);
    expect(r.skipped.map((s) => [s.file, s.reason.split(':')[0].split(' (')[0]])).toEqual([
      [checkpointPath(dir, 2), 'unreadable'],
      [checkpointPath(dir, 1), 'checksum mismatch'],
    ]);
    expect(canonicalJson(r.state)).toBe(canonicalJson(states[0]));
  });

  it('skips a checkpoint written for another recipe, and one that is not a checkpoint at all', () => {
    const dir = copy('foreign');
    const other = readCheckpoint(checkpointPath(dir, 2), 'another-hash');
    expect(other).toEqual({ problem: `written for another recipe (hash ${inputs.recipeHash}, run's recipe is another-hash)` });
    writeFileSync(checkpointPath(dir, 2), '{"hello":1}\n');
    const r = loadNewestCheckpoint(dir, inputs.recipeHash);
    expect(r.skipped.map((s) => s.reason)).toEqual(['not a cairn checkpoint']);
    expect(r.state?.iteration).toBe(1);
  });

  it('skips a checkpoint whose file name names another iteration than the state inside it', () => {
    const dir = copy('renamed');
    // Checkpoint 1's bytes (checksum intact) under checkpoint 2's name, as a hand copy would leave them.
    cpSync(checkpointPath(dir, 1), checkpointPath(dir, 2));
    expect(readCheckpoint(checkpointPath(dir, 2), inputs.recipeHash)).toEqual({ problem: 'file name says iteration 2, but the checkpoint holds iteration 1' });
    const r = loadNewestCheckpoint(dir, inputs.recipeHash);
    expect(r.skipped).toEqual([{ file: checkpointPath(dir, 2), reason: 'file name says iteration 2, but the checkpoint holds iteration 1' }]);
    expect(canonicalJson(r.state)).toBe(canonicalJson(states[1]));
  });

  it('refuses to open a run whose every checkpoint is damaged, naming each', () => {
    const dir = copy('none');
    for (const it of [0, 1, 2]) truncateSync(checkpointPath(dir, it), 10);
    expect(loadNewestCheckpoint(dir, inputs.recipeHash).state).toBeNull();
    let err: unknown = null;
    try { openRun(dir); } catch (e) { err = e; }
    expect(err).toBeInstanceOf(UserError);
    expect((err as UserError).problems.map((p) => p.split(':')[0])).toEqual([2, 1, 0].map((it) => checkpointPath(dir, it)));
  });

  it('refuses a checkpoint of another format version with a UserError naming both versions', () => {
    const dir = copy('version');
    const path = checkpointPath(dir, 2);
    const text = readFileSync(path, 'utf8');
    expect(text).toContain(`"version":${CHECKPOINT_VERSION},`);
    writeFileSync(path, text.replace(`"version":${CHECKPOINT_VERSION},`, `"version":${CHECKPOINT_VERSION + 1},`));
    const load = (): unknown => loadNewestCheckpoint(dir, inputs.recipeHash);
    expect(load).toThrow(UserError);
    expect(load).toThrow(`format version ${CHECKPOINT_VERSION + 1}`);
    expect(load).toThrow(`reads version ${CHECKPOINT_VERSION} only`);
  });
});
