import { readdirSync, readFileSync, rmSync } from 'node:fs';
import { basename, join } from 'node:path';
import { canonicalJson, sha256, UserError, writerVersions } from '../core/index.js';
import type { RunState } from '../coevo/index.js';
import { TEMP_PREFIX, writeFileAtomic } from './atomic.js';

/** Checkpoint format version; a run written with another version is refused. */
export const CHECKPOINT_VERSION = 2;
const NAME = /^ckpt-(\d{9})\.json$/;

interface CheckpointFile {
  readonly format: 'cairn-checkpoint';
  readonly version: number;
  readonly iteration: number;
  readonly recipeHash: string;
  readonly writtenBy: { node: string; planck: string; cairn: string };
  /** SHA-256 of the canonical JSON of `state`. */
  readonly checksum: string;
  readonly state: RunState;
}

export function checkpointPath(dir: string, iteration: number): string {
  return join(dir, 'checkpoints', `ckpt-${String(iteration).padStart(9, '0')}.json`);
}

/** Writes the state's checkpoint atomically, then removes all but the newest `keep`. */
export function writeCheckpoint(dir: string, state: RunState, recipeHash: string, keep: number): void {
  const body = canonicalJson(state);
  const file: Omit<CheckpointFile, 'state'> = {
    format: 'cairn-checkpoint', version: CHECKPOINT_VERSION, iteration: state.iteration, recipeHash, writtenBy: writerVersions(), checksum: sha256(body),
  };
  // The state is spliced in as its canonical text, so the checksum covers exactly the bytes on disk.
  const head = canonicalJson(file);
  writeFileAtomic(checkpointPath(dir, state.iteration), `${head.slice(0, -1)},"state":${body}}\n`);
  prune(dir, keep);
}

/** Checkpoint iterations present, newest first (by iteration number, not name or time). */
export function listCheckpoints(dir: string): number[] {
  let names: string[];
  try {
    names = readdirSync(join(dir, 'checkpoints'));
  } catch {
    return [];
  }
  return names.flatMap((n) => (NAME.exec(n) ? [Number(NAME.exec(n)![1])] : [])).sort((a, b) => b - a);
}

function prune(dir: string, keep: number): void {
  for (const it of listCheckpoints(dir).slice(Math.max(1, keep))) rmSync(checkpointPath(dir, it), { force: true });
}

/** Removes temporary files left by interrupted writes. */
export function removeStaleTemps(dir: string): void {
  for (const sub of [dir, join(dir, 'checkpoints')]) {
    let names: string[] = [];
    try {
      names = readdirSync(sub);
    } catch {
      continue;
    }
    for (const n of names) if (n.startsWith(TEMP_PREFIX)) rmSync(join(sub, n), { force: true });
  }
}

/** Why a checkpoint was passed over. */
export interface SkippedCheckpoint {
  readonly file: string;
  readonly reason: string;
}

/** The iteration a checkpoint's file name promises (ckpt-<iteration>.json), or undefined for another name. */
function iterationInName(path: string): number | undefined {
  const m = NAME.exec(basename(path));
  return m ? Number(m[1]) : undefined;
}

/**
 * Reads and verifies one checkpoint; returns the problem instead of throwing. A file whose
 * name says one iteration and whose state holds another (copied or renamed by hand) is a
 * problem too: resume picks the newest by name, and would otherwise load the wrong state.
 */
export function readCheckpoint(path: string, recipeHash: string): { state: RunState } | { problem: string } {
  let parsed: CheckpointFile;
  try {
    parsed = JSON.parse(readFileSync(path, 'utf8')) as CheckpointFile;
  } catch (e) {
    return { problem: `unreadable (${(e as Error).message})` };
  }
  if (parsed?.format !== 'cairn-checkpoint') return { problem: 'not a cairn checkpoint' };
  if (parsed.version !== CHECKPOINT_VERSION) {
    throw new UserError(`Checkpoint ${path} has format version ${parsed.version}; this cairn reads version ${CHECKPOINT_VERSION} only`);
  }
  const found = sha256(canonicalJson(parsed.state ?? null));
  if (found !== parsed.checksum) return { problem: `checksum mismatch: expected ${parsed.checksum}, found ${found}` };
  if (parsed.recipeHash !== recipeHash) return { problem: `written for another recipe (hash ${parsed.recipeHash}, run's recipe is ${recipeHash})` };
  const named = iterationInName(path);
  if (named !== undefined && parsed.state.iteration !== named) {
    return { problem: `file name says iteration ${named}, but the checkpoint holds iteration ${parsed.state.iteration}` };
  }
  return { state: parsed.state };
}

/** The newest checkpoint that verifies, with the ones skipped on the way (newest first). */
export function loadNewestCheckpoint(dir: string, recipeHash: string): { state: RunState | null; skipped: SkippedCheckpoint[] } {
  const skipped: SkippedCheckpoint[] = [];
  for (const it of listCheckpoints(dir)) {
    const file = checkpointPath(dir, it);
    const r = readCheckpoint(file, recipeHash);
    if ('state' in r) return { state: r.state, skipped };
    skipped.push({ file, reason: r.problem });
  }
  return { state: null, skipped };
}
