import { join } from 'node:path';
import { step, type RunState, type StepOutcome } from '../coevo/index.js';
import type { Evaluator } from '../pool/index.js';
import { appendLines, EVENTS, METRICS } from '../store/index.js';
import type { Run } from './run.js';

/** Why a loop ended. */
export type StopReason = 'done' | 'minutes' | 'sigint' | 'sigterm';

export interface LoopOptions {
  readonly evaluator: Evaluator;
  /** Total iterations to reach (the run's target, not a count of more). */
  readonly targetIterations: number;
  /** Wall-clock budget of this invocation, minutes (0 = none). */
  readonly minutes: number;
  /** Polled between iterations: a signal asks the loop to stop. */
  readonly stopRequested: () => 'sigint' | 'sigterm' | null;
  readonly onIteration?: (o: StepOutcome) => void;
}

/**
 * Runs iterations until the target, the time budget or a stop request; appends each
 * iteration's events and metrics, checkpoints every interval and once more at any stop (and,
 * as far as the disk allows, when an iteration fails).
 */
export async function loop(run: Run, start: RunState, o: LoopOptions): Promise<{ state: RunState; reason: StopReason }> {
  const interval = run.inputs.recipe.checkpoint.interval;
  const deadline = o.minutes > 0 ? performance.now() + o.minutes * 60_000 : Infinity;
  let state = start;
  let saved = start.iteration;
  let reason: StopReason = 'done';
  try {
    while (state.iteration < o.targetIterations) {
      const signal = o.stopRequested();
      if (signal) { reason = signal; break; }
      if (performance.now() >= deadline) { reason = 'minutes'; break; }
      const out = await step(state, run.ctx, o.evaluator);
      appendLines(join(run.dir, EVENTS), out.events);
      appendLines(join(run.dir, METRICS), [out.metrics]);
      state = out.state;
      o.onIteration?.(out);
      if (state.iteration % interval === 0) {
        run.checkpoint(state);
        saved = state.iteration;
      }
    }
    if (reason === 'done' && o.stopRequested()) reason = o.stopRequested()!;
  } catch (e) {
    // Save the last finished iteration if the disk allows; the original error is what matters.
    try {
      if (state.iteration > saved) run.checkpoint(state);
    } catch {
      // The previous checkpoint is intact (atomic writes); nothing more to do.
    }
    throw e;
  }
  if (state.iteration > saved) run.checkpoint(state);
  return { state, reason };
}
