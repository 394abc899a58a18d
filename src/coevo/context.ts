import { actionSize, observationSize, type BodyPlan } from '../body/index.js';
import { hashValue, stream } from '../core/index.js';
import { initEsState, type EsConfig, type EsState } from '../evolve/index.js';
import { initParams, type PolicyShape } from '../policy/index.js';
import { defaultRolloutOptions, type RolloutOptions } from '../sim/index.js';
import { buildCourse, descriptor, type Course, type TerrainFamily, type TerrainGenome } from '../terrain/index.js';
import type { BranchSource } from './branch.js';
import type { Recipe } from './recipe.js';
import type { CourseRecord, RunState } from './state.js';

/** Everything fixed for a run: the recipe and what it names, resolved. Not part of the state. */
export interface RunContext {
  readonly recipe: Recipe;
  readonly family: TerrainFamily;
  readonly plan: BodyPlan;
  readonly shape: PolicyShape;
  readonly es: EsConfig;
  readonly rollout: RolloutOptions;
  /** Stricter solver for solve confirmations: twice the velocity and position iterations. */
  readonly strictRollout: RolloutOptions;
  /** Hash of everything that shapes the run's trajectory: recipe (less its name, budget and file names), family and body plan. */
  readonly recipeHash: string;
  /** Courses and walkers a branched run starts from (empty for a run from the family's start). */
  readonly sources: readonly BranchSource[];
  /** Built courses by id (derived from genomes, cached). */
  readonly courseCache: Map<number, Course>;
}

/**
 * The hash a run's fingerprint and checkpoints are tied to. The budget may change on resume;
 * the run's name and file names (terrain, body, the `from` specs) say where things live, not
 * what happens, so two recipes that differ only there give the same run. Branch sources count by
 * content; a run without them hashes as before they existed.
 */
export function recipeHashOf(recipe: Recipe, family: TerrainFamily, plan: BodyPlan, sources: readonly BranchSource[] = []): string {
  const { name: _name, budget: _budget, terrain: _t, body: _b, from: _f, ...rest } = recipe;
  return hashValue(sources.length > 0 ? { recipe: rest, family, plan, sources } : { recipe: rest, family, plan });
}

/** The stricter solver that confirms solves: `rollout` with twice its velocity and position iterations. */
export function strictRolloutOf(rollout: RolloutOptions): RolloutOptions {
  const p = rollout.physics;
  return { ...rollout, physics: { ...p, velocityIterations: 2 * p.velocityIterations, positionIterations: 2 * p.positionIterations } };
}

/** Derives everything fixed for a run from its recipe, family and body plan: the one place this is done. */
export function makeContext(recipe: Recipe, family: TerrainFamily, plan: BodyPlan, sources: readonly BranchSource[] = []): RunContext {
  const e = recipe.episode;
  const physics = { gravity: e.gravity, timeStep: e.timeStep, velocityIterations: e.velocityIterations, positionIterations: e.positionIterations };
  const rollout: RolloutOptions = { ...defaultRolloutOptions(), physics, maxSteps: e.maxSteps, stallSeconds: e.stallSeconds, stallDistance: e.stallDistance, fallPenalty: e.fallPenalty };
  return {
    recipe, family, plan,
    shape: { inputs: observationSize(plan), hidden: recipe.policy.hidden, outputs: actionSize(plan), activation: recipe.policy.activation },
    es: recipe.es,
    rollout,
    strictRollout: strictRolloutOf(rollout),
    recipeHash: recipeHashOf(recipe, family, plan, sources),
    sources,
    courseCache: new Map(),
  };
}

/** The built course of record `id` among `courses`. */
export function courseOf(ctx: RunContext, courses: readonly CourseRecord[], id: number): Course {
  let c = ctx.courseCache.get(id);
  if (!c) {
    const rec = courses.find((r) => r.id === id);
    if (!rec) throw new Error(`no course ${id} in the run state`);
    c = buildCourse(rec.genome, ctx.family);
    ctx.courseCache.set(id, c);
  }
  return c;
}

/** A fresh optimiser state for `params`, its noise stream named by `label`. */
export function freshEs(ctx: RunContext, params: readonly number[], label: string): EsState {
  return initEsState(params, stream(ctx.recipe.seed, label));
}

/** A starting course record held by walker `walkerId` with weights `params`. */
function startCourse(id: number, genome: TerrainGenome, walkerId: number, params: number[], source?: BranchSource): CourseRecord {
  return {
    id, parent: null, admittedAt: 0, genome, descriptor: descriptor(genome),
    admission: { bestProgress: 0, walkerId: null, novelty: 0 },
    best: { progress: 0, walkerId, iteration: 0, params },
    crossedAt: null, solvedAt: null, solvedBy: null, confirmTries: 0, lastConfirmAt: null, rollouts: 0, mutationSteps: 1, archivedAt: null,
    holders: [{ walkerId, since: 0, how: 'seed' }],
    ...(source ? { source: { fingerprint: source.fingerprint, courseId: source.courseId } } : {}),
  };
}

/**
 * The state of a new run: the family's start course with one walker initialised from the seed;
 * or, for a branched run, each source's course with its walker's exact weights (course and
 * walker ids 0, 1, ... in the order given; the family's start course is not added).
 */
export function initialState(ctx: RunContext): RunState {
  const starts = ctx.sources.length > 0
    ? ctx.sources.map((s, i) => startCourse(i, s.genome, i, Array.from(s.params), s))
    : [startCourse(0, ctx.family.start, 0, Array.from(initParams(ctx.shape, stream(ctx.recipe.seed, 'walker/0/init'))))];
  return {
    format: 2,
    iteration: 0,
    nextCourseId: starts.length,
    nextWalkerId: starts.length,
    courses: starts,
    pairs: starts.map((c) => ({ courseId: c.id, walkerId: c.id, es: freshEs(ctx, c.best.params, `course/${c.id}/walker/${c.id}/es-noise`), progress: 0 })),
    counters: { candidates: 0, tooEasy: 0, tooHard: 0, takeovers: 0, rollouts: 0, steps: 0 },
  };
}
