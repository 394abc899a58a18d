import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { canonicalJson } from '../../src/core/index.js';
import { buildCourse, groundHeightAt, type Course, type TerrainFamily, type TerrainGenome } from '../../src/terrain/index.js';
import { anyGenome, deepFreeze, FAMILIES, genome, mixed, starter } from './helpers.js';

/** build.ts's MIN_EDGE: consecutive ground points are at least this far apart, m. */
const MIN_EDGE = 0.01;
const RUNS = { numRuns: 100 };

type P = readonly [number, number];

function points(course: Course): P[] {
  const out: P[] = [];
  for (let i = 0; i < course.ground.length; i += 2) out.push([course.ground[i], course.ground[i + 1]]);
  return out;
}

/** z of (b − a) × (c − a): > 0 when a, b, c turn counter-clockwise (standard orientation test). */
function cross(a: P, b: P, c: P): number {
  return (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]);
}

function onSegment(a: P, b: P, p: P): boolean {
  return Math.min(a[0], b[0]) <= p[0] && p[0] <= Math.max(a[0], b[0]) && Math.min(a[1], b[1]) <= p[1] && p[1] <= Math.max(a[1], b[1]);
}

/**
 * Whether closed segments ab and cd share any point (touching and collinear overlap count),
 * by the orientation test found in computational-geometry textbooks (e.g. Cormen et al.,
 * "Introduction to Algorithms", SEGMENTS-INTERSECT, from memory).
 */
function segmentsIntersect(a: P, b: P, c: P, d: P): boolean {
  const d1 = cross(c, d, a);
  const d2 = cross(c, d, b);
  const d3 = cross(a, b, c);
  const d4 = cross(a, b, d);
  if (((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0))) return true;
  return (d1 === 0 && onSegment(c, d, a)) || (d2 === 0 && onSegment(c, d, b)) || (d3 === 0 && onSegment(a, b, c)) || (d4 === 0 && onSegment(a, b, d));
}

function withoutRoughness(g: TerrainGenome): TerrainGenome {
  return { ...g, roughness: { amplitude: 0, seed: g.roughness.seed } };
}

describe('segmentsIntersect (the test helper itself)', () => {
  it('finds crossings, touches and overlaps, and nothing between apart or parallel segments', () => {
    expect(segmentsIntersect([0, 0], [2, 2], [0, 2], [2, 0])).toBe(true);
    expect(segmentsIntersect([0, 0], [2, 0], [1, 0], [1, 5])).toBe(true);
    expect(segmentsIntersect([0, 0], [2, 0], [1, 0], [3, 0])).toBe(true);
    expect(segmentsIntersect([0, 0], [2, 0], [0, 1], [2, 1])).toBe(false);
    expect(segmentsIntersect([0, 0], [1, 0], [2, 0], [3, 0])).toBe(false);
    expect(segmentsIntersect([0, 0], [1, 1], [2, 0], [3, -5])).toBe(false);
  });
});

