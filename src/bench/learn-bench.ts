import { median } from '../core/index.js';
import { freshEsState, trainWalker } from '../coevo/index.js';
import { defaultEsConfig } from '../evolve/index.js';
import type { Evaluator } from '../pool/index.js';
import { defaultRolloutOptions } from '../sim/index.js';
import { buildCourse, loadFamily } from '../terrain/index.js';
import { loadBodyPlan, observationSize, actionSize } from '../body/index.js';
import type { PolicyShape } from '../policy/index.js';

export interface LearnRun { readonly seed: number; readonly iterations: number; readonly seconds: number; readonly progress: number; readonly reached: boolean }

export interface LearnBench {
  readonly runs: readonly LearnRun[];
  /** Median and worst over seeds; a seed that never reached the target counts with its full budget. */
  readonly medianIterations: number;
  readonly worstIterations: number;
  readonly medianSeconds: number;
  readonly worstSeconds: number;
}

/**
 * Learning to walk: the demo body (trestle) on the starter family's flat course, default ES
 * settings, until the mean walker's progress reaches `target` or `budget` iterations pass.
 */
export async function benchLearning(root: string, seeds: readonly number[], target: number, budget: number, evaluator: Evaluator): Promise<LearnBench> {
  const family = loadFamily(`${root}/envs/terrain/starter.json`);
  const course = buildCourse(family.start, family);
  const plan = loadBodyPlan(`${root}/envs/bodies/trestle.json`);
  const shape: PolicyShape = { inputs: observationSize(plan), hidden: [], outputs: actionSize(plan), activation: 'tanh' };
  const runs: LearnRun[] = [];
  for (const seed of seeds) {
    const t0 = performance.now();
    const settings = { iterations: budget, stopAtProgress: target, es: defaultEsConfig(), rollout: defaultRolloutOptions(), seed };
    const out = await trainWalker(course, plan, shape, freshEsState(shape, seed), settings, evaluator);
    const last = out.log[out.log.length - 1];
    runs.push({ seed, iterations: out.log.length, seconds: (performance.now() - t0) / 1000, progress: last.progress, reached: last.progress >= target });
  }
  const its = runs.map((r) => r.iterations);
  const secs = runs.map((r) => r.seconds);
  return { runs, medianIterations: median(its), worstIterations: Math.max(...its), medianSeconds: median(secs), worstSeconds: Math.max(...secs) };
}
