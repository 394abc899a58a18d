import type { Command } from 'commander';
import { loadBodyPlan, observationSize, actionSize } from '../../body/index.js';
import { stream, UserError } from '../../core/index.js';
import { makeEvaluator, threads, sceneBatch } from '../../pool/index.js';
import { initParams, type PolicyShape } from '../../policy/index.js';
import { assertPolicyFits, defaultRolloutOptions } from '../../sim/index.js';
import { writeFileAtomic } from '../../store/index.js';
import { buildCourse, loadTerrainSource } from '../../terrain/index.js';
import { hiddenSizes, intIn, oneOf } from '../options.js';
import { bodyOf, courseOf, findCourse, loadAnyWalker, loadCurriculum, loadSafetensorsWalker, rolloutOptionsOf, walkerRefOf } from '../../export/index.js';
import { DEFAULT_BODY, DEFAULT_TERRAIN, shipped } from '../shipped.js';

interface EvalOptions {
  terrain?: string; family?: string; body?: string; walker?: string; seed: number; hidden: number[];
  activation: 'tanh' | 'relu' | 'linear'; steps: number; json?: boolean; trace?: string; workers?: number;
  curriculum?: string; course?: number;
}

/** One rollout of an exported walker on an exported course, under the run's own settings. */
async function evalCurriculum(o: EvalOptions): Promise<void> {
  if (o.course === undefined) throw new UserError('--curriculum needs --course ID');
  const cur = loadCurriculum(o.curriculum!);
  const entry = findCourse(cur, o.course);
  const plan = o.body === undefined ? bodyOf(cur) : loadBodyPlan(o.body);
  const ref = walkerRefOf(cur, entry);
  const w = o.walker ? loadSafetensorsWalker(o.walker) : loadSafetensorsWalker(ref.path, ref.sha256);
  assertPolicyFits(w.shape, plan, o.walker ?? ref.path);
  const batch = sceneBatch(courseOf(entry), plan, w.shape, { ...rolloutOptionsOf(cur), traceEvery: o.trace ? 5 : 0 }, Array.from(w.params));
  const evaluator = makeEvaluator(threads(o.workers ?? 0));
  try {
    const [r] = await evaluator.evaluate(batch);
    if (o.trace && r.trace) writeFileAtomic(o.trace, `${JSON.stringify({ course: batch.courses[0], plan: plan.name, trace: r.trace })}\n`);
    const expected = o.walker ? null : ref.progress;
    const summary = { course: entry.id, progress: r.progress, fitness: r.fitness, steps: r.steps, fell: r.fell, end: r.end, exportedProgress: expected, matchesExport: expected === null ? null : r.progress === expected };
    if (o.json) process.stdout.write(`${JSON.stringify(summary)}\n`);
    else {
      const match = expected === null ? '' : r.progress === expected ? '  (equals the exported figure)' : `  (exported figure was ${expected})`;
      process.stdout.write(`course ${entry.id}: progress ${r.progress.toFixed(4)}${match}  steps ${r.steps}  ${r.fell ? 'fell' : 'did not fall'}  ended: ${r.end}\n`);
    }
  } finally {
    await evaluator.close();
  }
}

async function evalAction(o: EvalOptions): Promise<void> {
  if (o.curriculum !== undefined) return evalCurriculum(o);
  const src = loadTerrainSource(o.terrain ?? shipped(DEFAULT_TERRAIN), o.family);
  const course = buildCourse(src.genome, src.family);
  const walker = o.walker ? loadAnyWalker(o.walker) : undefined;
  const bodyPath = o.body ?? shipped(DEFAULT_BODY);
  const plan = loadBodyPlan(bodyPath);
  if (walker?.bodyName !== undefined && walker.bodyName !== plan.name) {
    throw new UserError(`Walker ${o.walker} was made for body plan "${walker.bodyName}", but --body ${bodyPath} is "${plan.name}"`);
  }
  const shape: PolicyShape = walker?.shape ?? { inputs: observationSize(plan), hidden: o.hidden, outputs: actionSize(plan), activation: o.activation };
  assertPolicyFits(shape, plan, String(o.walker));
  const params = walker ? Array.from(walker.params) : Array.from(initParams(shape, stream(o.seed, 'walker/init')));
  const batch = sceneBatch(course, plan, shape, { ...defaultRolloutOptions(), maxSteps: o.steps, traceEvery: o.trace ? 5 : 0 }, params);
  const evaluator = makeEvaluator(threads(o.workers ?? 0));
  try {
    const [r] = await evaluator.evaluate(batch);
    if (o.trace && r.trace) writeFileAtomic(o.trace, `${JSON.stringify({ course, plan: plan.name, trace: r.trace })}\n`);
    const summary = { progress: r.progress, fitness: r.fitness, steps: r.steps, fell: r.fell, end: r.end, seconds: r.steps * batch.options[0].physics.timeStep };
    if (o.json) process.stdout.write(`${JSON.stringify(summary)}\n`);
    else {
      process.stdout.write(
        `progress ${r.progress.toFixed(4)}  fitness ${r.fitness.toFixed(4)}  steps ${r.steps} (${summary.seconds.toFixed(1)} s simulated)  ` +
          `${r.fell ? 'fell' : 'did not fall'}  ended: ${r.end}\n`,
      );
    }
  } finally {
    await evaluator.close();
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
