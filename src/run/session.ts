import type { RunState, StepOutcome } from '../coevo/index.js';
import { UserError } from '../core/index.js';
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { loadRecipe } from '../coevo/index.js';
import { describeBackend, makeEvaluator, type Backend, type BackendStatus, type PoolEvent } from '../pool/index.js';
import { clearLive, logPoolEvent, logSession, openRunDir, removeStaleTemps, takeLock, truncateLogs, writeLive, RECIPE, type RunOverrides } from '../store/index.js';
import { loop, type StopReason } from './loop.js';
import { Run } from './run.js';

/** What a command wants to hear while a run goes on. */
export interface SessionHooks {
  /** A line worth telling the user (run directory, resume point, a lost job re-run); hidden by --quiet. */
  readonly note?: (text: string) => void;
  /** A line the user must see even when quiet (a stale lock taken over, a checkpoint skipped). */
  readonly warn?: (text: string) => void;
  readonly onIteration?: (o: StepOutcome, run: Run, startIteration: number) => void;
  /** Polled between iterations. */
  readonly stopRequested: () => 'sigint' | 'sigterm' | null;
  /** Every second while the run goes on: who runs rollouts, how fast, and what it waits for. */
  readonly onStatus?: (s: BackendStatus) => void;
}

export interface SessionResult {
  readonly run: Run;
  readonly state: RunState;
  readonly reason: StopReason;
  readonly startIteration: number;
}

/** Runs `body` holding the run directory's lock, released however it ends. */
async function withLock<T>(dir: string, hooks: SessionHooks, body: () => Promise<T>): Promise<T> {
  const lock = takeLock(dir);
  if (lock.note) hooks.warn?.(lock.note);
  try {
    return await body();
  } finally {
    lock.release();
  }
}

/** Drives `run` from `start` to its budget on the backend's evaluator, then closes the evaluator. */
async function drive(run: Run, start: RunState, backend: Backend, hooks: SessionHooks): Promise<SessionResult> {
  const onEvent = (e: PoolEvent): void => {
    logPoolEvent(run.dir, e);
    hooks.note?.(`job lost (${e.reason}); tasks ${e.tasks.join(', ')} re-run`);
  };
  const evaluator = makeEvaluator(backend, { onEvent });
  const where = describeBackend(backend);
  let ticks = 0;
  let lastWaiting: string | undefined;
  const tick = (): void => {
    const s = evaluator.status?.() ?? {};
    hooks.onStatus?.(s);
    // live.json for `cairn status`: every 5 s, and at once when what the run waits for changes.
    const waiting = s.waiting?.replace(/\d+/g, '#');
    const changed = waiting !== lastWaiting;
    lastWaiting = waiting;
    if (ticks++ % 5 === 0 || changed) {
      try {
        writeLive(run.dir, { backend: where, ...s });
      } catch {
        // A failed write must not stop the run; the next tick tries again.
      }
    }
  };
  const t0 = performance.now();
  let reached = start.iteration;
  tick();
  const ticker = setInterval(tick, 1000);
  ticker.unref();
  try {
    const { budget } = run.inputs.recipe;
    const { state, reason } = await loop(run, start, {
      evaluator, targetIterations: budget.iterations, minutes: budget.minutes, stopRequested: hooks.stopRequested,
      onIteration: (o) => { reached = o.state.iteration; hooks.onIteration?.(o, run, start.iteration); },
    });
    return { run, state, reason, startIteration: start.iteration };
  } finally {
    clearInterval(ticker);
    clearLive(run.dir);
    try {
      logSession(run.dir, (performance.now() - t0) / 1000, { from: start.iteration, to: reached, backend: where });
    } catch {
      // Wall-clock bookkeeping only: never worth failing a run over.
    }
    await evaluator.close();
  }
}

/** `cairn run`: a new run directory, its checkpoint 0, then the loop. */
export async function startRun(recipePath: string, out: string | undefined, overrides: RunOverrides, backend: Backend, hooks: SessionHooks): Promise<SessionResult> {
  const run = Run.create(recipePath, out, overrides);
  return withLock(run.dir, hooks, async () => {
    const state = run.initialState();
    run.checkpoint(state);
    hooks.note?.(`run directory ${run.dir}`);
    return drive(run, state, backend, hooks);
  });
}

export interface ResumeOptions {
  /** New total target (default: the frozen recipe's). */
  readonly iterations?: number;
  /** Wall-clock budget of this invocation, minutes (default none). */
  readonly minutes?: number;
}

/**
 * `cairn resume`: under the lock, removes temporary files of interrupted writes, loads the
 * newest verified checkpoint (a run stopped before its first one starts from iteration 0),
 * drops log lines written after it, and continues the loop to the new target.
 */
export async function resumeRun(dir: string, o: ResumeOptions, backend: Backend, hooks: SessionHooks): Promise<SessionResult> {
  // The lock comes before any write: temp files, logs and budget of a live run are its own.
  return withLock(openRunDir(dir).dir, hooks, async () => {
    removeStaleTemps(dir);
    const opened = Run.open(dir);
    const found = opened.newest();
    for (const s of found.skipped) hooks.warn?.(`skipped checkpoint ${s.file}: ${s.reason}; falling back to an older one`);
    let state = found.state;
    if (!state) {
      if (found.skipped.length > 0) opened.latest(); // throws, listing why each checkpoint was refused
      state = opened.initialState();
      opened.checkpoint(state);
      hooks.note?.('no checkpoint yet (stopped before its first one): starting from iteration 0');
    }
    const target = o.iterations ?? opened.inputs.recipe.budget.iterations;
    if (target < state.iteration) {
      throw new UserError(`--iterations ${target} is below the run's current iteration ${state.iteration}; it counts the total, so give at least ${state.iteration}`);
    }
    const run = opened.withBudget(target, o.minutes ?? 0);
    truncateLogs(run.dir, state.iteration);
    hooks.note?.(`resuming ${run.dir} at iteration ${state.iteration}`);
    return drive(run, state, backend, hooks);
  });
}

/** The sibling run directories of a seed sweep: `<out or runs/<name>>-s<seed>`. */
export function sweepDirs(recipePath: string, out: string | undefined, overrides: RunOverrides, seeds: readonly number[]): string[] {
  const base = resolve(out ?? join('runs', loadRecipe(recipePath, overrides.sets).name));
  return seeds.map((seed) => `${base}-s${seed}`);
}

/**
 * One member of a seed sweep: a new run of `recipePath` with `seed` in `dir`, or, when `dir`
 * already holds a run (the sweep was stopped and is given again), that run resumed to the
 * target. Each member is an ordinary run directory, resumable on its own.
 */
export async function sweepMember(recipePath: string, dir: string, seed: number, overrides: RunOverrides, backend: Backend, hooks: SessionHooks): Promise<SessionResult> {
  if (existsSync(join(dir, RECIPE))) {
    const frozen = Run.open(dir).inputs.recipe.seed;
    if (frozen !== seed) throw new UserError(`${dir} holds a run with seed ${frozen}, not ${seed}; choose another --out`);
    hooks.note?.(`seed ${seed}: ${dir} exists, resuming it`);
    return resumeRun(dir, { iterations: overrides.iterations, minutes: overrides.minutes }, backend, hooks);
  }
  hooks.note?.(`seed ${seed}: starting ${dir}`);
  return startRun(recipePath, dir, { ...overrides, seed }, backend, hooks);
}
