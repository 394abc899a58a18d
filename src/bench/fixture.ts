import { loadBodyPlan, observationSize, actionSize, type BodyPlan } from '../body/index.js';
import { stream } from '../core/index.js';
import { initParams, type PolicyShape } from '../policy/index.js';
import { defaultRolloutOptions, type Control, type RolloutOptions } from '../sim/index.js';
import { buildCourse, loadFamily, mutate, type Course } from '../terrain/index.js';

/** The fixed scene every benchmark uses: a mutated course of the mixed family, the trestle body, a random linear walker. */
export interface BenchScene {
  readonly course: Course;
  readonly plan: BodyPlan;
  readonly shape: PolicyShape;
  readonly params: Float64Array;
  /** Ground segments of the course. */
  readonly segments: number;
  /** The family's flat start course (two segments): the cheapest rollout there is, for jobs that should cost nothing. */
  readonly flat: Course;
}

export function benchScene(root: string): BenchScene {
  const family = loadFamily(`${root}/envs/terrain/mixed.json`);
  let genome = family.start;
  const s = stream(2026, 'bench/course');
  for (let i = 0; i < 60; i++) genome = mutate(genome, family, s);
  genome = { ...genome, roughness: { amplitude: 0.05, seed: 7 } };
  const course = buildCourse(genome, family);
  const plan = loadBodyPlan(`${root}/envs/bodies/trestle.json`);
  const shape: PolicyShape = { inputs: observationSize(plan), hidden: [], outputs: actionSize(plan), activation: 'tanh' };
  return { course, plan, shape, params: initParams(shape, stream(1, 'bench/walker')), segments: course.ground.length / 2 - 1, flat: buildCourse(family.start, family) };
}

/** Rollout options for timing: a fixed number of steps (stall rule off). */
export function benchOptions(control: Control, steps: number): RolloutOptions {
  return { ...defaultRolloutOptions(), control, maxSteps: steps, stallSeconds: 1e9 };
}