describe.each(FAMILIES)('buildCourse (%s family, properties)', (_, family) => {
  const arb = anyGenome(family);

  it('lays the ground left to right: x never decreases, from the back wall to past the finish', () => {
    fc.assert(
      fc.property(arb, (g) => {
        const p = points(buildCourse(g, family));
        expect(p.slice(0, 2)).toEqual([[-3, 3], [-3, 0]]);
        expect(p.findIndex((q, i) => i > 0 && q[0] < p[i - 1][0])).toBe(-1);
        expect(p[p.length - 1][0]).toBeGreaterThan(family.length);
      }),
      RUNS,
    );
  });

  it('keeps consecutive ground points at least MIN_EDGE apart', () => {
    fc.assert(
      fc.property(arb, (g) => {
        const p = points(buildCourse(g, family));
        const short = p.findIndex((q, i) => i > 0 && Math.hypot(q[0] - p[i - 1][0], q[1] - p[i - 1][1]) < MIN_EDGE);
        expect(short, `points ${short - 1} and ${short} are too close`).toBe(-1);
      }),
      RUNS,
    );
  });

  it('never lets the ground cross or touch itself: adjacent segments share only their common end', () => {
    fc.assert(
      fc.property(arb, (g) => {
        const p = points(buildCourse(g, family));
        for (let i = 0; i + 1 < p.length; i++) {
          for (let j = i + 2; j + 1 < p.length; j++) {
            if (segmentsIntersect(p[i], p[i + 1], p[j], p[j + 1])) throw new Error(`segments ${i} and ${j} meet: ${p[i]} ${p[i + 1]} / ${p[j]} ${p[j + 1]}`);
          }
        }
        // Adjacent segments: the shared end, and no fold back onto the previous segment.
        const fold = p.findIndex((q, i) => i + 2 < p.length && cross(q, p[i + 1], p[i + 2]) === 0 && onSegment(q, p[i + 1], p[i + 2]));
        expect(fold, `segment ${fold + 1} folds back onto segment ${fold}`).toBe(-1);
      }),
      { numRuns: 80 },
    );
  });

  it('keeps the start zone flat at height 0 (no feature, no bump)', () => {
    fc.assert(
      fc.property(arb, fc.double({ min: 0, max: 1, maxExcluded: true, noNaN: true }), (g, u) => {
        const course = buildCourse(g, family);
        const z = family.startZone;
        for (const x of [0, u * z, family.spawnX, z - 1e-6]) expect(groundHeightAt(course, x)).toBe(0);
        const p = points(course);
        // Every segment reaching into [0, startZone) lies at height 0 (x never decreases, so p[i] is its left end).
        const tilted = p.findIndex((q, i) => i + 1 < p.length && q[0] < z && p[i + 1][0] > 0 && (q[1] !== 0 || p[i + 1][1] !== 0));
        expect(tilted, `segment ${tilted} is not flat`).toBe(-1);
        expect(course.spawnGroundY).toBe(0);
      }),
      RUNS,
    );
  });

  it('makes every obstacle a convex counter-clockwise polygon between the start and finish zones', () => {
    fc.assert(
      fc.property(arb, (g) => {
        const course = buildCourse(g, family);
        expect(course.obstacles).toHaveLength(g.features.filter((f) => f.kind === 'block').length);
        for (const poly of course.obstacles) {
          const v: P[] = [];
          for (let i = 0; i < poly.length; i += 2) v.push([poly[i], poly[i + 1]]);
          expect(v.length).toBeGreaterThanOrEqual(3);
          // Convex and counter-clockwise: every other vertex lies strictly left of every edge.
          for (let i = 0; i < v.length; i++) {
            const a = v[i];
            const b = v[(i + 1) % v.length];
            for (let j = 0; j < v.length; j++) if (j !== i && j !== (i + 1) % v.length) expect(cross(a, b, v[j])).toBeGreaterThan(0);
          }
          for (const [x] of v) {
            expect(x).toBeGreaterThanOrEqual(family.startZone);
            expect(x).toBeLessThanOrEqual(family.length - family.finishZone);
          }
        }
      }),
      RUNS,
    );
  });

  it('is pure: the same genome gives the same course, and the genome is not changed', () => {
    fc.assert(
      fc.property(arb, (g) => {
        const copy = deepFreeze(structuredClone(g));
        const before = canonicalJson(copy);
        const a = buildCourse(copy, family);
        expect(buildCourse(structuredClone(g), family)).toEqual(a);
        expect(canonicalJson(copy)).toBe(before);
      }),
      RUNS,
    );
  });

  it('keeps roughness within ±amplitude of the smooth course', () => {
    fc.assert(
      fc.property(arb, (g) => {
        const rough = buildCourse(g, family);
        const smooth = buildCourse(withoutRoughness(g), family);
        const vertices = new Set(points(smooth).map((q) => q[0]));
        let worst = 0;
        for (const [x, y] of points(rough)) if (!vertices.has(x)) worst = Math.max(worst, Math.abs(y - groundHeightAt(smooth, x)));
        expect(worst).toBeLessThanOrEqual(g.roughness.amplitude + 1e-9);
      }),
      RUNS,
    );
  });

  it('reports the family geometry: start at spawnX, finish at length, the family friction', () => {
    const c = buildCourse(family.start, family);
    expect([c.startX, c.finishX, c.friction]).toEqual([family.spawnX, family.length, family.friction]);
  });
});

