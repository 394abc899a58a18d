/**
 * Checks that cairn's physics settings and its use of planck-js (SI units, gravity along −y,
 * friction mixing, revolute joints and motors) reproduce textbook mechanics.
 *
 * Handbook source throughout: D. Halliday, R. Resnick, J. Walker, "Fundamentals of Physics"
 * (HRW below; chapter numbers cited from memory).
 *
 * planck, like Box2D, integrates with semi-implicit (symplectic) Euler — v += g·dt first, then
 * x += v·dt (read from planck 1.3.0's Solver.solveIsland). Velocity under a constant force is
 * therefore exact, while position after n steps is g·dt²·n(n+1)/2 = ½·g·t² + ½·g·dt·t: it runs
 * ahead of the exact parabola by ½·g·dt·t. Several tolerances below are built from that lag.
 * planck also caps a body's travel at Settings.maxTranslation = 2 m per step (100 m/s at
 * dt = 1/50 s); every speed here stays far below that cap.
 */
import { describe, expect, it } from 'vitest';
import { Box, Circle, RevoluteJoint, Vec2, type Body, type World } from 'planck-js';
import {
  defaultPhysics,
  makeWorld,
  stepWorld,
  type PhysicsSettings,
} from '../../src/sim/physics.js';

const DEG = Math.PI / 180;

function run(world: World, settings: PhysicsSettings, steps: number): void {
  for (let i = 0; i < steps; i++) stepWorld(world, settings);
}

/** A free 0.2 m square (density 1 kg/m²) at `(x, y)`, undamped. */
function addFreeBox(world: World, x: number, y: number): Body {
  const body = world.createBody({ type: 'dynamic', position: Vec2(x, y), linearDamping: 0 });
  body.createFixture({ shape: new Box(0.1, 0.1), density: 1 });
  return body;
}

describe('free fall (HRW ch. 2, constant acceleration: y = −½·g·t², v = −g·t)', () => {
  // The defaults; a step 8× smaller, to show the handbook error shrinking in proportion; and
  // lunar gravity (1.62 m/s², from memory), to show the world takes g from the settings.
  it.each([
    ['defaults', defaultPhysics()],
    ['dt = 1/400 s', { ...defaultPhysics(), timeStep: 1 / 400 }],
    ['g = 1.62 m/s²', { ...defaultPhysics(), gravity: 1.62 }],
  ])('falls ½·g·t² in 2 s (%s), within the Euler lag', (_label, s) => {
    const world = makeWorld(s);
    const body = addFreeBox(world, 0, 0);
    const n = Math.round(2 / s.timeStep);
    run(world, s, n);
    const t = n * s.timeStep;
    const fallen = -body.getPosition().y;
    // Handbook formula: the symplectic-Euler lag ½·g·dt·t (0.196 m at dt = 1/50 s, 8× less at
    // 1/400 s) is the whole expected error, so that is the tolerance (plus rounding).
    const lag = 0.5 * s.gravity * s.timeStep * t;
    expect(Math.abs(fallen - 0.5 * s.gravity * t * t)).toBeLessThanOrEqual(lag + 1e-9);
    // Exact discrete formula g·dt²·n(n+1)/2: only floating-point rounding over n additions
    // remains, so 1e-9 m catches a gravity off by even 1e-6 m/s².
    expect(fallen).toBeCloseTo((s.gravity * s.timeStep ** 2 * n * (n + 1)) / 2, 9);
    // Velocity under constant force is exact for semi-implicit Euler.
    expect(body.getLinearVelocity().y).toBeCloseTo(-s.gravity * t, 9);
    expect(body.getLinearVelocity().x).toBe(0);
  });
});

/** A static plank tilted by `theta` rad and a 0.5 m cube resting flush on it; returns the cube. */
function cubeOnIncline(
  world: World,
  theta: number,
  plankFriction: number,
  cubeFriction: number,
): Body {
  const plank = world.createBody({ type: 'static', position: Vec2(0, 0), angle: theta });
  plank.createFixture({ shape: new Box(20, 0.5), friction: plankFriction });
  // Cube centre 0.5 + 0.25 m above the plank's mid-line, along the plank's normal.
  const lift = 0.75;
  const position = Vec2(-Math.sin(theta) * lift, Math.cos(theta) * lift);
  const cube = world.createBody({ type: 'dynamic', position, angle: theta });
  cube.createFixture({ shape: new Box(0.25, 0.25), density: 10, friction: cubeFriction });
  return cube;
}

/** Velocity of `body` along the incline's uphill direction, m/s. */
function upSlopeSpeed(body: Body, theta: number): number {
  const v = body.getLinearVelocity();
  return v.x * Math.cos(theta) + v.y * Math.sin(theta);
}

