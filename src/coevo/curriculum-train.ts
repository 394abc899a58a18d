import type { BodyPlan } from '../body/index.js';
import type { EsConfig } from '../evolve/index.js';
import type { Evaluator } from '../pool/index.js';
import type { PolicyShape } from '../policy/index.js';
import type { RolloutOptions } from '../sim/index.js';
import type { Course } from '../terrain/index.js';
import { freshEsState, trainWalker } from './train.js';

export interface StageCourse { readonly id: number; readonly course: Course }

export interface CurriculumTrainSettings {
  /** Move to the next stage once the walker's progress reaches this. */
  readonly advanceAt: number;
  /** Most ES iterations per stage. */
  readonly stageIterations: number;
  readonly es: EsConfig;
  readonly rollout: RolloutOptions;
  readonly seed: number;
}

export interface StageReport { readonly courseId: number; readonly iterations: number; readonly progress: number; readonly rollouts: number; readonly advanced: boolean }

export interface PathReport {
  readonly stages: readonly StageReport[];
  /** Progress of the final weights on the last course. */
  readonly finalProgress: number;
  readonly rollouts: number;
  readonly params: readonly number[];
}

/**
 * Trains one fresh walker through `stages` in order: each stage runs ES (fresh optimiser, weights
 * carried over) until progress reaches `advanceAt` or the stage budget runs out.
 */
export async function trainCurriculum(
  stages: readonly StageCourse[], plan: BodyPlan, shape: PolicyShape, s: CurriculumTrainSettings, evaluator: Evaluator,
  onStage?: (r: StageReport) => void,
): Promise<PathReport> {
  let params: readonly number[] | undefined;
  let rollouts = 0;
  const reports: StageReport[] = [];
  let last = 0;
  for (const [i, st] of stages.entries()) {
    const start = freshEsState(shape, s.seed + i * 7919, params);
    const out = await trainWalker(st.course, plan, shape, start, { iterations: s.stageIterations, stopAtProgress: s.advanceAt, es: s.es, rollout: s.rollout, seed: s.seed }, evaluator);
    params = out.state.mean;
    rollouts += out.rollouts;
    last = out.finalProgress;
    const r = { courseId: st.id, iterations: out.log.length, progress: out.finalProgress, rollouts: out.rollouts, advanced: out.finalProgress >= s.advanceAt };
    reports.push(r);
    onStage?.(r);
  }
  return { stages: reports, finalProgress: last, rollouts, params: params ?? [] };
}

/**
 * The direct path: a fresh walker (the same initial weights and noise as the curriculum path's
 * first stage) trained only on `target` with at most `budget` rollouts.
 */
export async function trainDirect(
  target: StageCourse, plan: BodyPlan, shape: PolicyShape, s: CurriculumTrainSettings, budget: number, evaluator: Evaluator,
): Promise<PathReport> {
  const iterations = Math.max(1, Math.floor((budget - 1) / (s.es.population + 1)));
  const out = await trainWalker(target.course, plan, shape, freshEsState(shape, s.seed), { iterations, stopAtProgress: s.advanceAt, es: s.es, rollout: s.rollout, seed: s.seed }, evaluator);
  const stage = { courseId: target.id, iterations: out.log.length, progress: out.finalProgress, rollouts: out.rollouts, advanced: out.finalProgress >= s.advanceAt };
  return { stages: [stage], finalProgress: out.finalProgress, rollouts: out.rollouts, params: out.state.mean };
}
