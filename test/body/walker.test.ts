import { readFileSync } from 'node:fs';
import { AABB, type World } from 'planck-js';
import { describe, expect, it } from 'vitest';
import {
  applyActions, buildWalker, CourseRays, loadBodyPlan, observationSize, parseBodyPlan, rayDirections, sense, spawnHeight,
  trackContacts, type BodyPlan, type Walker,
} from '../../src/body/index.js';
import { canonicalJson } from '../../src/core/index.js';
import { addCourse, defaultPhysics, makeWorld, stepWorld } from '../../src/sim/index.js';
import { buildCourse, loadFamily, type Course } from '../../src/terrain/index.js';

const path = (p: string): string => new URL(`../../envs/${p}`, import.meta.url).pathname;
const trestle = loadBodyPlan(path('bodies/trestle.json'));
const stilt = loadBodyPlan(path('bodies/stilt.json'));
const family = loadFamily(path('terrain/mixed.json'));
const flat: Course = buildCourse(family.start, family);
const physics = defaultPhysics();

/** Lowest point of a walker's solid shapes, m (polygon skins excluded). */
function lowestPoint(walker: Walker): number {
  let low = Infinity;
  const box = new AABB();
  for (const body of walker.bodies) {
    for (let f = body.getFixtureList(); f; f = f.getNext()) {
      const shape = f.getShape();
      shape.computeAABB(box, body.getTransform(), 0);
      // planck pads a polygon's box by its skin radius (Settings.polygonRadius); a circle's
      // radius is the circle itself.
      low = Math.min(low, box.lowerBound.y + (shape.getType() === 'polygon' ? shape.getRadius() : 0));
    }
  }
  return low;
}

interface Scene {
  world: World;
  walker: Walker;
  rays: CourseRays;
  dirs: Float64Array;
  obs: Float64Array;
}

/** A fresh world with `course`, and `plan` built at the course's spawn with contacts tracked. */
function scene(plan: BodyPlan, course: Course = flat): Scene {
  const world = makeWorld(physics);
  addCourse(world, course);
  const walker = buildWalker(world, plan, course.startX, course.spawnGroundY);
  trackContacts(world, walker);
  return { world, walker, rays: new CourseRays(course), dirs: rayDirections(plan), obs: new Float64Array(observationSize(plan)) };
}

/** Steps `s` `steps` times with fixed `actions`; returns every segment pose after every step. */
function drive(s: Scene, actions: number[], steps: number): number[][] {
  const poses: number[][] = [];
  for (let i = 0; i < steps; i++) {
    applyActions(s.walker, actions);
    stepWorld(s.world, physics);
    poses.push(s.walker.bodies.flatMap((b) => [b.getPosition().x, b.getPosition().y, b.getAngle()]));
  }
  return poses;
}

/** A plan parsed from the JSON of `file` after `edit`. */
function editedPlan(file: string, edit: (json: Record<string, any>) => void): BodyPlan {
  const json = JSON.parse(readFileSync(path(file), 'utf8')) as Record<string, any>;
  edit(json);
  return parseBodyPlan(json, file);
}

describe('spawnHeight and buildWalker', () => {
  // Plans whose lowest part is a tilted box (every shin turned 30°) or a circle, to exercise
  // both shapes' reach.
  const tilted = editedPlan('bodies/trestle.json', (j) => {
    for (const i of [2, 4, 6, 8]) j.segments[i].angle = 30;
  });
  const wheeled = editedPlan('bodies/trestle.json', (j) => {
    j.segments[4].shape = 'circle';
    j.segments[4].radius = 0.2;
    delete j.segments[4].size;
    j.segments[4].position = [0.2, -0.65];
  });

  it.each([
    ['trestle', trestle, 0],
    ['stilt', stilt, 0],
    ['trestle on raised ground', trestle, 1.7],
    ['tilted shins', tilted, -0.4],
    ['a circle', wheeled, 0.3],
  ])('leaves the lowest point of %s 0.02 m above the ground', (_label, plan, groundY) => {
    const world = makeWorld(physics);
    const walker = buildWalker(world, plan, 2, groundY);
    // planck places the shapes from the plan's positions and angles itself, so this checks
    // spawnHeight's geometry independently.
    expect(lowestPoint(walker) - groundY).toBeCloseTo(0.02, 12);
    expect(walker.bodies[0].getPosition().y).toBeCloseTo(groundY + spawnHeight(plan), 12);
  });

  it('puts the trestle torso 0.74 m up: shins reach 0.72 m below it, plus 0.02 m', () => {
    // trestle.json: shin centre −0.57 m, half-height 0.15 m.
    expect(spawnHeight(trestle)).toBeCloseTo(0.74, 12);
  });

  it('marks the feet and gives one body per segment and one joint per joint', () => {
    const walker = buildWalker(makeWorld(physics), trestle, 2, 0);
    expect(walker.bodies).toHaveLength(9);
    expect(walker.joints).toHaveLength(8);
    expect(walker.feet).toEqual([2, 4, 6, 8]);
    expect([...walker.isFoot]).toEqual([0, 0, 1, 0, 1, 0, 1, 0, 1]);
  });
});