describe('block on an incline (HRW ch. 6, Coulomb friction)', () => {
  // planck mixes fixture frictions as sqrt(μ1·μ2) (its mixFriction, as in Box2D). With 1.0 and
  // 0.16 the effective μ is 0.4, critical angle atan 0.4 = 21.8°. A ±3° margin separates the
  // rule from the alternatives: an arithmetic mean (0.58 → 30.1°) would hold the cube at
  // 24.8°, the minimum (0.16 → 9.1°) would let it slide at 18.8°.
  const plankFriction = 1.0;
  const cubeFriction = 0.16;
  const mu = Math.sqrt(plankFriction * cubeFriction);
  const critical = Math.atan(mu);

  it('stays put when tan θ < μ (θ = critical − 3°)', () => {
    const s = defaultPhysics();
    const theta = critical - 3 * DEG;
    const world = makeWorld(s);
    const cube = cubeOnIncline(world, theta, plankFriction, cubeFriction);
    const start = cube.getPosition().clone();
    run(world, s, Math.round(3 / s.timeStep));
    const d = Vec2.sub(cube.getPosition(), start);
    const along = d.x * Math.cos(theta) + d.y * Math.sin(theta);
    const normal = -d.x * Math.sin(theta) + d.y * Math.cos(theta);
    // Static friction balances the pull exactly, so there is no motion along the slope beyond
    // solver noise (measured 1e-7 m); planck's linear slop, Settings.linearSlop = 0.005 m, is
    // the scale below which it treats positions as equal. A sliding cube would move metres.
    expect(Math.abs(along)).toBeLessThan(0.005);
    // Across the slope the cube only settles into contact: both polygons carry a skin of
    // 2 × linearSlop and the solver leaves linearSlop of overlap, so it rises by up to 0.015 m.
    expect(normal).toBeGreaterThanOrEqual(0);
    expect(normal).toBeLessThan(0.0155);
    expect(cube.getLinearVelocity().length()).toBeLessThan(1e-6);
  });

  it.each([3, 13])('slides at a = g(sin θ − μ cos θ) when θ = critical + %i°', (margin) => {
    const s = defaultPhysics();
    const theta = critical + margin * DEG;
    const world = makeWorld(s);
    const cube = cubeOnIncline(world, theta, plankFriction, cubeFriction);
    const t1 = 1;
    const t2 = 3;
    run(world, s, Math.round(t1 / s.timeStep));
    const v1 = upSlopeSpeed(cube, theta);
    run(world, s, Math.round((t2 - t1) / s.timeStep));
    const v2 = upSlopeSpeed(cube, theta);
    const measured = -(v2 - v1) / (t2 - t1);
    const expected = s.gravity * (Math.sin(theta) - mu * Math.cos(theta));
    expect(v2).toBeLessThan(0);
    // Kinetic friction is applied as an impulse clamped at μ × the normal impulse, and a steady
    // slide is a fixed point of the iterative solver, so only its residue remains (measured
    // 1e-15 relative). 0.1 % resolves μ to about ±0.0006 at +3°, far finer than the gap to
    // the other mixing rules.
    expect(Math.abs(measured - expected)).toBeLessThan(1e-3 * expected);
  });
});

const ROD_HALF_WIDTH = 0.01;

/**
 * A uniform rod (length `length` m, 0.02 m thick, density 1 kg/m²) hanging from a revolute
 * joint at its top end at the origin, deflected by `theta0` rad from straight down; its body
 * angle is the deflection. Returns the rod.
 */
function rodPendulum(world: World, length: number, theta0: number): Body {
  const ground = world.createBody();
  const half = length / 2;
  const position = Vec2(half * Math.sin(theta0), -half * Math.cos(theta0));
  const rod = world.createBody({ type: 'dynamic', position, angle: theta0 });
  rod.createFixture({ shape: new Box(ROD_HALF_WIDTH, half), density: 1 });
  expect(world.createJoint(new RevoluteJoint({}, ground, rod, Vec2(0, 0)))).not.toBeNull();
  return rod;
}

/** Times (s) at which `angle()` changes sign over `steps` steps, linearly interpolated. */
function zeroCrossings(
  world: World,
  s: PhysicsSettings,
  steps: number,
  angle: () => number,
): number[] {
  const times: number[] = [];
  let before = angle();
  for (let i = 1; i <= steps; i++) {
    stepWorld(world, s);
    const after = angle();
    if (Math.sign(after) !== Math.sign(before) && after !== 0) {
      times.push((i - 1 + before / (before - after)) * s.timeStep);
    }
    before = after;
  }
  return times;
}

