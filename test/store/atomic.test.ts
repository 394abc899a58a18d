/**
 * Atomic writes and checkpoint retention, on the real file system: failures are provoked by
 * paths that cannot be written (a missing folder, a target that is a folder), which fail the
 * same way for root as for anyone.
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkpointPath, listCheckpoints, removeStaleTemps, TEMP_PREFIX, writeCheckpoint, writeFileAtomic, WriteError } from '../../src/store/index.js';
import { makeRun, tempDir } from './helpers.js';
import type { RunState } from '../../src/coevo/index.js';

let root = '';
beforeAll(() => { root = tempDir('atomic'); });
afterAll(() => rmSync(root, { recursive: true, force: true }));

const temps = (dir: string): string[] => readdirSync(dir).filter((n) => n.startsWith(TEMP_PREFIX));

/** Calls `f`, which must throw, and returns what it threw. */
function thrown(f: () => void): unknown {
  try {
    f();
  } catch (e) {
    return e;
  }
  throw new Error('expected a throw');
}

describe('writeFileAtomic', () => {
  it('replaces the file with the new bytes and leaves no temporary file', () => {
    const dir = join(root, 'ok');
    mkdirSync(dir);
    const path = join(dir, 'a.json');
    writeFileAtomic(path, 'old\n');
    writeFileAtomic(path, Uint8Array.from([110, 101, 119])); // "new", as bytes
    expect(readFileSync(path, 'utf8')).toBe('new');
    expect(readdirSync(dir)).toEqual(['a.json']);
  });

  it('writes only the viewed part of a Uint8Array that is a window on a larger buffer', () => {
    const dir = join(root, 'view');
    mkdirSync(dir);
    const big = Buffer.from('xxABCDyy', 'utf8');
    writeFileAtomic(join(dir, 'v'), new Uint8Array(big.buffer, big.byteOffset + 2, 4));
    expect(readFileSync(join(dir, 'v'), 'utf8')).toBe('ABCD');
  });

  it('throws a WriteError naming the path when the folder does not exist, and creates nothing', () => {
    const path = join(root, 'missing', 'a.json');
    const e = thrown(() => writeFileAtomic(path, 'x'));
    expect(e).toBeInstanceOf(WriteError);
    expect((e as WriteError).path).toBe(path);
    expect((e as WriteError).message).toContain(path);
    expect((e as WriteError).code).toBe('ENOENT');
    expect(existsSync(join(root, 'missing'))).toBe(false);
  });

  it('throws a WriteError naming the path when the target is a folder, which keeps its contents, and removes its temporary file', () => {
    const dir = join(root, 'isdir');
    const target = join(dir, 'a.json');
    mkdirSync(target, { recursive: true });
    writeFileSync(join(target, 'inside'), 'kept');
    const e = thrown(() => writeFileAtomic(target, 'new'));
    expect(e).toBeInstanceOf(WriteError);
    expect((e as WriteError).path).toBe(target);
    expect((e as WriteError).message).toMatch(/^could not write .*a\.json: /);
    expect(readFileSync(join(target, 'inside'), 'utf8')).toBe('kept');
    expect(temps(dir)).toEqual([]);
  });
});

describe('checkpoint retention', () => {
  let dir = '';
  let state: RunState;
  beforeAll(() => {
    const run = makeRun(root, {}, 'keep');
    dir = run.inputs.dir;
    state = run.state;
  });
  const at = (iteration: number): RunState => ({ ...state, iteration });

  it('lists checkpoints newest first by iteration number and ignores other files', () => {
    rmSync(join(dir, 'checkpoints'), { recursive: true });
    mkdirSync(join(dir, 'checkpoints'));
    for (const it of [9, 100, 10]) writeCheckpoint(dir, at(it), 'h', 10);
    // Names that look alike but are not checkpoints: unpadded, a temp file, something else.
    for (const n of ['ckpt-11.json', `${TEMP_PREFIX}ckpt-000000200.json-1`, 'ckpt-000000300.json.bak', 'notes.txt']) {
      writeFileSync(join(dir, 'checkpoints', n), '{}');
    }
    expect(listCheckpoints(dir)).toEqual([100, 10, 9]);
  });

  it('keeps the newest `keep` by iteration number, whatever the order they were written in', () => {
    rmSync(join(dir, 'checkpoints'), { recursive: true });
    mkdirSync(join(dir, 'checkpoints'));
    writeCheckpoint(dir, at(100), 'h', 2);
    writeCheckpoint(dir, at(9), 'h', 2);
    expect(listCheckpoints(dir)).toEqual([100, 9]);
    writeCheckpoint(dir, at(10), 'h', 2); // 9 is now the oldest by number and goes
    expect(listCheckpoints(dir)).toEqual([100, 10]);
    expect(existsSync(checkpointPath(dir, 9))).toBe(false);
    expect(temps(join(dir, 'checkpoints'))).toEqual([]);
  });

  it('keeps at least the checkpoint just written when keep is below 1', () => {
    rmSync(join(dir, 'checkpoints'), { recursive: true });
    mkdirSync(join(dir, 'checkpoints'));
    writeCheckpoint(dir, at(3), 'h', 0);
    writeCheckpoint(dir, at(4), 'h', 0);
    expect(listCheckpoints(dir)).toEqual([4]);
  });

  it('lists nothing for a run directory without a checkpoints folder', () => {
    expect(listCheckpoints(join(root, 'nowhere'))).toEqual([]);
  });
});

describe('removeStaleTemps', () => {
  it('removes temp files from the run directory and its checkpoints, and nothing else', () => {
    const dir = join(root, 'stale');
    mkdirSync(join(dir, 'checkpoints'), { recursive: true });
    const keep = ['recipe.json', 'metrics.jsonl', 'tmp-not-a-temp', join('checkpoints', 'ckpt-000000001.json')];
    const stale = [`${TEMP_PREFIX}metrics.jsonl-123`, join('checkpoints', `${TEMP_PREFIX}ckpt-000000002.json-456`)];
    for (const n of [...keep, ...stale]) writeFileSync(join(dir, n), 'x');
    removeStaleTemps(dir);
    for (const n of keep) expect(existsSync(join(dir, n)), n).toBe(true);
    for (const n of stale) expect(existsSync(join(dir, n)), n).toBe(false);
  });

  it('does nothing for a folder that does not exist', () => {
    expect(() => removeStaleTemps(join(root, 'absent'))).not.toThrow();
  });
});
