import type { Command } from 'commander';
import { plural, UserError } from '../../core/index.js';
import { defaultWorkerCount, threads } from '../../pool/index.js';
import { trainOnCourse } from '../../run/index.js';
import { evenIn, hiddenSizes, intIn, numberIn, oneOf } from '../options.js';
import { formatDuration, Progress } from '../progress.js';
import { DEFAULT_BODY, DEFAULT_TERRAIN, shipped } from '../shipped.js';
import { trainCurriculumAction, type CurriculumTrainOptions } from './train-curriculum.js';

interface TrainOptions {
  terrain?: string; family?: string; body?: string; iterations: number; population: number; sigma: number;
  learningRate: number; hidden: number[]; activation: 'tanh' | 'relu' | 'linear'; seed: number; out?: string;
  workers: number; stopAt?: number; steps: number; quiet?: boolean; json?: boolean; force?: boolean; walker?: string;
}

async function trainAction(o: TrainOptions & Partial<CurriculumTrainOptions>): Promise<void> {
  if (o.curriculum !== undefined && o.walker !== undefined) throw new UserError('--walker does not combine with --curriculum (a curriculum path starts from a fresh walker, like the direct path it is compared with)');
  if (o.curriculum !== undefined) return trainCurriculumAction(o as CurriculumTrainOptions);
  const progress = new Progress(o.quiet === true);
  const r = await trainOnCourse({ ...o, terrain: o.terrain ?? shipped(DEFAULT_TERRAIN), body: o.body ?? shipped(DEFAULT_BODY), backend: threads(o.workers) }, {
    onIteration: (l, seconds) => progress.update(`iteration ${l.iteration}/${o.iterations}  progress ${l.progress.toFixed(3)}  best candidate ${l.bestCandidateProgress.toFixed(3)}  ${formatDuration(seconds)}`),
    onTrained: () => progress.done(),
  });
  const summary = { out: r.out, iterations: r.iterations, progress: r.progress, rollouts: r.rollouts, seconds: r.seconds };
  if (o.json) process.stdout.write(`${JSON.stringify(summary)}\n`);
  else process.stdout.write(`trained ${plural(r.iterations, 'iteration')} in ${formatDuration(r.seconds)}: progress ${r.progress.toFixed(3)}; walker written to ${r.walkerFile}\n`);
}

export function registerTrain(program: Command): void {
  program
    .command('train')
    .description('train one walker by evolution strategies on one course (the direct path)')
    .option('--terrain <file>', `terrain family (its start genome) or genome file (default: cairn's ${DEFAULT_TERRAIN})`)
    .option('--family <file>', 'terrain family of a bare genome file')
    .option('--body <file>', `body plan (default: cairn's ${DEFAULT_BODY}; with --curriculum the exported one)`)
    .option('--iterations <n>', 'most ES iterations', intIn(1, 1_000_000), 100)
    .option('--population <n>', 'candidates per ES iteration, even (as es.population in a recipe)', evenIn(2, 20_000), 32)
    .option('--sigma <x>', 'perturbation scale', numberIn(1e-6, 10), 0.05)
    .option('--learning-rate <x>', 'Adam step size', numberIn(1e-6, 10), 0.02)
    .option('--hidden <sizes>', 'hidden layer sizes of the walker, e.g. 32,32 (none = linear; also with --curriculum)', hiddenSizes, [])
    .option('--walker <file>', 'continue from these weights (cairn walker JSON or exported .safetensors) instead of a fresh walker; its network shape is used')
    .option('--activation <name>', 'hidden activation', oneOf(['tanh', 'relu', 'linear'] as const), 'tanh')
    .option('--steps <n>', 'step budget of one rollout', intIn(1, 10_000_000), 3000)
    .option('--stop-at <progress>', 'stop once the walker reaches this progress (default: run every iteration)', numberIn(0, 1))
    .option('--seed <n>', 'seed', intIn(0, 2 ** 31 - 1), 1)
    .option('--workers <n>', 'worker threads (0 = this thread)', intIn(0, 1024), defaultWorkerCount())
    .option('--out <dir>', 'output directory (default runs/train-<terrain>-<body>-s<seed>)')
    .option('--curriculum <file>', 'train through an exported curriculum.json, course by course')
    .option('--stage-iterations <n>', 'with --curriculum: most ES iterations per course', intIn(1, 1_000_000), 40)
    .option('--advance-at <progress>', 'with --curriculum: move on once progress reaches this', numberIn(0, 1), 0.9)
    .option('--compare', 'with --curriculum: also train the direct path on the final course with the same rollout budget')
    .option('--force', 'overwrite a walker already in --out')
    .option('--quiet', 'no progress on stderr')
    .option('--json', 'print a JSON summary')
    .action(trainAction);
}