describe('buildCourse feature geometry (known values)', () => {
  // Positions up to 30 m: a longer copy of the mixed family, so these checks do not depend on the shipped length.
  const fam: TerrainFamily = { ...mixed, length: 40 };
  /** Step heights the builder keeps as a vertical face (steps under MIN_EDGE are smoothed, see below). */
  const fullStep = fc.double({ min: MIN_EDGE, max: 0.5, noNaN: true }).chain((a) => fc.constantFrom(a, -a));

  it('digs a pit of gapDepth under a gap, at the level where the gap sits', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.1, max: 1.2, noNaN: true }),
        fc.double({ min: 8, max: 30, noNaN: true }),
        fc.oneof(fc.constant(0), fullStep),
        (w, x, h) => {
          const course = buildCourse(genome([{ kind: 'step', x: 5, height: h }, { kind: 'gap', x, width: w }]), fam);
          expect(groundHeightAt(course, x + w / 2)).toBeCloseTo(h - fam.gapDepth, 12);
          expect(groundHeightAt(course, x - 0.5)).toBeCloseTo(h, 12);
          expect(groundHeightAt(course, x + w + 0.5)).toBeCloseTo(h, 12);
        },
      ),
      RUNS,
    );
  });

  it('changes the ground level by h at a step of height h (|h| ≥ MIN_EDGE)', () => {
    fc.assert(
      fc.property(fullStep, fc.double({ min: 5, max: 30, noNaN: true }), (h, x) => {
        const course = buildCourse(genome([{ kind: 'step', x, height: h }]), fam);
        expect(groundHeightAt(course, x - 1)).toBe(0);
        expect(groundHeightAt(course, x + 1)).toBeCloseTo(h, 12);
        expect(groundHeightAt(course, fam.length)).toBeCloseTo(h, 12);
      }),
      RUNS,
    );
  });

  it('spreads a step under MIN_EDGE over the ground after it, never before it', () => {
    fc.assert(
      fc.property(fc.double({ min: -MIN_EDGE, max: MIN_EDGE, noNaN: true }), fc.double({ min: 5, max: 20, noNaN: true }), (h, x) => {
        const course = buildCourse(genome([{ kind: 'step', x, height: h }, { kind: 'gap', x: 25, width: 0.5 }]), fam);
        for (const before of [x / 2, x - 0.001]) expect(groundHeightAt(course, before)).toBe(0);
        const after = groundHeightAt(course, (x + 25) / 2);
        expect(Math.abs(after)).toBeLessThanOrEqual(Math.abs(h));
        expect(groundHeightAt(course, 24.999)).toBeCloseTo(h, 4);
        expect(groundHeightAt(course, 25.25)).toBeCloseTo(h - fam.gapDepth, 12);
      }),
      RUNS,
    );
  });

  it('raises the ground by g·L over a slope of grade g and length L, linearly', () => {
    fc.assert(
      fc.property(fc.double({ min: -0.5, max: 0.5, noNaN: true }), fc.double({ min: 1, max: 6, noNaN: true }), (g, len) => {
        const x = 10;
        const course = buildCourse(genome([{ kind: 'slope', x, length: len, grade: g }]), fam);
        expect(groundHeightAt(course, x)).toBeCloseTo(0, 12);
        expect(groundHeightAt(course, x + len / 2)).toBeCloseTo((g * len) / 2, 12);
        expect(groundHeightAt(course, x + len)).toBeCloseTo(g * len, 12);
        expect(groundHeightAt(course, x + len + 1)).toBeCloseTo(g * len, 12);
      }),
      RUNS,
    );
  });

  it('stands a block width × height on the ground, with flat ground under it', () => {
    const course = buildCourse(genome([{ kind: 'step', x: 5, height: 0.2 }, { kind: 'block', x: 8, width: 1, height: 0.3 }]), fam);
    expect(course.obstacles).toHaveLength(1);
    const poly = course.obstacles[0];
    const xs = poly.filter((_, i) => i % 2 === 0);
    const ys = poly.filter((_, i) => i % 2 === 1);
    expect([Math.min(...xs), Math.max(...xs)]).toEqual([8, 9]);
    expect(Math.max(...ys)).toBeCloseTo(0.5, 12);
    expect(Math.min(...ys)).toBeLessThan(0.2); // sunk into the ground, so nothing passes beneath it
    expect(groundHeightAt(course, 8.5)).toBeCloseTo(0.2, 12);
  });

  it('gives a flat course for the empty genome without roughness', () => {
    const course = buildCourse(starter.start, starter);
    for (const x of [0, 5, 15, 29.9, 35]) expect(groundHeightAt(course, x)).toBe(0);
    expect(course.obstacles).toEqual([]);
  });
});
