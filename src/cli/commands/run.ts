import type { Command } from 'commander';
import { fingerprint, initialState, makeContext, type RunState, type StepOutcome } from '../../coevo/index.js';
import { defaultWorkerCount, makeEvaluator } from '../../pool/index.js';
import {
  createRunDir, drive, logPoolEvent, openRun, openRunDir, removeStaleTemps, takeLock, truncateLogs, updateBudget, writeCheckpoint, type RunInputs,
} from '../../store/index.js';
import { EXIT } from '../fail.js';
import { intIn, numberIn } from '../options.js';
import { formatDuration, Progress } from '../progress.js';
import { installStopHandlers } from '../signals.js';

interface LoopOptions { workers: number; quiet?: boolean }

function progressLine(o: StepOutcome, target: number, t0: number, startIt: number): string {
  const m = o.metrics;
  const minutes = (performance.now() - t0) / 60_000;
  const rate = (m.iteration - startIt) / Math.max(minutes, 1e-9);
  const eta = (target - m.iteration) / rate;
  return `iteration ${m.iteration}/${target}  pairs ${m.activePairs}  admitted ${m.admitted}  solved ${m.solved}  ` +
    `best ${m.bestProgress.toFixed(2)}  ${rate.toFixed(1)} it/min  ETA ${formatDuration(eta * 60)}`;
}

/** Shared by run and resume: drive, report, exit code. The caller holds the lock. */
async function loop(inputs: RunInputs, start: RunState, o: LoopOptions, lockNote: string | null): Promise<void> {
  const progress = new Progress(o.quiet === true);
  if (lockNote) progress.note(lockNote);
  const stops = installStopHandlers((s) => progress.note(s));
  const evaluator = makeEvaluator(o.workers, { onEvent: (e) => { logPoolEvent(inputs.dir, e); progress.note(`worker replaced (${e.reason}); tasks ${e.tasks.join(', ')} re-run`); } });
  const t0 = performance.now();
  const target = inputs.recipe.budget.iterations;
  try {
    const { state, reason } = await drive(inputs, start, {
      evaluator, targetIterations: target, minutes: inputs.recipe.budget.minutes, stopRequested: stops.requested,
      onIteration: (out) => progress.update(progressLine(out, target, t0, start.iteration)),
    });
    progress.done();
    const fp = fingerprint(state, inputs.recipeHash);
    const solved = state.courses.filter((c) => c.solvedAt !== null).length;
    process.stdout.write(
      `${inputs.dir}: iteration ${state.iteration}, ${state.courses.length - 1} courses admitted, ${solved} solved, ` +
        `${state.counters.takeovers} takeovers (${reason === 'done' ? 'target reached' : `stopped: ${reason}`}, ${formatDuration((performance.now() - t0) / 1000)})\n` +
        `fingerprint ${fp}\n`,
    );
    process.exitCode = reason === 'sigint' ? EXIT.sigint : reason === 'sigterm' ? EXIT.sigterm : EXIT.ok;
  } finally {
    stops.remove();
    await evaluator.close();
  }
}

/** Runs `body` holding the run directory's lock, released however it ends. */
async function withLock(dir: string, body: (note: string | null) => Promise<void>): Promise<void> {
  const lock = takeLock(dir);
  try {
    await body(lock.note);
  } finally {
    lock.release();
  }
}

interface RunOptions extends LoopOptions { out?: string; seed?: number; iterations?: number; minutes?: number }

async function runAction(recipePath: string, o: RunOptions): Promise<void> {
  const inputs = createRunDir(recipePath, o.out, { seed: o.seed, iterations: o.iterations, minutes: o.minutes });
  await withLock(inputs.dir, async (note) => {
    const state = initialState(makeContext(inputs.recipe, inputs.family, inputs.plan));
    writeCheckpoint(inputs.dir, state, inputs.recipeHash, inputs.recipe.checkpoint.keep);
    if (!o.quiet) process.stderr.write(`run directory ${inputs.dir}\n`);
    await loop(inputs, state, o, note);
  });
}

interface ResumeOptions extends LoopOptions { iterations?: number; minutes?: number }

async function resumeAction(dir: string, o: ResumeOptions): Promise<void> {
  // The lock comes before any write: temp files, logs and budget of a live run are its own.
  await withLock(openRunDir(dir).dir, async (note) => {
    removeStaleTemps(dir);
    const opened = openRun(dir);
    for (const s of opened.skipped) process.stderr.write(`cairn: skipped checkpoint ${s.file}: ${s.reason}; falling back to an older one\n`);
    const b = opened.inputs.recipe.budget;
    const inputs = updateBudget(opened.inputs, o.iterations ?? b.iterations, o.minutes ?? 0);
    truncateLogs(inputs.dir, opened.state.iteration);
    if (!o.quiet) process.stderr.write(`resuming ${inputs.dir} at iteration ${opened.state.iteration}\n`);
    await loop(inputs, opened.state, o, note);
  });
}

export function registerRun(program: Command): void {
  program
    .command('run')
    .description('start a co-evolution run from a recipe')
    .argument('<recipe>', 'recipe file (JSON)')
    .option('--out <dir>', 'run directory (default runs/<recipe name>)')
    .option('--workers <n>', 'worker threads (0 = this thread)', intIn(0, 1024), defaultWorkerCount())
    .option('--seed <n>', 'override the recipe seed', intIn(0, 2 ** 31 - 1))
    .option('--iterations <n>', 'total iterations to reach', intIn(1, 100_000_000))
    .option('--minutes <m>', 'stop cleanly after this many minutes', numberIn(0, 1e7))
    .option('--quiet', 'no progress on stderr')
    .action(runAction);
  program
    .command('resume')
    .description('continue a run from its newest valid checkpoint')
    .argument('<run-dir>', 'run directory')
    .option('--workers <n>', 'worker threads (0 = this thread); results do not depend on it', intIn(0, 1024), defaultWorkerCount())
    .option('--iterations <n>', 'total iterations to reach (not a count of more)', intIn(1, 100_000_000))
    .option('--minutes <m>', 'stop cleanly after this many minutes', numberIn(0, 1e7))
    .option('--quiet', 'no progress on stderr')
    .action(resumeAction);
}
