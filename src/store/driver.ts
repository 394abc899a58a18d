import { appendFileSync } from 'node:fs';
import { join } from 'node:path';
import { makeContext, step, type RunState, type StepOutcome } from '../coevo/index.js';
import type { Evaluator, PoolEvent } from '../pool/index.js';
import { writeCheckpoint } from './checkpoint.js';
import { appendLines, EVENTS, METRICS } from './logs.js';
import type { RunInputs } from './run-dir.js';

/** Why a drive ended. */
export type StopReason = 'done' | 'minutes' | 'sigint' | 'sigterm';

export interface DriveOptions {
  readonly evaluator: Evaluator;
  /** Total iterations to reach (the run's target, not a count of more). */
  readonly targetIterations: number;
  /** Wall-clock budget of this invocation, minutes (0 = none). */
  readonly minutes: number;
  /** Polled between iterations: a signal asks the loop to stop. */
  readonly stopRequested: () => 'sigint' | 'sigterm' | null;
  readonly onIteration?: (o: StepOutcome) => void;
}

/** Appends a pool fault (a replaced worker) to faults.jsonl: wall-clock facts, kept apart from the deterministic logs. */
export function logPoolEvent(dir: string, e: PoolEvent): void {
  appendFileSync(join(dir, 'faults.jsonl'), `${JSON.stringify({ time: new Date().toISOString(), ...e })}\n`);
}

/**
 * Runs iterations until the target, the time budget or a stop request; appends each
 * iteration's events and metrics, checkpoints every interval and once more at any stop.
 */
export async function drive(inputs: RunInputs, start: RunState, o: DriveOptions): Promise<{ state: RunState; reason: StopReason }> {
  const ctx = makeContext(inputs.recipe, inputs.family, inputs.plan);
  const { interval, keep } = inputs.recipe.checkpoint;
  const deadline = o.minutes > 0 ? performance.now() + o.minutes * 60_000 : Infinity;
  let state = start;
  let saved = start.iteration;
  let reason: StopReason = 'done';
  try {
    while (state.iteration < o.targetIterations) {
      const signal = o.stopRequested();
      if (signal) { reason = signal; break; }
      if (performance.now() >= deadline) { reason = 'minutes'; break; }
      const out = await step(state, ctx, o.evaluator);
      appendLines(join(inputs.dir, EVENTS), out.events);
      appendLines(join(inputs.dir, METRICS), [out.metrics]);
      state = out.state;
      o.onIteration?.(out);
      if (state.iteration % interval === 0) {
        writeCheckpoint(inputs.dir, state, inputs.recipeHash, keep);
        saved = state.iteration;
      }
    }
    if (reason === 'done' && o.stopRequested()) reason = o.stopRequested()!;
  } catch (e) {
    // Save the last finished iteration if the disk allows; the original error is what matters.
    try {
      if (state.iteration > saved) writeCheckpoint(inputs.dir, state, inputs.recipeHash, keep);
    } catch {
      // The previous checkpoint is intact (atomic writes); nothing more to do.
    }
    throw e;
  }
  if (state.iteration > saved) writeCheckpoint(inputs.dir, state, inputs.recipeHash, keep);
  return { state, reason };
}
