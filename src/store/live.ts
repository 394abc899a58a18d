import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { writeFileAtomic } from './atomic.js';
import { lockOwner } from './lock.js';

export const LIVE = 'live.json';

/** What a running run says about itself every few seconds: wall-clock facts, never part of its state. */
export interface LiveRecord {
  readonly pid: number;
  /** ISO time of the last update. */
  readonly updated: string;
  /** Where rollouts run ("2 worker threads", "queue \"cairn\" at redis://host:6379/0"). */
  readonly backend: string;
  readonly workers?: number;
  readonly threads?: number;
  readonly rolloutsPerSecond?: number;
  readonly waiting?: string;
}

/** Writes the live record, stamped with the time now and this process's pid. */
export function writeLive(dir: string, r: Omit<LiveRecord, 'pid' | 'updated'>): void {
  const record: LiveRecord = { pid: process.pid, updated: new Date().toISOString(), ...r };
  writeFileAtomic(join(dir, LIVE), `${JSON.stringify(record)}\n`);
}

/** The live record of the process that holds the run's lock now, or null when no process runs it. */
export function readLive(dir: string): LiveRecord | null {
  const owner = lockOwner(dir);
  if (owner === null) return null;
  try {
    const r = JSON.parse(readFileSync(join(dir, LIVE), 'utf8')) as LiveRecord;
    return r.pid === owner ? r : null;
  } catch {
    return null;
  }
}

/** Removes the live record when its process stops running the run. */
export function clearLive(dir: string): void {
  rmSync(join(dir, LIVE), { force: true });
}