describe('physical pendulum (HRW ch. 15: T = 2π·sqrt(I / (m·g·h)))', () => {
  it('a uniform rod pivoted at one end swings with T = 2π·sqrt(2L / (3g))', () => {
    const s = defaultPhysics();
    const length = 1;
    const world = makeWorld(s);
    const rod = rodPendulum(world, length, 3 * DEG);
    // I about the end = m·L²/3 (HRW ch. 10 table, thin rod about its centre m·L²/12, plus the
    // parallel-axis term m·(L/2)²) and h = L/2 give T = 2π·sqrt(2L / (3g)) = 1.638 s at L = 1 m.
    const expected = 2 * Math.PI * Math.sqrt((2 * length) / (3 * s.gravity));
    const steps = Math.round((5.25 * expected) / s.timeStep);
    const crossings = zeroCrossings(world, s, steps, () => rod.getAngle());
    expect(crossings.length).toBeGreaterThanOrEqual(10);
    // Successive crossings are half a period apart.
    const last = crossings.length - 1;
    const measured = (2 * (crossings[last] - crossings[0])) / last;
    // Known departures from the handbook formula, all relative: symplectic Euler shortens the
    // period of a harmonic oscillator by (ω·dt)²/24 = 2.5e-4 at ω = 3.84 rad/s, dt = 1/50 s
    // (its discrete frequency solves 2·sin(ω'·dt/2) = ω·dt, derived); a 3° amplitude lengthens
    // it by θ0²/16 = 1.7e-4 (standard series, from memory); the rod's 0.02 m thickness adds
    // w²/(8·L²) = 5e-5; linear interpolation of crossings errs by O(dt²). Together under 5e-4
    // (measured −2e-5, the first two nearly cancelling); 0.1 % covers them, while a simple-
    // pendulum mistake (2π·sqrt(L/g), +22 %) or a wrong inertia fails. dt = 1/50 s suffices.
    expect(Math.abs(measured / expected - 1)).toBeLessThan(1e-3);
  });

  it('keeps the pivot point fixed within planck\'s linear slop', () => {
    const s = defaultPhysics();
    const world = makeWorld(s);
    const rod = rodPendulum(world, 1, 3 * DEG);
    let worst = 0;
    for (let i = 0; i < 200; i++) {
      stepWorld(world, s);
      worst = Math.max(worst, Vec2.lengthOf(rod.getWorldPoint(Vec2(0, 0.5))));
    }
    // planck's position solver tolerates joint errors up to Settings.linearSlop = 0.005 m.
    expect(worst).toBeLessThan(0.005);
  });
});

/**
 * Launches a free body from the origin at `speed` m/s and `angle` rad above horizontal with no
 * ground, and returns the x (m) at which it comes back to y = 0, linearly interpolated.
 */
function rangeOf(s: PhysicsSettings, speed: number, angle: number): number {
  const world = makeWorld(s);
  const body = addFreeBox(world, 0, 0);
  body.setLinearVelocity(Vec2(speed * Math.cos(angle), speed * Math.sin(angle)));
  let prev = body.getPosition().clone();
  for (let i = 0; i < 10_000; i++) {
    stepWorld(world, s);
    const p = body.getPosition();
    if (p.y < 0) return prev.x + ((p.x - prev.x) * prev.y) / (prev.y - p.y);
    prev = p.clone();
  }
  throw new Error('projectile never came back to launch height');
}

describe('projectile range (HRW ch. 4: R = v²·sin 2θ / g, no drag)', () => {
  const speed = 10;
  it.each([30, 45, 60])('lands at R = v²·sin 2θ / g when launched at %i°', (degrees) => {
    const s = defaultPhysics();
    const theta = degrees * DEG;
    const vx = speed * Math.cos(theta);
    const vy = speed * Math.sin(theta);
    const measured = rangeOf(s, speed, theta);
    const expected = (speed * speed * Math.sin(2 * theta)) / s.gravity;
    const dt = s.timeStep;
    // Symplectic Euler runs ½·g·dt·t ahead of the parabola (see header), so the body returns to
    // launch height one step early, dt sooner, and lands short by vx·dt (0.17 m at 30°). Linear
    // interpolation of a parabola of curvature g between samples dt apart errs by at most
    // g·dt²/8 in height; over the last step the body descends at no less than vy − 1.5·g·dt,
    // so the range errs by at most vx·(g·dt²/8)/(vy − 1.5·g·dt) (under 1e-3 m here).
    const interpolation = (vx * (s.gravity * dt * dt)) / 8 / (vy - 1.5 * s.gravity * dt);
    expect(Math.abs(measured - expected)).toBeLessThanOrEqual(vx * dt + interpolation);
    // Exact discrete landing point vx·(2·vy/g − dt): only the interpolation error remains.
    const discrete = vx * ((2 * vy) / s.gravity - dt);
    expect(Math.abs(measured - discrete)).toBeLessThanOrEqual(interpolation);
  });
});

