/**
 * Failures that the real file system will not produce on demand for root (a full disk, an I/O
 * error at fsync, a rename refused while the old file is in place): node:fs is wrapped so one
 * chosen call fails once, and everything else goes to the real file system.
 */
import * as realFs from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest';
import { writeFileAtomic, WriteError } from '../../src/store/index.js';
import { tempDir } from './helpers.js';

const fault = vi.hoisted(() => ({ call: '', code: '' }));

vi.mock('node:fs', async (importOriginal) => {
  const fs = await importOriginal<typeof import('node:fs')>();
  const failing = <F extends (...args: never[]) => unknown>(name: string, f: F): F =>
    ((...args: Parameters<F>) => {
      if (fault.call === name) {
        fault.call = '';
        throw Object.assign(new Error(`${fault.code}: injected failure, ${name}`), { code: fault.code });
      }
      return f(...args);
    }) as F;
  const wrapped = {
    ...fs,
    writeSync: failing('writeSync', fs.writeSync),
    fsyncSync: failing('fsyncSync', fs.fsyncSync),
    renameSync: failing('renameSync', fs.renameSync),
  };
  return { ...wrapped, default: wrapped };
});

let dir = '';
beforeAll(() => { dir = tempDir('faults'); });
afterAll(() => realFs.rmSync(dir, { recursive: true, force: true }));
beforeEach(() => { fault.call = ''; });

const cases: [string, string][] = [
  ['writeSync', 'ENOSPC'],
  ['fsyncSync', 'EIO'],
  ['renameSync', 'EACCES'],
];

describe('writeFileAtomic when a step of the write fails', () => {
  it.each(cases)('keeps the old file and removes the temporary one when %s fails with %s', (call, code) => {
    const path = join(dir, `${call}.json`);
    writeFileAtomic(path, 'old contents\n');
    fault.call = call;
    fault.code = code;
    let err: unknown = null;
    try {
      writeFileAtomic(path, 'new contents that never land\n');
    } catch (e) {
      err = e;
    }
    expect(fault.call, 'the injected failure was never reached').toBe('');
    expect(err).toBeInstanceOf(WriteError);
    expect((err as WriteError).path).toBe(path);
    expect((err as WriteError).code).toBe(code);
    expect((err as WriteError).message).toContain(path);
    expect(realFs.readFileSync(path, 'utf8')).toBe('old contents\n');
    expect(realFs.readdirSync(dir).filter((n) => n.startsWith('.tmp-'))).toEqual([]);
  });
});
