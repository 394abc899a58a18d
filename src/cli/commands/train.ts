import { existsSync, mkdirSync } from 'node:fs';
import { basename, join } from 'node:path';
import type { Command } from 'commander';
import { actionSize, loadBodyPlan, observationSize, type BodyPlan } from '../../body/index.js';
import { plural, UserError } from '../../core/index.js';
import { freshEsState, trainWalker } from '../../coevo/index.js';
import { defaultEsConfig } from '../../evolve/index.js';
import { defaultWorkerCount, makeEvaluator, threads } from '../../pool/index.js';
import type { PolicyShape } from '../../policy/index.js';
import { assertPolicyFits, defaultRolloutOptions } from '../../sim/index.js';
import { loadAnyWalker } from '../../export/index.js';
import { saveWalker, writeFileAtomic } from '../../store/index.js';
import { buildCourse, loadTerrainSource } from '../../terrain/index.js';
import { evenIn, hiddenSizes, intIn, numberIn, oneOf } from '../options.js';
import { formatDuration, Progress } from '../progress.js';
import { DEFAULT_BODY, DEFAULT_TERRAIN, shipped } from '../shipped.js';
import { trainCurriculumAction, type CurriculumTrainOptions } from './train-curriculum.js';

interface TrainOptions {
  terrain?: string; family?: string; body?: string; iterations: number; population: number; sigma: number;
  learningRate: number; hidden: number[]; activation: 'tanh' | 'relu' | 'linear'; seed: number; out?: string;
  workers: number; stopAt?: number; steps: number; quiet?: boolean; json?: boolean; force?: boolean; walker?: string;
}

/** The network and starting weights: those of `--walker FILE`, or a fresh walker of the given shape. */
function startingWalker(o: TrainOptions, plan: BodyPlan): { shape: PolicyShape; initial?: ArrayLike<number> } {
  if (!o.walker) return { shape: { inputs: observationSize(plan), hidden: o.hidden, outputs: actionSize(plan), activation: o.activation } };
  const w = loadAnyWalker(o.walker);
  if (w.bodyName !== undefined && w.bodyName !== plan.name) throw new UserError(`Walker ${o.walker} was made for body plan "${w.bodyName}", but the body plan here is "${plan.name}"; pass --body`);
  assertPolicyFits(w.shape, plan, o.walker);
  return { shape: w.shape, initial: w.params };
}

function stem(path: string): string {
  return basename(path).replace(/\.json$/, '');
}

async function trainAction(o: TrainOptions & Partial<CurriculumTrainOptions>): Promise<void> {
  if (o.curriculum !== undefined && o.walker !== undefined) throw new UserError('--walker does not combine with --curriculum (a curriculum path starts from a fresh walker, like the direct path it is compared with)');
  if (o.curriculum !== undefined) return trainCurriculumAction(o as CurriculumTrainOptions);
  const terrain = o.terrain ?? shipped(DEFAULT_TERRAIN);
  const body = o.body ?? shipped(DEFAULT_BODY);
  const src = loadTerrainSource(terrain, o.family);
  const plan = loadBodyPlan(body);
  const out = o.out ?? join('runs', `train-${stem(terrain)}-${plan.name}-s${o.seed}`);
  if (!o.force && existsSync(join(out, 'walker.json'))) throw new UserError(`${out} already holds a trained walker; choose another --out, remove it, or pass --force`);
  const course = buildCourse(src.genome, src.family);
  const { shape, initial } = startingWalker(o, plan);
  const es = { ...defaultEsConfig(), population: o.population, sigma: o.sigma, learningRate: o.learningRate };
  const settings = { iterations: o.iterations, stopAtProgress: o.stopAt, es, rollout: { ...defaultRolloutOptions(), maxSteps: o.steps }, seed: o.seed };
  mkdirSync(out, { recursive: true });
  const progress = new Progress(o.quiet === true);
  const lines: string[] = [];
  const t0 = performance.now();
  const evaluator = makeEvaluator(threads(o.workers));
  try {
    const result = await trainWalker(course, plan, shape, freshEsState(shape, o.seed, initial), settings, evaluator, (l) => {
      const seconds = (performance.now() - t0) / 1000;
      lines.push(JSON.stringify({ ...l, seconds }));
      progress.update(`iteration ${l.iteration}/${o.iterations}  progress ${l.progress.toFixed(3)}  best candidate ${l.bestCandidateProgress.toFixed(3)}  ${formatDuration(seconds)}`);
    });
    progress.done();
    const seconds = (performance.now() - t0) / 1000;
    writeFileAtomic(join(out, 'train-log.jsonl'), `${lines.join('\n')}\n`);
    const meta = { ...(o.walker ? { from: o.walker } : {}), terrain, family: src.familyPath, genome: src.genome, iterations: result.log.length, progress: result.finalProgress, seed: o.seed, es };
    saveWalker(join(out, 'walker.json'), { body, bodyName: plan.name, shape, params: result.state.mean, meta });
    const summary = { out, iterations: result.log.length, progress: result.finalProgress, rollouts: result.rollouts, seconds };
    if (o.json) process.stdout.write(`${JSON.stringify(summary)}\n`);
    else process.stdout.write(`trained ${plural(result.log.length, 'iteration')} in ${formatDuration(seconds)}: progress ${result.finalProgress.toFixed(3)}; walker written to ${join(out, 'walker.json')}\n`);
  } finally {
    await evaluator.close();
  }
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
