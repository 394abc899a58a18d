import { UserError } from '../core/index.js';
import type { RunState } from '../coevo/index.js';
import { loadNewestCheckpoint, type SkippedCheckpoint } from './checkpoint.js';
import { openRunDir, type RunInputs } from './run-dir.js';

export interface OpenedRun {
  readonly inputs: RunInputs;
  readonly state: RunState;
  /** Newer checkpoints that failed verification (each with its reason). */
  readonly skipped: readonly SkippedCheckpoint[];
}

/** A run directory's inputs and its newest verified state (read-only: no lock taken). */
export function openRun(dir: string): OpenedRun {
  const inputs = openRunDir(dir);
  const { state, skipped } = loadNewestCheckpoint(inputs.dir, inputs.recipeHash);
  if (!state) {
    const why = skipped.map((s) => `${s.file}: ${s.reason}`);
    throw new UserError(`Run directory ${dir} has no readable checkpoint${why.length ? ':' : ''}`, why);
  }
  return { inputs, state, skipped };
}
