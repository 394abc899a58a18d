import { Box, Circle, type Body, type RevoluteJoint, type World, RevoluteJoint as RevoluteJointClass, Vec2 } from 'planck-js';
import type { BodyPlan, SegmentDef } from './plan.js';

const DEG = Math.PI / 180;
/** Gap left between the lowest part of a walker and the ground at spawn, m. */
const SPAWN_CLEARANCE = 0.02;

/** A body plan built into a planck world, plus the contact state its sensors and fall rule read. */
export interface Walker {
  readonly plan: BodyPlan;
  /** One body per segment, in plan order; index 0 is the torso. */
  readonly bodies: readonly Body[];
  /** One joint per plan joint, in plan order. */
  readonly joints: readonly RevoluteJoint[];
  /** Segment indices of the feet, in plan order. */
  readonly feet: readonly number[];
  /** 1 for feet, by segment index. */
  readonly isFoot: Uint8Array;
  /** Touching contacts with the course, by segment index. */
  readonly contacts: Int32Array;
  /** Set when anything other than a foot touched the course. */
  fell: boolean;
}

/** Lowest point of a segment at spawn, m, relative to the torso centre. */
function lowestPoint(s: SegmentDef): number {
  if (s.shape === 'circle') return s.position[1] - (s.radius ?? 0);
  const [w, h] = s.size ?? [0, 0];
  const a = s.angle * DEG;
  const reach = Math.abs((w / 2) * Math.sin(a)) + Math.abs((h / 2) * Math.cos(a));
  return s.position[1] - reach;
}

/** Height of the torso centre above flat ground that leaves the lowest part just clear of it, m. */
export function spawnHeight(plan: BodyPlan): number {
  return -Math.min(...plan.segments.map(lowestPoint)) + SPAWN_CLEARANCE;
}

/**
 * Builds `plan` into `world` with its torso centre at (x, groundY + spawnHeight).
 * Walker parts never collide with each other (shared negative group index). Fixtures carry
 * their segment index as user data; course fixtures carry none.
 */
export function buildWalker(world: World, plan: BodyPlan, x: number, groundY: number): Walker {
  const oy = groundY + spawnHeight(plan);
  const bodies = plan.segments.map((s, i) => {
    const body = world.createDynamicBody({ position: Vec2(x + s.position[0], oy + s.position[1]), angle: s.angle * DEG });
    const shape = s.shape === 'circle' ? Circle(s.radius ?? 0) : Box((s.size?.[0] ?? 0) / 2, (s.size?.[1] ?? 0) / 2);
    body.createFixture({ shape, density: s.density, friction: s.friction, filterGroupIndex: -1, userData: i });
    return body;
  });
  const index = new Map(plan.segments.map((s, i) => [s.name, i]));
  const joints = plan.joints.map((j) => {
    const joint = world.createJoint(
      new RevoluteJointClass(
        {
          lowerAngle: j.lower * DEG,
          upperAngle: j.upper * DEG,
          enableLimit: true,
          enableMotor: true,
          maxMotorTorque: j.maxTorque,
          motorSpeed: 0,
        },
        bodies[index.get(j.parent)!],
        bodies[index.get(j.child)!],
        Vec2(x + j.anchor[0], oy + j.anchor[1]),
      ),
    );
    if (!joint) throw new Error(`planck refused joint ${j.name}`);
    return joint;
  });
  const isFoot = Uint8Array.from(plan.segments.map((s) => (s.foot ? 1 : 0)));
  const feet = plan.segments.flatMap((s, i) => (s.foot ? [i] : []));
  return { plan, bodies, joints, feet, isFoot, contacts: new Int32Array(plan.segments.length), fell: false };
}

function segmentOf(data: unknown): number {
  return typeof data === 'number' ? data : -1;
}

/**
 * Keeps `walker.contacts` and `walker.fell` up to date from the world's contact events:
 * a foot touching the course counts as contact; any other part touching it is a fall.
 */
export function trackContacts(world: World, walker: Walker): void {
  const update = (a: unknown, b: unknown, delta: number): void => {
    const ia = segmentOf(a);
    const ib = segmentOf(b);
    if ((ia < 0) === (ib < 0)) return; // course–course or walker–walker
    const seg = ia >= 0 ? ia : ib;
    if (walker.isFoot[seg] === 1) walker.contacts[seg] += delta;
    else if (delta > 0) walker.fell = true;
  };
  world.on('begin-contact', (c) => update(c.getFixtureA().getUserData(), c.getFixtureB().getUserData(), 1));
  world.on('end-contact', (c) => update(c.getFixtureA().getUserData(), c.getFixtureB().getUserData(), -1));
}
