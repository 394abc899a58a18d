import type { BodyPlan } from './plan.js';
import type { CourseRays } from './rays.js';
import type { Walker } from './walker.js';

const DEG = Math.PI / 180;
/** Scale of torso angular velocity in observations, s/rad: keeps typical values near [−1, 1]. */
export const ANGULAR_VELOCITY_SCALE = 0.25;
/** Scale of torso linear velocity in observations, s/m. */
export const VELOCITY_SCALE = 0.5;

/**
 * Length of a plan's observation vector. Layout, in order (J joints, F feet, R rays):
 * - J joint angles, rad, relative to the spawn pose;
 * - J joint speeds divided by each joint's maxSpeed;
 * - torso angle, rad (counter-clockwise, wrapped to [−π, π]);
 * - torso angular velocity × 0.25 s/rad;
 * - torso velocity x and y × 0.5 s/m;
 * - F foot contacts, 1 when touching the course, else 0;
 * - R range readings, hit distance ÷ range (1 = nothing within range), fan from fromAngle to toAngle.
 */
export function observationSize(plan: BodyPlan): number {
  return 2 * plan.joints.length + 4 + plan.segments.filter((s) => s.foot).length + plan.rays.count;
}

/** Number of controller outputs: one per joint, each in [−1, 1]. */
export function actionSize(plan: BodyPlan): number {
  return plan.joints.length;
}

/** Unit directions of a plan's range sensors, flat [dx0, dy0, dx1, dy1, ...]. */
export function rayDirections(plan: BodyPlan): Float64Array {
  const { count, fromAngle, toAngle } = plan.rays;
  const out = new Float64Array(2 * count);
  for (let i = 0; i < count; i++) {
    const a = (count === 1 ? fromAngle : fromAngle + ((toAngle - fromAngle) * i) / (count - 1)) * DEG;
    out[2 * i] = Math.cos(a);
    out[2 * i + 1] = Math.sin(a);
  }
  return out;
}

function wrapAngle(a: number): number {
  return a - 2 * Math.PI * Math.round(a / (2 * Math.PI));
}

/** Writes the walker's observation into `out` (see `observationSize` for the layout). Allocates nothing. */
export function sense(walker: Walker, rays: CourseRays, dirs: Float64Array, out: Float64Array): void {
  const joints = walker.joints;
  const defs = walker.plan.joints;
  const nj = joints.length;
  for (let j = 0; j < nj; j++) {
    out[j] = joints[j].getJointAngle();
    out[nj + j] = joints[j].getJointSpeed() / defs[j].maxSpeed;
  }
  const torso = walker.bodies[0];
  const p = torso.getPosition();
  const v = torso.getLinearVelocity();
  let k = 2 * nj;
  out[k++] = wrapAngle(torso.getAngle());
  out[k++] = torso.getAngularVelocity() * ANGULAR_VELOCITY_SCALE;
  out[k++] = v.x * VELOCITY_SCALE;
  out[k++] = v.y * VELOCITY_SCALE;
  for (const f of walker.feet) out[k++] = walker.contacts[f] > 0 ? 1 : 0;
  const range = walker.plan.rays.range;
  for (let r = 0; r < dirs.length; r += 2) out[k++] = rays.cast(p.x, p.y, dirs[r], dirs[r + 1], range);
}

/** Names of the observation entries, in order (see `observationSize` for units and scales). */
export function observationNames(plan: BodyPlan): string[] {
  const joints = plan.joints.map((j) => j.name);
  const { count, fromAngle, toAngle } = plan.rays;
  const rays = Array.from({ length: count }, (_, i) => {
    const a = count === 1 ? fromAngle : fromAngle + ((toAngle - fromAngle) * i) / (count - 1);
    return `ray${i}@${Math.round(a * 100) / 100}deg`;
  });
  return [
    ...joints.map((j) => `${j}.angle`),
    ...joints.map((j) => `${j}.speed`),
    'torso.angle', 'torso.angularVelocity', 'torso.vx', 'torso.vy',
    ...plan.segments.filter((s) => s.foot).map((s) => `${s.name}.contact`),
    ...rays,
  ];
}
