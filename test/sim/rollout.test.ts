/**
 * One episode end to end: result invariants, each way an episode ends, the trace layout and
 * the fitness rule. Handbook source for the incline checks: D. Halliday, R. Resnick, J. Walker,
 * "Fundamentals of Physics" (HRW; chapter number from memory).
 */
import { describe, expect, it } from 'vitest';
import { actionSize, loadBodyPlan, observationSize, parseBodyPlan, spawnHeight, type BodyPlan } from '../../src/body/index.js';
import { stream } from '../../src/core/index.js';
import { initParams, paramCount, type PolicyShape } from '../../src/policy/index.js';
import { defaultRolloutOptions, rollout, type RolloutOptions, type RolloutResult } from '../../src/sim/index.js';
import { buildCourse, loadFamily, mutate, type Course, type TerrainGenome } from '../../src/terrain/index.js';

const path = (p: string): string => new URL(`../../envs/${p}`, import.meta.url).pathname;
const trestle = loadBodyPlan(path('bodies/trestle.json'));
const stilt = loadBodyPlan(path('bodies/stilt.json'));
const family = loadFamily(path('terrain/mixed.json'));
const flat: Course = buildCourse(family.start, family);
const dt = defaultRolloutOptions().physics.timeStep;

/** A linear policy shape for `plan` and all-zero weights: every action is tanh(0) = 0. */
function still(plan: BodyPlan): [PolicyShape, Float64Array] {
  const shape: PolicyShape = { inputs: observationSize(plan), hidden: [], outputs: actionSize(plan), activation: 'tanh' };
  return [shape, new Float64Array(paramCount(shape))];
}

function options(over: Partial<RolloutOptions>): RolloutOptions {
  return { ...defaultRolloutOptions(), ...over };
}

function evolved(lineage: number, generations: number): TerrainGenome {
  let g = family.start;
  for (let i = 0; i < generations; i++) g = mutate(g, family, stream(lineage, `test/rollout/${lineage}/${i}`));
  return g;
}

/**
 * A frictionless plane of rise over run `grade` through the spawn point, as a hand-made course
 * (HRW ch. 6: a frictionless block slides at g·sin θ, 0.98 m/s² at grade 0.1). The spawn height is
 * taken where the ground is highest under the trestle's feet (0.55 m either side), so no foot
 * starts inside the ground.
 */
function incline(grade: number): Course {
  const y = (x: number): number => grade * (x - flat.startX);
  return { ...flat, ground: [-3, 5, -3, y(-3), 60, y(60)], obstacles: [], friction: 0, spawnGroundY: Math.abs(grade) * 0.55 };
}

/** Invariants every result must satisfy, whatever happened in the episode. */
function expectConsistent(r: RolloutResult, o: RolloutOptions): void {
  expect(r.progress).toBeGreaterThanOrEqual(0);
  expect(r.progress).toBeLessThanOrEqual(1);
  expect(Number.isInteger(r.steps)).toBe(true);
  expect(r.steps).toBeGreaterThanOrEqual(1);
  expect(r.steps).toBeLessThanOrEqual(o.maxSteps);
  expect(r.fell).toBe(r.end === 'fell');
  if (r.end === 'budget') expect(r.steps).toBe(o.maxSteps);
  if (r.end === 'finished') expect(r.progress).toBe(1);
  expect(r.fitness).toBe(r.progress - (r.fell ? o.fallPenalty : 0));
}

