import { ask, tell, type EsConfig, type EsState } from '../evolve/index.js';
import type { Task } from '../pool/index.js';
import type { RolloutResult } from '../sim/index.js';

/** Where an ES step's rollouts come from in a batch: indices into its shared tables. */
export interface EsSlots {
  readonly course: number;
  readonly plan: number;
  readonly shape: number;
  readonly options: number;
  /** Options of the mean's own (unperturbed) evaluation; defaults to `options`. */
  readonly meanOptions?: number;
  /** Index of the current mean in the batch's `bases`. */
  readonly base: number;
}

/** The tasks of one ES step, planned but not yet run: the mean first, then each mirrored pair (+, −). */
export interface PlannedEsStep {
  readonly seeds: readonly number[];
  /** State after `ask` (stream advanced), to be passed to `finishEsStep`. */
  readonly asked: EsState;
  /** Index of this step's first task in the batch. */
  readonly first: number;
}

/** Appends one ES step's tasks (the mean, then + and − of every pair) to `tasks`. */
export function planEsStep(state: EsState, config: EsConfig, slots: EsSlots, tasks: Task[]): PlannedEsStep {
  const { seeds, state: asked } = ask(state, config);
  const first = tasks.length;
  const common = { kind: 'rollout', course: slots.course, plan: slots.plan, shape: slots.shape, options: slots.options } as const;
  tasks.push({ ...common, options: slots.meanOptions ?? slots.options, policy: { kind: 'params', params: state.mean } });
  for (const seed of seeds) {
    tasks.push({ ...common, policy: { kind: 'perturbed', base: slots.base, seed, sign: 1, sigma: config.sigma } });
    tasks.push({ ...common, policy: { kind: 'perturbed', base: slots.base, seed, sign: -1, sigma: config.sigma } });
  }
  return { seeds, asked, first };
}

/** Result of one ES step: the mean's own rollout (before the update) and the new state. */
export interface EsStepOutcome {
  readonly meanResult: RolloutResult;
  readonly state: EsState;
  /** Best progress among the perturbed candidates. */
  readonly bestCandidateProgress: number;
}

/** Reads a planned step's results and applies the update. */
export function finishEsStep(planned: PlannedEsStep, config: EsConfig, results: readonly RolloutResult[]): EsStepOutcome {
  const plus: number[] = [];
  const minus: number[] = [];
  let best = 0;
  for (let i = 0; i < planned.seeds.length; i++) {
    const p = results[planned.first + 1 + 2 * i];
    const m = results[planned.first + 2 + 2 * i];
    plus.push(p.fitness);
    minus.push(m.fitness);
    best = Math.max(best, p.progress, m.progress);
  }
  return {
    meanResult: results[planned.first],
    state: tell(planned.asked, config, [...planned.seeds], plus, minus),
    bestCandidateProgress: best,
  };
}
