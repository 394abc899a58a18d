import { hashValue, median } from '../core/index.js';
import type { Evaluator } from '../pool/index.js';
import { difficulty } from '../terrain/index.js';
import { admissionPhase } from './admission.js';
import type { RunContext } from './context.js';
import { Draft } from './draft.js';
import { esPhase } from './es-phase.js';
import { liveLineages } from './lineage.js';
import { coverage, gridSpec, newGround } from './measures.js';
import { markCrossings, solvePhase } from './solve.js';
import type { IterationMetrics, RunEvent, RunState } from './state.js';
import { transferPhase } from './transfer.js';

/** What one iteration produced. */
export interface StepOutcome {
  readonly state: RunState;
  readonly events: readonly RunEvent[];
  readonly metrics: IterationMetrics;
}

/**
 * One iteration of the co-evolution loop: ES step for every pair; first crossings and solve confirmations; every
 * admission interval, new courses by mutation and the minimal criterion; every transfer
 * interval, walkers tried on each other's courses. Everything it decides is in the new state.
 */
export async function step(state: RunState, ctx: RunContext, evaluator: Evaluator): Promise<StepOutcome> {
  const draft = new Draft(state, state.iteration + 1);
  await esPhase(ctx, draft, evaluator);
  markCrossings(ctx, draft);
  await solvePhase(ctx, draft, evaluator);
  if (draft.iteration % ctx.recipe.admission.interval === 0) await admissionPhase(ctx, draft, evaluator);
  if (draft.iteration % ctx.recipe.transfer.interval === 0) await transferPhase(ctx, draft, evaluator);
  markCrossings(ctx, draft);
  const next = draft.finish();
  return { state: next, events: draft.events, metrics: metricsOf(next, ctx) };
}

/** The metrics line of a state. */
export function metricsOf(state: RunState, ctx: RunContext): IterationMetrics {
  const progress = state.pairs.map((p) => p.progress);
  const solved = state.courses.filter((c) => c.solvedAt !== null);
  const crossed = state.courses.filter((c) => c.crossedAt !== null);
  const diff = (c: { genome: Parameters<typeof difficulty>[0] }): number => difficulty(c.genome, ctx.family);
  return {
    iteration: state.iteration,
    activePairs: state.pairs.length,
    // Starting courses (the family's start, or a branched run's sources) have no parent.
    admitted: state.courses.filter((c) => c.parent !== null).length,
    archived: state.courses.filter((c) => c.archivedAt !== null).length,
    crossed: crossed.length,
    solved: solved.length,
    newGround: newGround(state.courses, ctx.family, ctx.recipe.measures.newGroundDistance),
    coverage: coverage(state.courses, ctx.family, gridSpec(ctx.recipe)),
    lineages: liveLineages(state, (g) => difficulty(g, ctx.family)).length,
    candidates: state.counters.candidates,
    tooEasy: state.counters.tooEasy,
    ...(state.counters.screened !== undefined ? { screened: state.counters.screened } : {}),
    takeovers: state.counters.takeovers,
    bestProgress: Math.max(0, ...progress),
    medianProgress: progress.length > 0 ? median(progress) : 0,
    hardestSolved: Math.max(0, ...solved.map(diff)),
    hardestCrossed: Math.max(0, ...crossed.map(diff)),
    rollouts: state.counters.rollouts,
    steps: state.counters.steps,
  };
}

/**
 * SHA-256 of the canonical serialisation of everything a run's future depends on: the frozen
 * recipe's hash and the state. Nothing about time, hosts or worker counts.
 */
export function fingerprint(state: RunState, recipeHash: string): string {
  return hashValue({ recipe: recipeHash, state });
}