describe('observations', () => {
  it.each([
    // 2·8 joints + 4 torso values + 4 feet + 8 rays
    ['trestle', trestle, 32],
    // 2·6 joints + 4 torso values + 2 feet + 8 rays
    ['stilt', stilt, 26],
  ])('has the documented length for %s (2J + 4 + feet + rays)', (_label, plan, size) => {
    expect(observationSize(plan)).toBe(size);
    const s = scene(plan);
    // One slot longer than documented, marked: sense must fill exactly `size` values.
    const out = new Float64Array(size + 1).fill(Number.NaN);
    sense(s.walker, s.rays, s.dirs, out.subarray(0, size));
    expect(out.subarray(0, size).every(Number.isFinite)).toBe(true);
    expect(out[size]).toBeNaN();
  });

  it('reads the spawn pose in the documented order', () => {
    const s = scene(trestle);
    sense(s.walker, s.rays, s.dirs, s.obs);
    const o = [...s.obs];
    expect(o.slice(0, 16)).toEqual(new Array(16).fill(0)); // joint angles and speeds at spawn
    expect(o.slice(16, 20)).toEqual([0, 0, 0, 0]); // torso angle, spin, velocity
    expect(o.slice(20, 24)).toEqual([0, 0, 0, 0]); // feet in the air
    // The last ray points straight down (toAngle −90°) from the torso centre 0.74 m above
    // flat ground, range 3 m.
    expect(o[31]).toBeCloseTo(0.74 / 3, 12);
    // The first points 15° below ahead: it meets the ground 0.74 m / sin 15° = 2.86 m away.
    expect(o[24]).toBeCloseTo(0.74 / Math.sin((15 * Math.PI) / 180) / 3, 12);
  });
});

describe('a trestle with zero actions in target-angle mode', () => {
  it('stands on its four feet for 4 s without falling or sagging', () => {
    const s = scene(trestle);
    const zero = new Array(8).fill(0);
    const heights: number[] = [];
    for (let i = 0; i < 200; i++) {
      applyActions(s.walker, zero);
      stepWorld(s.world, physics);
      expect(s.walker.fell).toBe(false);
      if (i >= 50) heights.push(s.walker.bodies[0].getPosition().y);
    }
    sense(s.walker, s.rays, s.dirs, s.obs);
    expect([...s.obs.subarray(20, 24)]).toEqual([1, 1, 1, 1]);
    // After settling (from 1 s on) the torso holds its height within 5 mm and sits within 3 cm
    // of its spawn height less the clearance; planck's contact skins (polygonRadius, 0.01 m)
    // and the solver's allowed overlap (linearSlop, 0.005 m) account for under 2 cm.
    expect(Math.max(...heights) - Math.min(...heights)).toBeLessThan(0.005);
    expect(Math.abs(heights[heights.length - 1] - (spawnHeight(trestle) - 0.02))).toBeLessThan(0.03);
    expect(Math.abs(s.walker.bodies[0].getAngle())).toBeLessThan(0.05);
  });
});

describe('applyActions', () => {
  const wild = [5, -3, 2, -9, 1.5, -1.2, 7, -4];
  const clamped = [1, -1, 1, -1, 1, -1, 1, -1];

  it.each(['target-angle', 'speed', 'torque'])('clamps actions outside [−1, 1] in %s mode', (mode) => {
    const plan = editedPlan('bodies/trestle.json', (j) => {
      j.action = mode;
    });
    const a = canonicalJson(drive(scene(plan), wild, 60));
    const b = canonicalJson(drive(scene(plan), clamped, 60));
    expect(a).toBe(b);
    // The trajectory does respond to the action values, so equality above is not vacuous.
    const c = canonicalJson(drive(scene(plan), clamped.map((x) => 0.8 * x), 60));
    expect(c).not.toBe(b);
  });

  it('drives a joint towards lower + (a + 1)/2·(upper − lower) in target-angle mode', () => {
    const s = scene(trestle);
    // Lift the walker's weight off the question: hold the torso still so joints move freely.
    s.walker.bodies[0].setType('static');
    const actions = [0.5, 0, 0, 0, 0, 0, 0, -0.5];
    drive(s, actions, 100);
    // front_hip (±45°) at a = 0.5 → 22.5°; hind_knee (±60°) at a = −0.5 → −30°.
    expect(s.walker.joints[0].getJointAngle()).toBeCloseTo((22.5 * Math.PI) / 180, 2);
    expect(s.walker.joints[7].getJointAngle()).toBeCloseTo((-30 * Math.PI) / 180, 2);
  });
});