describe('rollout results', () => {
  const cases = [0, 1, 2].flatMap((lineage) =>
    [['trestle', trestle], ['stilt', stilt]].map(([name, plan]) => [name as string, lineage, plan as BodyPlan] as const),
  );

  it.each(cases)('are consistent for %s with a random policy on mutated course %i', (_name, lineage, plan) => {
    const shape: PolicyShape = { inputs: observationSize(plan), hidden: [16], outputs: actionSize(plan), activation: 'tanh' };
    const params = initParams(shape, stream(lineage, 'test/rollout/policy'), { outputScale: 1 });
    const o = options({ maxSteps: 200 });
    expectConsistent(rollout(buildCourse(evolved(lineage, 20), family), plan, shape, params, o), o);
  });

  it('counts progress from the spawn: sliding backwards scores 0, not below', () => {
    const [shape, zero] = still(trestle);
    const o = options({ maxSteps: 100, stallSeconds: 100, traceEvery: 1 });
    const r = rollout(incline(0.1), trestle, shape, zero, o);
    expectConsistent(r, o);
    const last = r.trace!.frames[r.trace!.frames.length - 1];
    // Frictionless incline (HRW ch. 6): x = −½·g·sin θ·cos θ·t² after t = 2 s, 1.94 m back;
    // 5 cm covers the Euler lead (½·a·dt·t = 0.02 m) and settling onto the slope.
    const theta = Math.atan(0.1);
    const t = 100 * dt;
    const g = defaultRolloutOptions().physics.gravity;
    expect(Math.abs(last[0] - flat.startX + 0.5 * g * Math.sin(theta) * Math.cos(theta) * t * t)).toBeLessThan(0.05);
    expect(r.progress).toBeLessThan(1e-3);
  });

  it('ends "finished" with progress 1 once the torso crosses the finish line', () => {
    // Sliding downhill (forwards), x = ½·g·sin θ·cos θ·t² reaches 0.3 m at t = 0.79 s.
    const [shape, zero] = still(trestle);
    const course: Course = { ...incline(-0.1), finishX: flat.startX + 0.3 };
    const o = options({ maxSteps: 100, stallSeconds: 100 });
    const r = rollout(course, trestle, shape, zero, o);
    expectConsistent(r, o);
    expect(r.end).toBe('finished');
    const theta = Math.atan(0.1);
    const t = Math.sqrt((2 * 0.3) / (defaultRolloutOptions().physics.gravity * Math.sin(theta) * Math.cos(theta)));
    expect(Math.abs(r.steps * dt - t)).toBeLessThanOrEqual(0.06);
    expect(r.fitness).toBe(1);
  });

  it('ends "budget" after exactly maxSteps when nothing else ends it', () => {
    const [shape, zero] = still(trestle);
    const o = options({ maxSteps: 37, stallSeconds: 100 });
    const r = rollout(flat, trestle, shape, zero, o);
    expect(r.end).toBe('budget');
    expect(r.steps).toBe(37);
  });
});

describe('stall rule', () => {
  it.each([3, 1.5])('ends a standing trestle after stallSeconds = %f s', (stallSeconds) => {
    const [shape, zero] = still(trestle);
    const o = options({ stallSeconds });
    const r = rollout(flat, trestle, shape, zero, o);
    expectConsistent(r, o);
    expect(r.end).toBe('stalled');
    expect(r.fell).toBe(false);
    // It never advances stallDistance (0.1 m), so the clock started at step 0 runs out.
    expect(r.steps).toBe(Math.round(stallSeconds / dt));
    expect(r.progress).toBeLessThan(0.1 / (flat.finishX - flat.startX));
  });
});

