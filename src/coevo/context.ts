import { actionSize, observationSize, type BodyPlan } from '../body/index.js';
import { stream } from '../core/index.js';
import { initEsState, type EsConfig, type EsState } from '../evolve/index.js';
import type { Task } from '../pool/index.js';
import { initParams, type PolicyShape } from '../policy/index.js';
import { defaultRolloutOptions, type RolloutOptions } from '../sim/index.js';
import { buildCourse, descriptor, type Course, type TerrainFamily } from '../terrain/index.js';
import type { Recipe } from './recipe.js';
import type { CourseRecord, RunState } from './state.js';
import type { Batch } from '../pool/index.js';

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
  /** Built courses by id (derived from genomes, cached). */
  readonly courseCache: Map<number, Course>;
}

export function makeContext(recipe: Recipe, family: TerrainFamily, plan: BodyPlan): RunContext {
  const e = recipe.episode;
  const physics = { gravity: e.gravity, timeStep: e.timeStep, velocityIterations: e.velocityIterations, positionIterations: e.positionIterations };
  const rollout: RolloutOptions = { ...defaultRolloutOptions(), physics, maxSteps: e.maxSteps, stallSeconds: e.stallSeconds, stallDistance: e.stallDistance, fallPenalty: e.fallPenalty };
  const strict = { ...physics, velocityIterations: 2 * e.velocityIterations, positionIterations: 2 * e.positionIterations };
  return {
    recipe, family, plan,
    shape: { inputs: observationSize(plan), hidden: recipe.policy.hidden, outputs: actionSize(plan), activation: recipe.policy.activation },
    es: recipe.es,
    rollout,
    strictRollout: { ...rollout, physics: strict },
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

/** The state of a new run: the family's start course with one walker initialised from the seed. */
export function initialState(ctx: RunContext): RunState {
  const params = Array.from(initParams(ctx.shape, stream(ctx.recipe.seed, 'walker/0/init')));
  const genome = ctx.family.start;
  return {
    format: 1,
    iteration: 0,
    nextCourseId: 1,
    nextWalkerId: 1,
    courses: [{
      id: 0, parent: null, admittedAt: 0, genome, descriptor: descriptor(genome),
      admission: { bestProgress: 0, walkerId: null, novelty: 0 },
      best: { progress: 0, walkerId: 0, iteration: 0, params },
      solvedAt: null, solvedBy: null, archivedAt: null,
      holders: [{ walkerId: 0, since: 0, how: 'seed' }],
    }],
    pairs: [{ courseId: 0, walkerId: 0, es: freshEs(ctx, params, 'course/0/walker/0/es-noise'), progress: 0 }],
    counters: { candidates: 0, takeovers: 0, rollouts: 0, steps: 0 },
  };
}

/** Collects a batch: courses and base vectors are added once and referred to by index. */
export class BatchBuilder {
  readonly courses: Course[] = [];
  readonly bases: number[][] = [];
  readonly tasks: Task[] = [];
  private readonly courseIndex = new Map<number, number>();

  /** `courses` is read when a course is first added, so records admitted earlier in the iteration are found. */
  constructor(private readonly ctx: RunContext, private readonly source: { readonly courses: readonly CourseRecord[] }) {}

  /** Index of course `id` in this batch. */
  course(id: number): number {
    let i = this.courseIndex.get(id);
    if (i === undefined) {
      i = this.courses.push(courseOf(this.ctx, this.source.courses, id)) - 1;
      this.courseIndex.set(id, i);
    }
    return i;
  }

  /** Index of an unbuilt course (a candidate) in this batch. */
  extraCourse(c: Course): number {
    return this.courses.push(c) - 1;
  }

  base(params: readonly number[]): number {
    return this.bases.push([...params]) - 1;
  }

  /** Adds a rollout of fixed weights; `options` 0 is the run's episode, 1 the strict one. Returns the task index. */
  rollout(course: number, params: readonly number[], options: 0 | 1 = 0, push = 0): number {
    const opt = push === 0 ? options : this.pushOption(options, push);
    return this.tasks.push({ kind: 'rollout', course, plan: 0, shape: 0, options: opt, policy: { kind: 'params', params } }) - 1;
  }

  private readonly extraOptions: RolloutOptions[] = [];

  /** Index of the run's (0) or strict (1) episode options with a push on the torso at the start. */
  pushOption(base: 0 | 1, push: number): number {
    const o = { ...(base === 0 ? this.ctx.rollout : this.ctx.strictRollout), push };
    return 2 + this.extraOptions.push(o) - 1;
  }

  batch(): Batch {
    return {
      courses: this.courses, plans: [this.ctx.plan], shapes: [this.ctx.shape],
      options: [this.ctx.rollout, this.ctx.strictRollout, ...this.extraOptions], bases: this.bases, tasks: this.tasks,
    };
  }
}
