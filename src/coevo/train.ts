import type { BodyPlan } from '../body/index.js';
import { stream } from '../core/index.js';
import { initEsState, type EsConfig, type EsState } from '../evolve/index.js';
import { sceneBatch, type Evaluator } from '../pool/index.js';
import { initParams, type PolicyShape } from '../policy/index.js';
import type { RolloutOptions } from '../sim/index.js';
import type { Course } from '../terrain/index.js';
import { finishEsStep, planEsStep } from './es-batch.js';

/** Settings of plain ES training of one walker on one course. */
export interface TrainSettings {
  /** Most ES iterations to run. */
  readonly iterations: number;
  /** Stop as soon as the mean walker's progress reaches this; absent = run every iteration. */
  readonly stopAtProgress?: number;
  readonly es: EsConfig;
  readonly rollout: RolloutOptions;
  /** Run seed: fixes the initial weights and every perturbation. */
  readonly seed: number;
}

/** One line of a training log. */
export interface TrainLogLine {
  readonly iteration: number;
  /** Progress of the mean walker before this iteration's update. */
  readonly progress: number;
  readonly fitness: number;
  readonly bestCandidateProgress: number;
  /** Physics steps taken by all rollouts of this iteration. */
  readonly steps: number;
  /** Rollouts run so far (mean plus candidates). */
  readonly rollouts: number;
}

export interface TrainOutcome {
  readonly state: EsState;
  readonly log: readonly TrainLogLine[];
  /** Progress of the final weights (one more rollout of the updated mean). */
  readonly finalProgress: number;
  readonly rollouts: number;
}

/** A fresh ES state for a walker of `shape`: weights from the seed unless `initial` is given. */
export function freshEsState(shape: PolicyShape, seed: number, initial?: ArrayLike<number>): EsState {
  const params = initial ?? initParams(shape, stream(seed, 'walker/init'));
  return initEsState(params, stream(seed, 'walker/es-noise'));
}

/**
 * Trains one walker by evolution strategies on one course: each iteration evaluates the mean
 * and the population's mirrored candidates in one evaluator batch, then updates the mean.
 */
export async function trainWalker(
  course: Course, plan: BodyPlan, shape: PolicyShape, start: EsState, settings: TrainSettings,
  evaluator: Evaluator, onIteration?: (line: TrainLogLine) => void,
): Promise<TrainOutcome> {
  let state = start;
  let rollouts = 0;
  const log: TrainLogLine[] = [];
  for (let it = 0; it < settings.iterations; it++) {
    const batch = sceneBatch(course, plan, shape, settings.rollout);
    batch.bases.push([...state.mean]);
    const planned = planEsStep(state, settings.es, { course: 0, plan: 0, shape: 0, options: 0, base: 0 }, batch.tasks);
    const results = await evaluator.evaluate(batch);
    const out = finishEsStep(planned, settings.es, results);
    rollouts += results.length;
    const line: TrainLogLine = {
      iteration: it + 1,
      progress: out.meanResult.progress,
      fitness: out.meanResult.fitness,
      bestCandidateProgress: out.bestCandidateProgress,
      steps: results.reduce((s, r) => s + r.steps, 0),
      rollouts,
    };
    log.push(line);
    onIteration?.(line);
    if (settings.stopAtProgress !== undefined && out.meanResult.progress >= settings.stopAtProgress) break;
    state = out.state;
  }
  const [final] = await evaluator.evaluate(sceneBatch(course, plan, shape, settings.rollout, state.mean));
  return { state, log, finalProgress: final.progress, rollouts: rollouts + 1 };
}