/** Hinges `body` to the world at the origin with a motor: `speed` rad/s (CCW), `torque` N·m. */
function motorised(world: World, body: Body, speed: number, torque: number): Body {
  const ground = world.createBody();
  const opt = { enableMotor: true, motorSpeed: speed, maxMotorTorque: torque };
  expect(world.createJoint(new RevoluteJoint(opt, ground, body, Vec2(0, 0)))).not.toBeNull();
  return body;
}

/** A disc of radius `r` m and density 1 kg/m² centred on the origin. */
function disc(world: World, r: number): Body {
  const body = world.createBody({ type: 'dynamic', position: Vec2(0, 0) });
  body.createFixture({ shape: new Circle(r), density: 1 });
  return body;
}

/** A horizontal rod of length `length` m (density 1 kg/m²) with its left end at the origin. */
function horizontalRod(world: World, length: number): Body {
  const body = world.createBody({ type: 'dynamic', position: Vec2(length / 2, 0) });
  body.createFixture({ shape: new Box(length / 2, ROD_HALF_WIDTH), density: 1 });
  return body;
}

describe('revolute motor units (HRW ch. 10: τ = I·α, I_disc = ½·m·r², τ_gravity = m·g·L/2)', () => {
  it('turns at its commanded speed in rad/s when torque is ample', () => {
    const s = defaultPhysics();
    const world = makeWorld(s);
    const wheel = motorised(world, disc(world, 0.5), 3, 1000);
    run(world, s, Math.round(1 / s.timeStep));
    // 1000 N·m against I ≈ 0.1 kg·m² reaches 3 rad/s within the first step, so after 1 s the
    // wheel has turned 3 rad exactly (up to rounding); deg/s or rev/s would give 0.05 or 18.8.
    expect(wheel.getAngularVelocity()).toBeCloseTo(3, 9);
    expect(wheel.getAngle()).toBeCloseTo(3, 9);
  });

  it('spins a disc up at α = τ / (½·m·r²) when the torque limit binds', () => {
    const s = defaultPhysics();
    const world = makeWorld(s);
    const r = 0.5;
    const wheel = motorised(world, disc(world, r), 100, 0.05);
    const mass = Math.PI * r * r; // density 1 kg/m² × area
    expect(wheel.getMass()).toBeCloseTo(mass, 12);
    expect(wheel.getInertia()).toBeCloseTo(0.5 * mass * r * r, 12);
    const t = 0.5;
    run(world, s, Math.round(t / s.timeStep));
    // The motor's impulse is clamped at τ·dt per step and the disc is centred on the pivot, so
    // nothing else acts: ω = τ·t / I exactly (up to rounding). 100 rad/s is never reached.
    expect(wheel.getAngularVelocity()).toBeCloseTo((0.05 * t) / (0.5 * mass * r * r), 9);
  });

  const rodCase = 'turns a rod about its end at α = (τ − m·g·L/2)/(m·L²/3), τ = %f·m·g·L/2';
  it.each([1.05, 0.95])(rodCase, (factor) => {
    const s = defaultPhysics();
    const world = makeWorld(s);
    const length = 1;
    const rod = horizontalRod(world, length);
    // Gravity's torque about the end of a horizontal rod is m·g·L/2; I about the end is m·L²/3
    // (thin rod m·L²/12 plus parallel-axis m·(L/2)², HRW ch. 10).
    const holding = rod.getMass() * s.gravity * (length / 2);
    const speed = 0.5;
    motorised(world, rod, speed, factor * holding);
    const t = 0.1;
    run(world, s, Math.round(t / s.timeStep));
    const alpha = ((factor - 1) * holding) / ((rod.getMass() * length * length) / 3);
    // Net torque is only 5 % of gravity's, so 1 % of α resolves the torque balance to 0.05 %.
    // In 0.1 s the rod turns under 4e-3 rad (cos changes by < 1e-5) and the rod's 0.02 m
    // thickness adds 1e-4 to I; solver residue measured ~1e-4 relative.
    expect(Math.abs(rod.getAngularVelocity() / (alpha * t) - 1)).toBeLessThan(0.01);
    if (factor > 1) {
      // Gravity's torque only falls as the rod rises, so the motor reaches (in about 0.7 s) and
      // then holds the commanded 0.5 rad/s; 1e-4 rad/s allows the joint solver's residue
      // (measured ~2e-7).
      run(world, s, Math.round(2 / s.timeStep));
      expect(Math.abs(rod.getAngularVelocity() - speed)).toBeLessThan(1e-4);
    } else {
      // Short of m·g·L/2 the rod sags, although the motor pushes upward with all it has.
      run(world, s, Math.round(0.4 / s.timeStep));
      expect(rod.getAngularVelocity()).toBeLessThan(0);
      expect(rod.getAngle()).toBeLessThan(0);
    }
  });
});
