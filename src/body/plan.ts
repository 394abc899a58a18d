import { z } from 'zod';
import { parseWith, readJsonFile, UserError } from '../core/index.js';

/** How a controller output a ∈ [−1, 1] drives a joint motor. */
export type ActionMode = 'target-angle' | 'speed' | 'torque';

/** One rigid part of a walker. Positions are in metres relative to the torso centre at spawn. */
export interface SegmentDef {
  readonly name: string;
  /** `box` uses `size` [width, height] (full extents, m); `circle` uses `radius` (m). */
  readonly shape: 'box' | 'circle';
  readonly size?: readonly [number, number];
  readonly radius?: number;
  /** Centre at spawn, m, relative to the torso centre. */
  readonly position: readonly [number, number];
  /** Rotation at spawn, degrees counter-clockwise. */
  readonly angle: number;
  /** Area density, kg/m². */
  readonly density: number;
  /** Friction coefficient (planck mixes two fixtures as √(μ₁μ₂)). */
  readonly friction: number;
  /** Whether this part may touch the ground; anything else touching it ends the episode. */
  readonly foot: boolean;
}

/** A motorised hinge between two segments. */
export interface JointDef {
  readonly name: string;
  readonly parent: string;
  readonly child: string;
  /** Hinge point at spawn, m, relative to the torso centre. */
  readonly anchor: readonly [number, number];
  /** Joint limits, degrees relative to the spawn pose. */
  readonly lower: number;
  readonly upper: number;
  /** Motor torque limit, N·m. */
  readonly maxTorque: number;
  /** Motor speed limit, rad/s. */
  readonly maxSpeed: number;
  /** Proportional gain of target-angle actions, 1/s (motor speed = gain · angle error). */
  readonly gain: number;
}

/** A fan of range sensors from the torso centre; angles in degrees in the world frame (0 = ahead, −90 = straight down). */
export interface RayFanDef {
  readonly count: number;
  readonly fromAngle: number;
  readonly toAngle: number;
  /** Range, m. */
  readonly range: number;
}

/** A walker morphology, loaded from `envs/bodies/*.json`. The first segment is the torso. */
export interface BodyPlan {
  readonly name: string;
  readonly action: ActionMode;
  readonly segments: readonly SegmentDef[];
  readonly joints: readonly JointDef[];
  readonly rays: RayFanDef;
}

/**
 * Farthest a segment centre or a joint anchor may lie from the torso centre at spawn, m. A
 * walker is a body of a few metres; ten leaves room for long-limbed designs while refusing
 * typing slips such as 1e9, which planck would otherwise simulate as a part out of sight.
 */
export const MAX_REACH = 10;

const pair = z.tuple([z.number(), z.number()]);

/** A problem when `point` (m, relative to the torso centre) lies beyond {@link MAX_REACH}. */
function reachProblem(point: readonly [number, number], field: string): string[] {
  const d = Math.hypot(point[0], point[1]);
  return d <= MAX_REACH ? [] : [`${field}: expected within ${MAX_REACH} m of the torso centre, found [${point[0]}, ${point[1]}] (${Number(d.toPrecision(4))} m away)`];
}
const planSchema = z
  .object({
    name: z.string().min(1),
    action: z.enum(['target-angle', 'speed', 'torque']),
    segments: z
      .array(
        z
          .object({
            name: z.string().min(1),
            shape: z.enum(['box', 'circle']),
            size: z.tuple([z.number().positive().max(20), z.number().positive().max(20)]).optional(),
            radius: z.number().positive().max(10).optional(),
            position: pair,
            angle: z.number().min(-360).max(360).default(0),
            density: z.number().positive().max(1e4),
            friction: z.number().min(0).max(10),
            foot: z.boolean().default(false),
          })
          .strict(),
      )
      .min(1)
      .max(64),
    joints: z
      .array(
        z
          .object({
            name: z.string().min(1),
            parent: z.string(),
            child: z.string(),
            anchor: pair,
            lower: z.number().min(-180).max(180),
            upper: z.number().min(-180).max(180),
            maxTorque: z.number().positive().max(1e6),
            maxSpeed: z.number().positive().max(100),
            gain: z.number().positive().max(1000).default(10),
          })
          .strict(),
      )
      .max(64),
    rays: z
      .object({
        count: z.number().int().min(0).max(64),
        fromAngle: z.number().min(-180).max(180),
        toAngle: z.number().min(-180).max(180),
        range: z.number().positive().max(100),
      })
      .strict(),
  })
  .strict();

function crossProblems(plan: BodyPlan, where: string): string[] {
  const p: string[] = [];
  const names = new Map<string, number>();
  plan.segments.forEach((s, i) => {
    if (names.has(s.name)) p.push(`${where}: segments[${i}].name: duplicate segment name "${s.name}"`);
    names.set(s.name, i);
    if (s.shape === 'box' && !s.size) p.push(`${where}: segments[${i}].size: a box needs size [width, height] in metres`);
    if (s.shape === 'circle' && s.radius === undefined) p.push(`${where}: segments[${i}].radius: a circle needs a radius in metres`);
    p.push(...reachProblem(s.position, `${where}: segments[${i}].position`));
  });
  if (plan.segments[0]?.foot) p.push(`${where}: segments[0].foot: the first segment is the torso and cannot be a foot`);
  const children = new Set<string>();
  plan.joints.forEach((j, i) => {
    for (const end of ['parent', 'child'] as const) {
      if (!names.has(j[end])) p.push(`${where}: joints[${i}].${end}: expected one of the segment names (${[...names.keys()].join(', ')}), found "${j[end]}"`);
    }
    if (j.parent === j.child) p.push(`${where}: joints[${i}]: parent and child are the same segment`);
    if (children.has(j.child)) p.push(`${where}: joints[${i}].child: "${j.child}" already hangs from another joint`);
    children.add(j.child);
    if (j.lower >= j.upper) p.push(`${where}: joints[${i}]: lower (${j.lower}) must be below upper (${j.upper})`);
    p.push(...reachProblem(j.anchor, `${where}: joints[${i}].anchor`));
  });
  plan.segments.forEach((s, i) => {
    if (i > 0 && !children.has(s.name)) p.push(`${where}: segments[${i}]: "${s.name}" is not attached to anything by a joint`);
  });
  if (plan.joints.length === 0) p.push(`${where}: joints: a walker needs at least one joint`);
  return p;
}

/** Validates a parsed JSON body plan; throws one UserError listing every problem with its field path. */
export function parseBodyPlan(json: unknown, where: string): BodyPlan {
  const plan = parseWith(planSchema, json, where, 'Body plan') as BodyPlan;
  const problems = crossProblems(plan, where);
  if (problems.length > 0) throw new UserError(`Body plan ${where} is not valid:`, problems);
  return plan;
}

/** Loads and validates a body plan file. */
export function loadBodyPlan(path: string): BodyPlan {
  return parseBodyPlan(readJsonFile(path, 'Body plan'), path);
}

/** Names of the feet, in segment order. */
export function footNames(plan: BodyPlan): string[] {
  return plan.segments.filter((s) => s.foot).map((s) => s.name);
}
