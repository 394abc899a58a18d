import { Vec2 } from 'planck-js';
import { applyActions, buildWalker, CourseRays, observationSize, rayDirections, sense, trackContacts, type BodyPlan, type Walker } from '../body/index.js';
import { makeForward, type PolicyShape } from '../policy/index.js';
import type { Course } from '../terrain/index.js';
import { addCourse } from './course-world.js';
import { defaultPhysics, makeWorld, stepWorld, type PhysicsSettings } from './physics.js';

/**
 * Who drives the motors: the policy (closed loop), or a fixed sine pattern with or without the
 * sensors and policy also computed every step (so the trajectory is the same while the cost of
 * sensing and control is measured). The scripted modes exist for benchmarks.
 */
export type Control = 'policy' | 'scripted' | 'scripted-with-sensing';

/** How one episode runs. Times in seconds, distances in metres. */
export interface RolloutOptions {
  readonly physics: PhysicsSettings;
  /** Step budget (integer ≥ 1). */
  readonly maxSteps: number;
  /** The episode ends when the torso has not advanced `stallDistance` for this long, s. */
  readonly stallSeconds: number;
  /** Forward distance that counts as progress for the stall rule, m. */
  readonly stallDistance: number;
  /** Subtracted from fitness when the episode ended in a fall. */
  readonly fallPenalty: number;
  /** Record segment poses every `traceEvery` steps (0 = no trace). */
  readonly traceEvery: number;
  readonly control: Control;
  /** Horizontal impulse on the torso before the first step, N·s (a perturbation for robustness checks; 0 = none). */
  readonly push?: number;
}

export function defaultRolloutOptions(): RolloutOptions {
  return { physics: defaultPhysics(), maxSteps: 3000, stallSeconds: 3, stallDistance: 0.1, fallPenalty: 0.05, traceEvery: 0, control: 'policy' };
}

/** Segment poses over an episode: frames[k] is [x0, y0, angle0, x1, y1, angle1, ...] in segment order. */
export interface Trace {
  readonly every: number;
  readonly frames: number[][];
}

/** Why an episode ended. */
export type EndReason = 'finished' | 'fell' | 'stalled' | 'budget';

/** Outcome of one episode. */
export interface RolloutResult {
  /** Fraction of the course covered by the torso's furthest point, in [0, 1]. */
  readonly progress: number;
  /** progress − fallPenalty if the walker fell: what evolution strategies maximise. */
  readonly fitness: number;
  readonly steps: number;
  readonly fell: boolean;
  readonly end: EndReason;
  readonly trace?: Trace;
}

function recordFrame(walker: Walker): number[] {
  const frame: number[] = [];
  for (const b of walker.bodies) {
    const p = b.getPosition();
    frame.push(p.x, p.y, b.getAngle());
  }
  return frame;
}

/** Motor pattern of the scripted modes: each joint follows a 1 Hz sine of amplitude 0.5 with its own phase. */
function scripted(step: number, dt: number, out: Float64Array): void {
  for (let j = 0; j < out.length; j++) out[j] = 0.5 * Math.sin(2 * Math.PI * step * dt + j * 1.3);
}

/**
 * One episode of `plan` driven by `params` (a flat network of `shape`) on `course`.
 * Pure given its inputs: a fresh world every call, nothing shared between calls.
 */
export function rollout(course: Course, plan: BodyPlan, shape: PolicyShape, params: Float64Array, options: RolloutOptions): RolloutResult {
  const { physics, control } = options;
  const world = makeWorld(physics);
  addCourse(world, course);
  const walker = buildWalker(world, plan, course.startX, course.spawnGroundY);
  trackContacts(world, walker);
  const rays = new CourseRays(course);
  const dirs = rayDirections(plan);
  const forward = makeForward(shape);
  const obs = new Float64Array(observationSize(plan));
  const act = new Float64Array(plan.joints.length);
  const torso = walker.bodies[0];
  const span = course.finishX - course.startX;
  const stallSteps = Math.max(1, Math.round(options.stallSeconds / physics.timeStep));
  const frames: number[][] = [];
  if (options.push) torso.applyLinearImpulse(Vec2(options.push, 0), torso.getWorldCenter(), true);
  let maxX = torso.getPosition().x;
  let stallRef = maxX;
  let lastAdvance = 0;
  let end: EndReason = 'budget';
  let step = 0;
  while (step < options.maxSteps) {
    if (options.traceEvery > 0 && step % options.traceEvery === 0) frames.push(recordFrame(walker));
    if (control !== 'scripted') {
      sense(walker, rays, dirs, obs);
      forward(params, obs, act);
    }
    if (control !== 'policy') scripted(step, physics.timeStep, act);
    applyActions(walker, act);
    stepWorld(world, physics);
    step++;
    const x = torso.getPosition().x;
    if (x > maxX) maxX = x;
    if (walker.fell) { end = 'fell'; break; }
    if (maxX >= course.finishX) { end = 'finished'; break; }
    if (maxX > stallRef + options.stallDistance) { stallRef = maxX; lastAdvance = step; }
    else if (step - lastAdvance >= stallSteps) { end = 'stalled'; break; }
  }
  if (options.traceEvery > 0) frames.push(recordFrame(walker));
  const progress = Math.min(1, Math.max(0, (maxX - course.startX) / span));
  const fell = end === 'fell';
  const result: RolloutResult = { progress, fitness: progress - (fell ? options.fallPenalty : 0), steps: step, fell, end };
  return options.traceEvery > 0 ? { ...result, trace: { every: options.traceEvery, frames } } : result;
}
