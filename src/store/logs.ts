import { appendFileSync, existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { WriteError, writeFileAtomic } from './atomic.js';

export const METRICS = 'metrics.jsonl';
export const EVENTS = 'events.jsonl';
/** Wall-clock facts about the machinery (a lost job re-run), kept apart from the deterministic logs. */
export const FAULTS = 'faults.jsonl';

/** Wall-clock time of each invocation that ran the run (start, end, seconds, iterations from–to), kept apart from the deterministic logs. */
export const SESSIONS = 'sessions.jsonl';

/** Seconds of wall-clock time all invocations of a run spent, from sessions.jsonl (0 when none is recorded). */
export function wallSeconds(dir: string): number {
  return readLines<{ seconds?: number }>(join(dir, SESSIONS)).reduce((s, r) => s + (Number.isFinite(r.seconds) ? r.seconds! : 0), 0);
}

/** Appends one invocation's line to sessions.jsonl, ending now after `seconds`. */
export function logSession(dir: string, seconds: number, r: { from: number; to: number; backend: string }): void {
  const ended = Date.now();
  appendLines(join(dir, SESSIONS), [{ started: new Date(ended - seconds * 1000).toISOString(), ended: new Date(ended).toISOString(), seconds, ...r }]);
}

/** Appends one pool event to faults.jsonl with the time it happened. */
export function logPoolEvent(dir: string, e: object): void {
  appendLines(join(dir, FAULTS), [{ time: new Date().toISOString(), ...e }]);
}

/** Appends records as JSON lines in one write, so a crash leaves at most one partial last line. */
export function appendLines(path: string, records: readonly unknown[]): void {
  if (records.length === 0) return;
  try {
    appendFileSync(path, records.map((r) => `${JSON.stringify(r)}\n`).join(''));
  } catch (e) {
    throw new WriteError(path, e as Error);
  }
}

/** Parsed records of a JSON-lines file; a partial or unparsable line (from a crash) is skipped. */
export function readLines<T>(path: string): T[] {
  if (!existsSync(path)) return [];
  const out: T[] = [];
  for (const line of readFileSync(path, 'utf8').split('\n')) {
    if (line.trim() === '') continue;
    try {
      out.push(JSON.parse(line) as T);
    } catch {
      // A torn last line from an interrupted append: the checkpoint decides what counts.
    }
  }
  return out;
}

/**
 * Drops log lines past `iteration` (written after the checkpoint a run resumes from), and any
 * torn line, so the logs continue exactly as an uninterrupted run's would.
 */
export function truncateLogs(dir: string, iteration: number): void {
  for (const name of [METRICS, EVENTS]) {
    const path = join(dir, name);
    if (!existsSync(path)) continue;
    const kept = readLines<{ iteration: number }>(path).filter((r) => r.iteration <= iteration);
    writeFileAtomic(path, kept.map((r) => `${JSON.stringify(r)}\n`).join(''));
  }
}
