/**
 * How an export reaches the disk: built in a temporary sibling and renamed into place, so a
 * failed export leaves nothing behind and the previous export intact; a repeated export
 * replaces the old one completely; nothing that is not an earlier export is ever replaced.
 */
import { cpSync, existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeExport } from '../../src/export/index.js';
import { openRun } from '../../src/store/index.js';
import { Run } from '../../src/run/index.js';
import { cairn, cleanup, exportRun, readJson, smokeRun, tempDir } from './helpers.js';

/** Every file under `dir`, relative, sorted. */
function tree(dir: string): string[] {
  return readdirSync(dir, { recursive: true, encoding: 'utf8' }).sort();
}

describe('writing an export', () => {
  let run: string;
  let tmp: string;

  beforeAll(() => {
    run = smokeRun();
    tmp = tempDir('write');
  }, 600_000);
  afterAll(cleanup);

  it('refuses with exit 2 and one message when a parent of the target is a regular file, writing nothing', () => {
    const box = join(tmp, 'parent-is-file');
    mkdirSync(box);
    writeFileSync(join(box, 'plain'), 'not a directory\n');
    for (const out of [join(box, 'plain', 'exp'), join(box, 'plain', 'deeper', 'exp')]) {
      const r = cairn(['export', run, '--out', out]);
      expect(r.code).toBe(2);
      expect(r.stderr).toBe(`cairn: Export target ${out} cannot be created: ${join(box, 'plain')} is a file, not a directory; choose another --out\n`);
      expect(readdirSync(box)).toEqual(['plain']);
      expect(readFileSync(join(box, 'plain'), 'utf8')).toBe('not a directory\n');
    }
  });

  it('replaces an earlier export at the same --out completely, leaving no temporary directory', () => {
    const box = join(tmp, 'again');
    const out = join(box, 'exp');
    exportRun(run, out);
    const first = tree(out);
    expect(first).toEqual(expect.arrayContaining(['curriculum.json', 'curriculum.schema.json', 'summary.csv', 'body.json', 'family.json', 'walkers']));
    writeFileSync(join(out, 'walkers', 'stale.safetensors'), 'left from before');
    writeFileSync(join(out, 'summary.csv'), 'edited by hand');
    exportRun(run, out, '--order', 'difficulty');
    expect(tree(out)).toEqual(first);
    expect(readJson(join(out, 'curriculum.json')).order).toBe('difficulty');
    expect(readFileSync(join(out, 'summary.csv'), 'utf8')).toMatch(/^order,course_id,/);
    expect(readdirSync(box)).toEqual(['exp']);
  });

  it('keeps the previous export intact when the final rename fails', () => {
    // Fault injection through the temporary names writeExport uses beside the target
    // (.tmp-<name>-<pid>, and -old for the export it replaces): a non-empty directory in the
    // way of that second rename makes it fail after the new export has been fully written.
    const box = join(tmp, 'rename-fails');
    const out = join(box, 'exp');
    exportRun(run, out);
    const before = readFileSync(join(out, 'curriculum.json'), 'utf8');
    const blocker = join(box, `.tmp-${basename(out)}-${process.pid}-old`);
    mkdirSync(join(blocker, 'in-the-way'), { recursive: true });
    const { inputs, state } = openRun(run);
    expect(() => writeExport(Run.of(inputs).ctx, state, out, 'difficulty', 'all')).toThrow(/could not write/);
    expect(readFileSync(join(out, 'curriculum.json'), 'utf8')).toBe(before);
    rmSync(blocker, { recursive: true });
    expect(readdirSync(box)).toEqual(['exp']);
  });

  it('refuses to replace a directory that is not an export (such as a run directory) or a file, exit 2', () => {
    const copy = join(tmp, 'run-copy');
    cpSync(run, copy, { recursive: true });
    const before = tree(copy);
    const r = cairn(['export', run, '--out', copy]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/not an earlier export/);
    expect(tree(copy)).toEqual(before);
    const file = join(tmp, 'notes.txt');
    writeFileSync(file, 'mine\n');
    const f = cairn(['export', run, '--out', file]);
    expect(f.code).toBe(2);
    expect(readFileSync(file, 'utf8')).toBe('mine\n');
    expect(readdirSync(dirname(file)).filter((n) => n.startsWith('.tmp-'))).toEqual([]);
  });

  it('refuses a run directory without checkpoints: exit 2, one message, nothing written', () => {
    const empty = join(tmp, 'no-checkpoints');
    cpSync(run, empty, { recursive: true });
    rmSync(join(empty, 'checkpoints'), { recursive: true });
    mkdirSync(join(empty, 'checkpoints'));
    const before = tree(empty);
    const r = cairn(['export', empty]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/no readable checkpoint/);
    expect(r.stderr).toContain(empty);
    expect(r.stderr).not.toMatch(/\n\s+at /);
    expect(tree(empty)).toEqual(before);
  });
});
