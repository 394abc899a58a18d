/**
 * Novelty as the mean distance to the k nearest references (novelty search, Lehman & Stanley
 * 2011), and the performance profile used by the 'profile' novelty measure.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { knnNovelty, performanceProfile } from '../../src/coevo/index.js';

/** Euclidean distance written out from its definition, independent of the core helper. */
function euclid(a: readonly number[], b: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i] - b[i]) ** 2;
  return Math.sqrt(s);
}

/** Brute force: every distance, sorted, the k smallest averaged (all of them when fewer than k). */
function bruteNovelty(p: readonly number[], refs: readonly (readonly number[])[], k: number): number {
  if (refs.length === 0) return 0;
  const d = refs.map((r) => euclid(p, r)).sort((x, y) => x - y).slice(0, k);
  return d.reduce((x, y) => x + y, 0) / d.length;
}

const coord = fc.double({ min: -100, max: 100, noNaN: true, noDefaultInfinity: true });
const pointsOf = (dim: number) => fc.array(coord, { minLength: dim, maxLength: dim });
const problem = fc.integer({ min: 1, max: 6 }).chain((dim) =>
  fc.record({ point: pointsOf(dim), refs: fc.array(pointsOf(dim), { maxLength: 20 }), k: fc.integer({ min: 1, max: 10 }) }));

describe('knnNovelty', () => {
  it('matches a brute-force reference on random points (property)', () => {
    fc.assert(fc.property(problem, ({ point, refs, k }) => {
      const want = bruteNovelty(point, refs, k);
      expect(Math.abs(knnNovelty(point, refs, k) - want)).toBeLessThanOrEqual(1e-9 * Math.max(1, want));
    }), { numRuns: 300 });
  });

  it('is the mean distance to the k nearest: a 3-4-5 right triangle (Pythagoras)', () => {
    const refs = [[3, 4], [6, 8], [0, 1]];
    expect(knnNovelty([0, 0], refs, 1)).toBe(1);
    expect(knnNovelty([0, 0], refs, 2)).toBe(3); // (1 + 5) / 2
    expect(knnNovelty([0, 0], refs, 3)).toBe(16 / 3); // (1 + 5 + 10) / 3
  });

  it('averages over every reference when there are fewer than k, and is 0 with none', () => {
    expect(knnNovelty([0, 0], [[3, 4], [0, 2]], 5)).toBe(3.5);
    expect(knnNovelty([1, 2, 3], [], 4)).toBe(0);
  });

  it('is 0 for a point that copies at least k references', () => {
    expect(knnNovelty([1, 1], [[1, 1], [1, 1], [9, 9]], 2)).toBe(0);
  });

  it('never grows when references are added, once there are at least k (property)', () => {
    fc.assert(fc.property(problem, pointsOf(6), ({ point, refs, k }, extra) => {
      fc.pre(refs.length >= k);
      const more = [...refs, extra.slice(0, point.length)];
      expect(knnNovelty(point, more, k)).toBeLessThanOrEqual(knnNovelty(point, refs, k) + 1e-12);
    }));
  });
});

const progress = fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 1, maxLength: 12 });
const band = fc.tuple(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }))
  .filter(([a, b]) => a < b).map(([low, high]) => ({ low, high }));

describe('performanceProfile', () => {
  it('has one entry per walker, each in [-0.5, 0.5], summing to 0 (property)', () => {
    fc.assert(fc.property(progress, band, (p, { low, high }) => {
      const u = performanceProfile(p, low, high);
      expect(u).toHaveLength(p.length);
      for (const x of u) expect(Math.abs(x)).toBeLessThanOrEqual(0.5);
      expect(Math.abs(u.reduce((a, b) => a + b, 0))).toBeLessThanOrEqual(1e-12);
    }));
  });

  it('ignores differences outside [low, high] (property)', () => {
    // Moving each value to another point on the same side of the band changes nothing.
    fc.assert(fc.property(progress, band, fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 12, maxLength: 12 }), (p, { low, high }, r) => {
      const moved = p.map((x, i) => (x < low ? low * r[i] : x > high ? high + (1 - high) * r[i] : x));
      expect(performanceProfile(moved, low, high)).toEqual(performanceProfile(p, low, high));
    }));
  });

  it('orders walkers by progress inside the band (property)', () => {
    fc.assert(fc.property(progress, band, (p, { low, high }) => {
      const u = performanceProfile(p, low, high);
      for (let i = 0; i < p.length; i++) {
        for (let j = 0; j < p.length; j++) {
          const ci = Math.min(high, Math.max(low, p[i]));
          const cj = Math.min(high, Math.max(low, p[j]));
          if (ci < cj) expect(u[i]).toBeLessThan(u[j]);
          if (ci === cj) expect(u[i]).toBe(u[j]);
        }
      }
    }));
  });

  it('gives centred ranks of the clipped progress', () => {
    // Clipped to [0.2, 0.8]: 0.2, 0.5, 0.8 → ranks 0, 1, 2 of 3 → −0.5, 0, 0.5.
    expect(performanceProfile([0.1, 0.5, 0.95], 0.2, 0.8)).toEqual([-0.5, 0, 0.5]);
    // Both below the band tie at 0.2 and share ranks 0 and 1.
    expect(performanceProfile([0, 0.1, 0.5], 0.2, 0.8)).toEqual([-0.25, -0.25, 0.5]);
  });
});
