import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { UserError } from '../core/index.js';

const LOCK = 'lock';

/** Whether a process with this pid is running (EPERM: it exists but belongs to someone else). */
export function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Takes the run directory's lock (a file holding the owner's pid). A live owner means another
 * process runs this directory: refused. A lock left by a dead process is taken over; the
 * returned note says so. Returns a release function.
 */
export function takeLock(dir: string): { release: () => void; note: string | null } {
  const path = join(dir, LOCK);
  let note: string | null = null;
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      writeFileSync(path, `${process.pid}\n`, { flag: 'wx' });
      return { release: () => rmSync(path, { force: true }), note };
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
    }
    const pid = Number.parseInt(readFileSync(path, 'utf8'), 10);
    if (Number.isInteger(pid) && pid !== process.pid && processAlive(pid)) {
      throw new UserError(`Run directory ${dir} is in use by process ${pid} (lock file ${path}); wait for it to finish or stop it first`);
    }
    note = `took over a stale lock left by process ${Number.isInteger(pid) ? pid : '?'}, which is no longer running`;
    rmSync(path, { force: true });
  }
  throw new UserError(`Could not take the lock ${path}`);
}

/** The pid of the live process holding the run directory's lock, or null when none does. */
export function lockOwner(dir: string): number | null {
  let pid: number;
  try {
    pid = Number.parseInt(readFileSync(join(dir, LOCK), 'utf8'), 10);
  } catch {
    return null;
  }
  return Number.isInteger(pid) && processAlive(pid) ? pid : null;
}
