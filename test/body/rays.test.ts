/**
 * CourseRays against the reference: planck's own `world.rayCast` on the same course built into
 * a world by `addCourse` (ground as a chain, blocks as polygons).
 *
 * planck 1.3.0's edge (and so chain) ray cast is two-sided: EdgeShape.rayCast only flips the
 * reported normal by side (read from node_modules/planck-js/dist/planck.mjs), so a ray meets
 * the ground polyline from either side. Its polygon ray cast, though, reports nothing for a ray
 * that starts inside the polygon, while CourseRays would report the exit face. Rays here
 * therefore start strictly above the ground and above every block, which is also the only
 * place a walker's torso can be.
 */
import { World, type Fixture, Vec2 } from 'planck-js';
import { describe, expect, it } from 'vitest';
import { stream, type Stream } from '../../src/core/index.js';
import { CourseRays } from '../../src/body/index.js';
import { addCourse } from '../../src/sim/index.js';
import { buildCourse, groundHeightAt, loadFamily, mutate, type Course, type TerrainGenome } from '../../src/terrain/index.js';

// A longer copy of the mixed family (40 m, up to 16 features) gives every lineage room for all kinds.
const family = { ...loadFamily(new URL('../../envs/terrain/mixed.json', import.meta.url).pathname), length: 40, maxFeatures: 16 };

/** A genome after `generations` mutations of the family's start, one labelled stream each. */
function evolved(lineage: number, generations: number): TerrainGenome {
  let g = family.start;
  for (let i = 0; i < generations; i++) g = mutate(g, family, stream(lineage, `test/rays/${lineage}/${i}`));
  return g;
}

/** Closest hit fraction along p1→p2 as planck reports it (1 when nothing is hit), and what was hit. */
function reference(world: World, ox: number, oy: number, ex: number, ey: number): { fraction: number; fixture: Fixture | null } {
  let fraction = 1;
  let fixture: Fixture | null = null;
  world.rayCast(Vec2(ox, oy), Vec2(ex, ey), (f, _point, _normal, t) => {
    if (t < fraction) {
      fraction = t;
      fixture = f;
    }
    return t; // clip the ray here: only closer hits are reported after this one
  });
  return { fraction, fixture };
}

/** Highest solid point at `x`: the ground or the top of a block standing there, m. */
function surfaceAt(course: Course, x: number): number {
  let top = groundHeightAt(course, x);
  for (const p of course.obstacles) {
    const xs = p.filter((_, i) => i % 2 === 0);
    const ys = p.filter((_, i) => i % 2 === 1);
    if (x >= Math.min(...xs) && x <= Math.max(...xs)) top = Math.max(top, ...ys);
  }
  return top;
}

/** A random ray start 0.3–2 m above the surface; half of them near a block when there is one. */
function origin(course: Course, s: Stream): [number, number] {
  let x: number;
  if (course.obstacles.length > 0 && s.next() < 0.5) {
    const p = course.obstacles[s.int(course.obstacles.length)];
    x = s.uniform(p[0] - 2, p[2] + 2);
  } else {
    x = s.uniform(-2.9, family.length + 9.9); // the ground spans −3 m to length + 10 m
  }
  return [x, surfaceAt(course, x) + s.uniform(0.3, 2)];
}

