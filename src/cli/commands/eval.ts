import type { Command } from 'commander';
import { UserError } from '../../core/index.js';
import { threads } from '../../pool/index.js';
import { evalOnCourse, evalOnExportedCourse } from '../../run/index.js';
import { hiddenSizes, intIn, oneOf } from '../options.js';
import { DEFAULT_BODY, DEFAULT_TERRAIN, shipped } from '../shipped.js';

interface EvalOptions {
  terrain?: string; family?: string; body?: string; walker?: string; seed: number; hidden: number[];
  activation: 'tanh' | 'relu' | 'linear'; steps: number; json?: boolean; trace?: string; workers?: number;
  curriculum?: string; course?: number;
}

/** One rollout of an exported walker on an exported course, under the run's own settings. */
async function evalCurriculum(o: EvalOptions & { curriculum: string }): Promise<void> {
  if (o.course === undefined) throw new UserError('--curriculum needs --course ID');
  const r = await evalOnExportedCourse({ curriculum: o.curriculum, course: o.course, body: o.body, walker: o.walker, trace: o.trace, backend: threads(o.workers ?? 0) });
  if (o.json) process.stdout.write(`${JSON.stringify(r)}\n`);
  else {
    const expected = r.exportedProgress;
    const match = expected === null ? '' : r.matchesExport ? '  (equals the exported figure)' : `  (exported figure was ${expected})`;
    const solver = r.solver === 'strict' ? ' under the stricter solver' : '';
    process.stdout.write(`course ${r.course}: progress ${r.progress.toFixed(4)}${solver}${match}  steps ${r.steps}  ${r.fell ? 'fell' : 'did not fall'}  ended: ${r.end}\n`);
    if (r.runSolver !== null) {
      const o = r.runSolver;
      process.stdout.write(`  under the run's own solver: progress ${o.progress.toFixed(4)}  steps ${o.steps}  ${o.fell ? 'fell' : 'did not fall'}  ended: ${o.end}\n`);
    }
  }
}

async function evalAction(o: EvalOptions): Promise<void> {
  if (o.curriculum !== undefined) return evalCurriculum({ ...o, curriculum: o.curriculum });
  const r = await evalOnCourse({
    terrain: o.terrain ?? shipped(DEFAULT_TERRAIN), family: o.family, body: o.body ?? shipped(DEFAULT_BODY), walker: o.walker,
    seed: o.seed, hidden: o.hidden, activation: o.activation, steps: o.steps, trace: o.trace, backend: threads(o.workers ?? 0),
  });
  if (o.json) process.stdout.write(`${JSON.stringify(r)}\n`);
  else {
    process.stdout.write(
      `progress ${r.progress.toFixed(4)}  fitness ${r.fitness.toFixed(4)}  steps ${r.steps} (${r.seconds.toFixed(1)} s simulated)  ` +
        `${r.fell ? 'fell' : 'did not fall'}  ended: ${r.end}\n`,
    );
  }
}

export function registerEval(program: Command): void {
  program
    .command('eval')
    .description('run one rollout of a walker on a course and print progress, fitness, steps and whether it fell')
    .option('--terrain <file>', `terrain family (its start genome) or genome file (default: cairn's ${DEFAULT_TERRAIN})`)
    .option('--family <file>', 'terrain family of a bare genome file')
    .option('--body <file>', `body plan (default: cairn's ${DEFAULT_BODY}; with --curriculum the exported one)`)
    .option('--walker <file>', 'walker: cairn walker JSON or exported .safetensors; without it a walker is initialised from --seed')
    .option('--seed <n>', 'seed of a random walker', intIn(0, 2 ** 31 - 1), 1)
    .option('--hidden <sizes>', 'hidden layer sizes of a random walker, e.g. 32,32 (none = linear)', hiddenSizes, [])
    .option('--activation <name>', 'hidden activation of a random walker', oneOf(['tanh', 'relu', 'linear'] as const), 'tanh')
    .option('--steps <n>', 'step budget', intIn(1, 10_000_000), 3000)
    .option('--workers <n>', 'evaluate on a worker thread (1) or in this thread (0)', intIn(0, 1), 0)
    .option('--trace <file>', 'also write the course and the walker poses (every 5 steps) as JSON')
    .option('--curriculum <file>', 'an exported curriculum.json: evaluate on one of its courses')
    .option('--course <id>', 'course id in --curriculum', intIn(0, 2 ** 31 - 1))
    .option('--json', 'print one JSON object')
    .action(evalAction);
}