describe('fall rule', () => {
  const trestleJson = (): Record<string, any> => JSON.parse(JSON.stringify(trestle)) as Record<string, any>;

  it('ends the episode when legs that are not feet touch the ground', () => {
    const json = trestleJson();
    for (const s of json.segments) s.foot = false;
    const plan = parseBodyPlan(json, 'no-feet');
    const [shape, zero] = still(plan);
    const o = options({ fallPenalty: 0.3 });
    const r = rollout(flat, plan, shape, zero, o);
    expectConsistent(r, o);
    expect(r.end).toBe('fell');
    // Spawned 0.02 m up, it lands within a few steps (free fall of 0.02 m takes 0.064 s).
    expect(r.steps).toBeLessThanOrEqual(5);
    expect(r.fitness).toBe(r.progress - 0.3);
  });

  it('ends the episode when the torso lands first while the only foot is in the air', () => {
    // A torso with one "foot" sticking up: the torso is the lowest part and touches first.
    const plan = parseBodyPlan(
      {
        name: 'upturned',
        action: 'target-angle',
        segments: [
          { name: 'torso', shape: 'box', size: [1, 0.2], position: [0, 0], density: 1, friction: 0.6 },
          { name: 'mast', shape: 'box', size: [0.1, 0.3], position: [0, 0.25], density: 1, friction: 0.6, foot: true },
        ],
        joints: [{ name: 'base', parent: 'torso', child: 'mast', anchor: [0, 0.1], lower: -10, upper: 10, maxTorque: 5, maxSpeed: 5 }],
        rays: { count: 2, fromAngle: -30, toAngle: -90, range: 2 },
      },
      'upturned',
    );
    expect(spawnHeight(plan)).toBeCloseTo(0.12, 12);
    const [shape, zero] = still(plan);
    const o = options({});
    const r = rollout(flat, plan, shape, zero, o);
    expectConsistent(r, o);
    expect(r.end).toBe('fell');
    expect(r.steps).toBeLessThanOrEqual(5);
  });

  it('lets feet touch: a standing trestle does not fall', () => {
    const [shape, zero] = still(trestle);
    const r = rollout(flat, trestle, shape, zero, options({ maxSteps: 100, stallSeconds: 100 }));
    expect(r.fell).toBe(false);
    expect(r.end).toBe('budget');
  });
});

describe('trace', () => {
  const [shape] = still(trestle);
  const params = initParams({ ...shape, hidden: [8] }, stream(5, 'test/rollout/trace'), { outputScale: 1 });
  const netShape: PolicyShape = { ...shape, hidden: [8] };
  const base = options({ maxSteps: 40, stallSeconds: 100 });

  it('records a frame every k steps plus the final pose, 3 numbers per segment', () => {
    const k = 7;
    const r = rollout(flat, trestle, netShape, params, { ...base, traceEvery: k });
    expect(r.trace!.every).toBe(k);
    // Frames at steps 0, 7, ..., before each of those steps is taken, then one after the last.
    expect(r.trace!.frames).toHaveLength(Math.ceil(r.steps / k) + 1);
    for (const f of r.trace!.frames) expect(f).toHaveLength(3 * trestle.segments.length);
  });

  it('starts with the spawn pose', () => {
    const r = rollout(flat, trestle, netShape, params, { ...base, traceEvery: 5 });
    const y0 = flat.spawnGroundY + spawnHeight(trestle);
    const expected = trestle.segments.flatMap((s) => [flat.startX + s.position[0], y0 + s.position[1], (s.angle * Math.PI) / 180]);
    r.trace!.frames[0].forEach((v, i) => expect(v).toBeCloseTo(expected[i], 12));
  });

  it('holds at frame i the pose after i·k steps', () => {
    const k = 10;
    const r = rollout(flat, trestle, netShape, params, { ...base, traceEvery: k });
    expect(r.steps).toBe(40);
    for (let i = 1; i <= 3; i++) {
      // A shorter episode's final frame is its pose after its last step.
      const short = rollout(flat, trestle, netShape, params, { ...base, maxSteps: i * k, traceEvery: 1000 });
      expect(short.trace!.frames[short.trace!.frames.length - 1]).toEqual(r.trace!.frames[i]);
    }
  });

  it('gives progress = (furthest torso x − start) / (finish − start)', () => {
    const r = rollout(flat, trestle, netShape, params, { ...base, traceEvery: 1 });
    const furthest = Math.max(...r.trace!.frames.map((f) => f[0]));
    expect(r.progress).toBe(Math.max(0, (furthest - flat.startX) / (flat.finishX - flat.startX)));
  });

  it('is absent when traceEvery is 0', () => {
    expect(rollout(flat, trestle, netShape, params, { ...base, traceEvery: 0 }).trace).toBeUndefined();
  });
});