describe('CourseRays.cast', () => {
  // The first four lineages whose course holds a block, so every course tests obstacle hits.
  const genomes: TerrainGenome[] = [];
  for (let lineage = 0; genomes.length < 4 && lineage < 50; lineage++) {
    const g = evolved(lineage, 40);
    if (g.features.some((f) => f.kind === 'block')) genomes.push(g);
  }

  it('uses courses with every feature kind, roughness and blocks', () => {
    expect(genomes).toHaveLength(4);
    const kinds = new Set(genomes.flatMap((g) => g.features.map((f) => f.kind)));
    expect([...kinds].sort()).toEqual(['block', 'gap', 'slope', 'step']);
    for (const g of genomes) expect(g.roughness.amplitude).toBeGreaterThan(0);
  });

  it.each(genomes.map((g, i) => [i, g] as const))('matches world.rayCast to 1e-9 on mutated course %i', (i, genome) => {
    const course = buildCourse(genome, family);
    const world = new World();
    addCourse(world, course);
    const rays = new CourseRays(course);
    const s = stream(i, 'test/rays/origins');
    const n = 1500;
    let hits = 0;
    let blockHits = 0;
    let worst = 0;
    for (let k = 0; k < n; k++) {
      const [ox, oy] = origin(course, s);
      // Three rays in four point below the horizon, as a walker's sensor fan does.
      const a = s.next() < 0.75 ? s.uniform(-Math.PI, 0) : s.uniform(0, Math.PI);
      const range = s.uniform(0.5, 6);
      const dx = Math.cos(a);
      const dy = Math.sin(a);
      const ours = rays.cast(ox, oy, dx, dy, range);
      const ref = reference(world, ox, oy, ox + dx * range, oy + dy * range);
      // Both solve the same line–segment intersection in double precision, in a different
      // order of operations (planck normalises the edge normal first), so they differ by a
      // few ulps of the coordinates (~1e-15); 1e-9 leaves room for that and nothing else.
      worst = Math.max(worst, Math.abs(ours - ref.fraction));
      if (ref.fraction < 1) hits++;
      if (ref.fixture !== null && (ref.fixture as Fixture).getShape().getType() === 'polygon') blockHits++;
    }
    expect(worst).toBeLessThanOrEqual(1e-9);
    // Most rays head down into the ground within range: the comparison is mostly between
    // hits, not between misses.
    expect(hits).toBeGreaterThan(0.4 * n);
    expect(blockHits).toBeGreaterThan(30);
  });
});

describe('CourseRays on known geometry (flat start course)', () => {
  const course = buildCourse(family.start, family);
  const rays = new CourseRays(course);

  it('reads height / range straight down onto flat ground', () => {
    expect(rays.cast(1, 0.5, 0, -1, 2)).toBeCloseTo(0.25, 15);
    expect(rays.cast(10, 1.2, 0, -1, 4)).toBeCloseTo(0.3, 15);
  });

  it('reads the slant distance at 45° (flat ground: h·√2 / range)', () => {
    const d = Math.SQRT1_2;
    expect(rays.cast(0, 1, d, -d, 2 * Math.SQRT2)).toBeCloseTo(0.5, 14);
  });

  it('returns 1 when the ground is out of range, or the ray points up or along it', () => {
    expect(rays.cast(1, 0.5, 0, -1, 0.4)).toBe(1);
    expect(rays.cast(1, 0.5, 0, 1, 5)).toBe(1);
    expect(rays.cast(1, 0.5, 1, 0, 5)).toBe(1);
  });

  it('hits the back wall at x = −3 m from in front of it', () => {
    expect(rays.cast(0, 1, -1, 0, 6)).toBeCloseTo(0.5, 15);
  });

  it('reaches the pit floor through a gap and stops on a block top', () => {
    const genome: TerrainGenome = {
      roughness: { amplitude: 0, seed: 0 },
      features: [
        { kind: 'gap', x: 10, width: 1 },
        { kind: 'block', x: 15, width: 1, height: 0.3 },
      ],
    };
    const r = new CourseRays(buildCourse(genome, family));
    // The pit floor lies family.gapDepth (2 m) below the ground: 3 m down from y = 1.
    expect(r.cast(10.5, 1, 0, -1, 4)).toBeCloseTo(3 / 4, 15);
    // The block top is 0.3 m high: 0.7 m down from y = 1.
    expect(r.cast(15.5, 1, 0, -1, 4)).toBeCloseTo(0.7 / 4, 15);
    // Level with the block's middle, a ray from the left meets its face at x = 15.
    expect(r.cast(13, 0.15, 1, 0, 4)).toBeCloseTo(2 / 4, 15);
  });
});
