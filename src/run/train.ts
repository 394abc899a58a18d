import { existsSync, mkdirSync } from 'node:fs';
import { basename, join } from 'node:path';
import { loadBodyPlan, type BodyPlan } from '../body/index.js';
import { UserError } from '../core/index.js';
import { freshEsState, trainWalker, type TrainLogLine } from '../coevo/index.js';
import { defaultEsConfig, type EsConfig } from '../evolve/index.js';
import { loadAnyWalker } from '../export/index.js';
import type { Backend } from '../pool/index.js';
import type { Activation, PolicyShape } from '../policy/index.js';
import { assertPolicyFits, defaultRolloutOptions } from '../sim/index.js';
import { saveWalker, writeFileAtomic } from '../store/index.js';
import { buildCourse, loadTerrainSource } from '../terrain/index.js';
import { freshShape, withEvaluator } from './scene.js';

/** ES figures and the fresh network shared by the direct and the curriculum path of `cairn train`. */
export interface TrainFigures {
  /** Candidates per ES iteration (even). */
  readonly population: number;
  /** Perturbation scale. */
  readonly sigma: number;
  /** Adam step size. */
  readonly learningRate: number;
  /** Hidden layer sizes of a fresh walker. */
  readonly hidden: readonly number[];
  readonly activation: Activation;
  /** Fixes the initial weights and every perturbation. */
  readonly seed: number;
  /** Output directory; absent = a name under `runs/` built from the inputs. */
  readonly out?: string;
  readonly backend: Backend;
}

/** `cairn train` on one course. */
export interface CourseTrainOptions extends TrainFigures {
  /** Terrain family (its start genome) or genome file. */
  readonly terrain: string;
  /** Terrain family of a bare genome file. */
  readonly family?: string;
  /** Body plan file. */
  readonly body: string;
  /** Walker file to continue from (its network shape is used); absent = a fresh walker. */
  readonly walker?: string;
  /** Most ES iterations. */
  readonly iterations: number;
  /** Step budget of one rollout. */
  readonly steps: number;
  /** Stop once the walker's progress reaches this; absent = run every iteration. */
  readonly stopAt?: number;
  /** Overwrite a walker already in `out`. */
  readonly force?: boolean;
}

/** Called as training goes; `seconds` is wall time since training started. */
export interface TrainHooks {
  readonly onIteration?: (line: TrainLogLine, seconds: number) => void;
  /** Training is over; the files are written next. */
  readonly onTrained?: () => void;
}

export interface CourseTrainResult {
  readonly out: string;
  /** The walker file written. */
  readonly walkerFile: string;
  readonly iterations: number;
  /** Progress of the final weights. */
  readonly progress: number;
  readonly rollouts: number;
  /** Wall time of training (s). */
  readonly seconds: number;
}

/** The ES configuration the command's figures name. */
export function esOf(o: TrainFigures): EsConfig {
  return { ...defaultEsConfig(), population: o.population, sigma: o.sigma, learningRate: o.learningRate };
}

/** The network and starting weights: those of the walker file, or a fresh walker of the given shape. */
function startingWalker(o: CourseTrainOptions, plan: BodyPlan): { shape: PolicyShape; initial?: ArrayLike<number> } {
  if (!o.walker) return { shape: freshShape(plan, o.hidden, o.activation) };
  const w = loadAnyWalker(o.walker);
  if (w.bodyName !== undefined && w.bodyName !== plan.name) throw new UserError(`Walker ${o.walker} was made for body plan "${w.bodyName}", but the body plan here is "${plan.name}"; pass --body`);
  assertPolicyFits(w.shape, plan, o.walker);
  return { shape: w.shape, initial: w.params };
}

function stem(path: string): string {
  return basename(path).replace(/\.json$/, '');
}

/**
 * Trains one walker by ES on one course (the direct path) and writes `walker.json` and
 * `train-log.jsonl` (one line per iteration, with wall seconds) into the output directory.
 */
export async function trainOnCourse(o: CourseTrainOptions, hooks: TrainHooks = {}): Promise<CourseTrainResult> {
  const src = loadTerrainSource(o.terrain, o.family);
  const plan = loadBodyPlan(o.body);
  const out = o.out ?? join('runs', `train-${stem(o.terrain)}-${plan.name}-s${o.seed}`);
  if (!o.force && existsSync(join(out, 'walker.json'))) throw new UserError(`${out} already holds a trained walker; choose another --out, remove it, or pass --force`);
  const course = buildCourse(src.genome, src.family);
  const { shape, initial } = startingWalker(o, plan);
  const es = esOf(o);
  const settings = { iterations: o.iterations, stopAtProgress: o.stopAt, es, rollout: { ...defaultRolloutOptions(), maxSteps: o.steps }, seed: o.seed };
  mkdirSync(out, { recursive: true });
  const lines: string[] = [];
  const t0 = performance.now();
  return withEvaluator(o.backend, async (evaluator) => {
    const result = await trainWalker(course, plan, shape, freshEsState(shape, o.seed, initial), settings, evaluator, (l) => {
      const seconds = (performance.now() - t0) / 1000;
      lines.push(JSON.stringify({ ...l, seconds }));
      hooks.onIteration?.(l, seconds);
    });
    hooks.onTrained?.();
    const seconds = (performance.now() - t0) / 1000;
    writeFileAtomic(join(out, 'train-log.jsonl'), `${lines.join('\n')}\n`);
    const meta = { ...(o.walker ? { from: o.walker } : {}), terrain: o.terrain, family: src.familyPath, genome: src.genome, iterations: result.log.length, progress: result.finalProgress, seed: o.seed, es };
    const walkerFile = join(out, 'walker.json');
    saveWalker(walkerFile, { body: o.body, bodyName: plan.name, shape, params: result.state.mean, meta });
    return { out, walkerFile, iterations: result.log.length, progress: result.finalProgress, rollouts: result.rollouts, seconds };
  });
}
