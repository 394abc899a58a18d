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
  /**
   * Largest horizontal push on the torso at the start of candidate rollouts, N·s, as a run's
   * `episode.trainingPush`: one push per iteration drawn in [−push, push] and shared by all
   * candidates, the mean unpushed. Absent or 0 = no push.
   */
  readonly candidatePush?: number;
}

/** The mean weights whose own rollout went farthest during training. */
export interface BestMean {
  readonly progress: number;
  /** ES updates those weights had had (0 = the starting weights). */
  readonly updates: number;
  readonly params: readonly number[];
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
  /** Best progress of the mean over training, the final weights included (first reached wins ties). */
  readonly best: BestMean;
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
  let best: BestMean = { progress: -Infinity, updates: 0, params: [] };
  const note = (progress: number, updates: number, params: ArrayLike<number>): void => {
    if (progress > best.progress) best = { progress, updates, params: Array.from(params) };
  };
  const maxPush = settings.candidatePush ?? 0;
  for (let it = 0; it < settings.iterations; it++) {
    const batch = sceneBatch(course, plan, shape, settings.rollout);
    batch.bases.push([...state.mean]);
    if (maxPush > 0) {
      // Common random numbers, as in a run's ES phase: one push for all of this iteration's candidates.
      batch.options.push({ ...settings.rollout, push: stream(settings.seed, `walker/iteration/${it + 1}/push`).uniform(-maxPush, maxPush) });
    }
    const slots = { course: 0, plan: 0, shape: 0, options: maxPush > 0 ? 1 : 0, meanOptions: 0, base: 0 };
    const planned = planEsStep(state, settings.es, slots, batch.tasks);
    const results = await evaluator.evaluate(batch);
    const out = finishEsStep(planned, settings.es, results);
    note(out.meanResult.progress, it, state.mean);
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
  note(final.progress, log.length, state.mean);
  return { state, log, finalProgress: final.progress, rollouts: rollouts + 1, best };
}
