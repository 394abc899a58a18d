/**
 * `cairn resume` on a run whose newest checkpoint is damaged: it says which file it skipped and
 * why on stderr, falls back to the previous checkpoint, and continues to the same run as before
 * the damage (same fingerprint, same logs). Checksums are SHA-256 (FIPS 180-4), 64 hex digits.
 */
import { cpSync, existsSync, readFileSync, rmSync, truncateSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CHECKPOINT_VERSION, checkpointPath, listCheckpoints } from '../../src/store/index.js';
import { cli, cliOk, ensureBuilt, flipDigitInState, outcome, status, tempDir, writeTinyRecipe, SLOW } from './helpers.js';

let root = '';
let original = '';
let before: Awaited<ReturnType<typeof outcome>>;

beforeAll(async () => {
  ensureBuilt();
  root = tempDir('corrupt');
  const recipe = writeTinyRecipe(root, { budget: { iterations: 4 } });
  original = join(root, 'original');
  await cliOk(['run', recipe, '--out', original, '--workers', '1', '--quiet']);
  before = await outcome(original);
}, SLOW);
afterAll(() => rmSync(root, { recursive: true, force: true }));

function damagedCopy(label: string, damage: (newest: string) => void): { dir: string; newest: string } {
  const dir = join(root, label);
  cpSync(original, dir, { recursive: true });
  expect(listCheckpoints(dir)).toEqual([4, 2, 0]);
  const newest = checkpointPath(dir, 4);
  damage(newest);
  return { dir, newest };
}

describe('cairn status and resume with a damaged newest checkpoint', () => {
  it('a flipped byte: status counts the skip, resume names the file with both checksums and redoes the lost iterations', async () => {
    const expected = (JSON.parse(readFileSync(checkpointPath(original, 4), 'utf8')) as { checksum: string }).checksum;
    const { dir, newest } = damagedCopy('flip', flipDigitInState);

    const s = await status(dir);
    expect(s.iteration).toBe(2);
    expect(s.skippedCheckpoints).toBe(1);
    const text = await cliOk(['status', dir]);
    expect(text.stdout).toContain(`note: skipped checkpoint ${newest}: checksum mismatch`);

    const r = await cli(['resume', dir, '--workers', '0']);
    expect(r.code, r.stderr).toBe(0);
    const note = new RegExp(`skipped checkpoint ${newest}: checksum mismatch: expected ${expected}, found ([0-9a-f]{64}); falling back`);
    expect(r.stderr).toMatch(note);
    expect(note.exec(r.stderr)![1]).not.toBe(expected);
    expect(r.stderr).toContain('at iteration 2');
    expect(await outcome(dir)).toEqual(before);
  }, SLOW);

  it('a checkpoint of another format version: resume refuses with exit 2 naming the version, and changes nothing', async () => {
    const { dir, newest } = damagedCopy('version', (p) => writeFileSync(p, readFileSync(p, 'utf8').replace(`"version":${CHECKPOINT_VERSION},`, '"version":99,')));
    const kept = ['metrics.jsonl', 'recipe.json'].map((f) => [f, readFileSync(join(dir, f), 'utf8')]);
    const r = await cli(['resume', dir, '--workers', '0', '--iterations', '9']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(`Checkpoint ${newest} has format version 99`);
    expect(r.stderr).not.toMatch(/^\s+at /m);
    expect(readFileSync(newest, 'utf8')).toContain('"version":99,');
    for (const [f, text] of kept) expect(readFileSync(join(dir, f), 'utf8'), f).toBe(text);
    expect(existsSync(join(dir, 'lock'))).toBe(false);
  }, SLOW);

  it('a truncated file: resume calls it unreadable and continues to the same run', async () => {
    const { dir, newest } = damagedCopy('trunc', (p) => truncateSync(p, 200));
    const r = await cli(['resume', dir, '--workers', '0']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain(`skipped checkpoint ${newest}: unreadable (`);
    expect(r.stderr).toContain('at iteration 2');
    expect(await outcome(dir)).toEqual(before);
  }, SLOW);
});
