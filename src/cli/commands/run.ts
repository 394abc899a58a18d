import type { Command } from 'commander';
import type { StepOutcome } from '../../coevo/index.js';
import { resumeRun, startRun, sweepDirs, sweepMember, type Run, type SessionHooks, type SessionResult } from '../../run/index.js';
import type { BackendStatus } from '../../pool/index.js';
import { backendOf, backendOptions, type BackendFlags } from '../backend.js';
import { EXIT } from '../fail.js';
import { intIn, numberIn, seedList } from '../options.js';
import { plural, UserError } from '../../core/index.js';
import { formatDuration, Progress } from '../progress.js';
import { installStopHandlers } from '../signals.js';

interface LoopOptions extends BackendFlags { quiet?: boolean }

function progressLine(o: StepOutcome, target: number, t0: number, startIt: number): string {
  const m = o.metrics;
  const minutes = (performance.now() - t0) / 60_000;
  const rate = (m.iteration - startIt) / Math.max(minutes, 1e-9);
  const eta = (target - m.iteration) / rate;
  return `iteration ${m.iteration}/${target}  pairs ${m.activePairs}  admitted ${m.admitted}  solved ${m.solved}  ` +
    `best ${m.bestProgress.toFixed(2)}  ${rate.toFixed(1)} it/min  ETA ${formatDuration(eta * 60)}`;
}

/** "workers 3 (6 threads)  412 rollouts/s", or what the backend waits for. */
function statusText(s: BackendStatus): string {
  if (s.waiting) return s.waiting;
  const who = s.workers !== undefined ? `workers ${s.workers} (${s.threads ?? 0} threads)  ` : '';
  return `${who}${Math.round(s.rolloutsPerSecond ?? 0)} rollouts/s`;
}

/** Progress, signals and the closing lines shared by run and resume. */
async function session(o: LoopOptions, go: (hooks: SessionHooks) => Promise<SessionResult>): Promise<void> {
  const progress = new Progress(o.quiet === true);
  const stops = installStopHandlers((s) => progress.note(s));
  const t0 = performance.now();
  let line = 'starting';
  let live = '';
  const draw = (): void => progress.update(live ? `${line}  |  ${live}` : line);
  try {
    const { run, state, reason } = await go({
      note: (s) => progress.note(s),
      warn: (s) => { progress.done(); process.stderr.write(`cairn: ${s}\n`); },
      stopRequested: stops.requested,
      onIteration: (out: StepOutcome, r: Run, startIt: number) => { line = progressLine(out, r.inputs.recipe.budget.iterations, t0, startIt); draw(); },
      onStatus: (s) => {
        const next = statusText(s);
        // A note when the backend starts waiting for something else, not each second it waits.
        const changed = next.replace(/\d+/g, '#') !== live.replace(/\d+/g, '#');
        live = next;
        if (s.waiting && changed) progress.note(s.waiting);
        draw();
      },
    });
    progress.done();
    const m = run.metrics(state);
    process.stdout.write(
      `${run.dir}: iteration ${state.iteration}, ${plural(m.admitted, 'course')} admitted, ${m.solved} solved, ` +
        `${plural(m.takeovers, 'takeover')} (${reason === 'done' ? 'target reached' : `stopped: ${reason}`}, ${formatDuration((performance.now() - t0) / 1000)})\n` +
        `fingerprint ${run.fingerprint(state)}\n`,
    );
    process.exitCode = reason === 'sigint' ? EXIT.sigint : reason === 'sigterm' ? EXIT.sigterm : EXIT.ok;
  } finally {
    stops.remove();
  }
}

interface RunOptions extends LoopOptions { out?: string; seed?: number; seeds?: number[]; iterations?: number; minutes?: number; from: string[]; clip?: boolean; set: string[] }

async function runAction(recipePath: string, o: RunOptions): Promise<void> {
  const overrides = { seed: o.seed, iterations: o.iterations, minutes: o.minutes, sets: o.set, from: o.from.length > 0 ? o.from : undefined, clip: o.clip };
  if (!o.seeds) return session(o, (hooks) => startRun(recipePath, o.out, overrides, backendOf(o), hooks));
  if (o.seed !== undefined) throw new UserError('--seed and --seeds do not combine: give one of them');
  const dirs = sweepDirs(recipePath, o.out, overrides, o.seeds);
  for (const [k, seed] of o.seeds.entries()) {
    await session(o, (hooks) => sweepMember(recipePath, dirs[k], seed, overrides, backendOf(o), hooks));
    if (process.exitCode !== EXIT.ok) return;
  }
}

const collect = (v: string, prev: string[]): string[] => [...prev, v];

interface ResumeOptions extends LoopOptions { iterations?: number; minutes?: number }

async function resumeAction(dir: string, o: ResumeOptions): Promise<void> {
  await session(o, (hooks) => resumeRun(dir, { iterations: o.iterations, minutes: o.minutes }, backendOf(o), hooks));
}

export function registerRun(program: Command): void {
  const run = program
    .command('run')
    .description('start a co-evolution run from a recipe')
    .argument('<recipe>', 'recipe file (JSON)')
    .option('--out <dir>', 'run directory (default runs/<recipe name>)');
  backendOptions(run)
    .option('--seed <n>', 'override the recipe seed', intIn(0, 2 ** 31 - 1))
    .option('--seeds <list>', 'seed sweep, e.g. 1-5 or 1,4,9: one run per seed, one after another, into <out>-s<seed> (an existing one is resumed)', seedList)
    .option('--iterations <n>', 'total iterations to reach', intIn(1, 100_000_000))
    .option('--minutes <m>', 'stop cleanly after this many minutes', numberIn(0, 1e7))
    .option('--set <path=value>', 'override a recipe field, e.g. es.sigma=0.03 (repeatable; checked like the recipe)', collect, [])
    .option('--from <source:course>', 'branch: start from this course of a run directory or export, with its walker (repeatable)', collect, [])
    .option('--clip', 'with --from: clamp a genome outside the recipe family\'s bounds instead of refusing it')
    .option('--quiet', 'no progress on stderr')
    .action(runAction);
  const resume = program
    .command('resume')
    .description('continue a run from its newest valid checkpoint')
    .argument('<run-dir>', 'run directory');
  backendOptions(resume)
    .option('--iterations <n>', 'total iterations to reach (not a count of more)', intIn(1, 100_000_000))
    .option('--minutes <m>', 'stop cleanly after this many minutes', numberIn(0, 1e7))
    .option('--quiet', 'no progress on stderr')
    .action(resumeAction);
}
