/**
 * The run directory's lock: one process at a time. A lock held by a live process refuses a
 * second one before it touches anything; a lock left by a dead process is taken over, with a note.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/index.js';
import { takeLock } from '../../src/store/index.js';
import { cli, deadPid, ensureBuilt, makeRun, status, tempDir, SLOW } from './helpers.js';

let root = '';
let sleeper: ChildProcess;

beforeAll(() => {
  ensureBuilt();
  root = tempDir('lock');
  sleeper = spawn(process.execPath, ['-e', 'setTimeout(() => {}, 600000)'], { stdio: 'ignore' });
}, SLOW);
afterAll(() => {
  sleeper.kill('SIGKILL');
  rmSync(root, { recursive: true, force: true });
});

describe('takeLock', () => {
  it('writes its pid and removes the lock on release', () => {
    const { inputs } = makeRun(root, {}, 'unit');
    const lock = takeLock(inputs.dir);
    expect(lock.note).toBeNull();
    expect(readFileSync(join(inputs.dir, 'lock'), 'utf8').trim()).toBe(String(process.pid));
    lock.release();
    expect(existsSync(join(inputs.dir, 'lock'))).toBe(false);
  });

  it('refuses a lock held by a live process, naming its pid, and leaves the lock alone', () => {
    const { inputs } = makeRun(root, {}, 'live');
    writeFileSync(join(inputs.dir, 'lock'), `${sleeper.pid}\n`);
    expect(() => takeLock(inputs.dir)).toThrow(UserError);
    expect(() => takeLock(inputs.dir)).toThrow(`in use by process ${sleeper.pid}`);
    expect(readFileSync(join(inputs.dir, 'lock'), 'utf8')).toBe(`${sleeper.pid}\n`);
  });

  it('takes over a lock left by a dead process, or an unreadable one, saying so', () => {
    const { inputs } = makeRun(root, {}, 'dead');
    const pid = deadPid();
    for (const [content, who] of [[`${pid}\n`, String(pid)], ['garbage', '?']]) {
      writeFileSync(join(inputs.dir, 'lock'), content);
      const lock = takeLock(inputs.dir);
      expect(lock.note).toContain(`stale lock left by process ${who}`);
      expect(readFileSync(join(inputs.dir, 'lock'), 'utf8').trim()).toBe(String(process.pid));
      lock.release();
    }
  });
});

describe('cairn resume and the lock', () => {
  it('exits 2 naming the live owner, and changes nothing in the directory', async () => {
    const { inputs } = makeRun(root, {}, 'cli-live');
    const dir = inputs.dir;
    writeFileSync(join(dir, 'lock'), `${sleeper.pid}\n`);
    // What a live run might have in the directory: logs, and a checkpoint being written right now.
    writeFileSync(join(dir, 'metrics.jsonl'), '{"iteration":1}\n');
    writeFileSync(join(dir, 'checkpoints', '.tmp-ckpt-000000001.json-1234'), '{"half a check');
    const before = ['recipe.json', 'metrics.jsonl', 'lock', 'checkpoints/.tmp-ckpt-000000001.json-1234'].map((f) => [f, readFileSync(join(dir, f), 'utf8')]);

    const r = await cli(['resume', dir, '--iterations', '5', '--workers', '0']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(`in use by process ${sleeper.pid}`);
    expect(r.stderr).not.toMatch(/^\s+at /m); // no stack trace
    expect(r.stdout).toBe('');
    for (const [f, text] of before) expect(existsSync(join(dir, f)) && readFileSync(join(dir, f), 'utf8'), f).toBe(text);
  });

  it('takes over a lock left by a dead process with a note on stderr, and runs', async () => {
    const { inputs } = makeRun(root, {}, 'cli-dead');
    const pid = deadPid();
    writeFileSync(join(inputs.dir, 'lock'), `${pid}\n`);
    const r = await cli(['resume', inputs.dir, '--iterations', '1', '--workers', '0']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain(`took over a stale lock left by process ${pid}`);
    expect((await status(inputs.dir)).iteration).toBe(1);
    expect(existsSync(join(inputs.dir, 'lock'))).toBe(false);
  }, SLOW);
});
