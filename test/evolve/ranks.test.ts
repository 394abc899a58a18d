import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { centredRanks } from '../../src/evolve/index.js';

// Centred-rank shaping as described by Salimans et al. 2017 (ES as a scalable alternative to RL):
// ranks scaled to [-0.5, 0.5].
const fitness = fc.array(fc.oneof(fc.double(), fc.constantFrom(NaN, Infinity, -Infinity, 0, 1)), { maxLength: 80 });

describe('centredRanks', () => {
  it('maps the worst to −0.5, the best to +0.5 and evenly between', () => {
    expect(centredRanks([3, 1, 2])).toEqual([0.5, -0.5, 0]);
    expect(centredRanks([10, -5, 7, 0, 2])).toEqual([0.5, -0.5, 0.25, -0.25, 0]);
  });

  it('gives ties the mean of the ranks they span', () => {
    // ranks 0,1 → 0.5 and 2,3 → 2.5, over n − 1 = 3
    const u = centredRanks([1, 2, 1, 2]);
    [-1 / 3, 1 / 3, -1 / 3, 1 / 3].forEach((want, i) => expect(u[i]).toBeCloseTo(want, 15));
    expect(centredRanks([4, 4, 4])).toEqual([0, 0, 0]);
  });

  it('gives a single entry 0 and an empty list nothing', () => {
    expect(centredRanks([7])).toEqual([0]);
    expect(centredRanks([])).toEqual([]);
  });

  it('ranks NaN and infinities below every finite fitness', () => {
    const u = centredRanks([NaN, -1e300, Infinity, 5, -Infinity]);
    // three non-finite entries share ranks 0..2 (mean 1); −1e300 is rank 3, 5 is rank 4
    expect(u).toEqual([-0.25, 0.25, -0.25, 0.5, -0.25]);
  });

  it('sums to zero and stays in [-0.5, 0.5] (property)', () => {
    fc.assert(fc.property(fitness, (f) => {
      const u = centredRanks(f);
      expect(u).toHaveLength(f.length);
      expect(Math.abs(u.reduce((a, b) => a + b, 0))).toBeLessThanOrEqual(1e-12);
      for (const x of u) {
        expect(x).toBeGreaterThanOrEqual(-0.5);
        expect(x).toBeLessThanOrEqual(0.5);
      }
    }));
  });

  it('puts a NaN at the bottom whatever else is there (property)', () => {
    fc.assert(fc.property(fc.array(fc.double({ noNaN: true, min: -1e9, max: 1e9 }), { minLength: 1, maxLength: 40 }),
      fc.nat(), (finite, at) => {
        const f = [...finite];
        const k = at % (f.length + 1);
        f.splice(k, 0, NaN);
        const u = centredRanks(f);
        for (let i = 0; i < f.length; i++) if (i !== k) expect(u[k]).toBeLessThan(u[i]);
        expect(u[k]).toBe(-0.5);
      }));
  });

  it('is equivariant under permutation, so ties never depend on position (property)', () => {
    fc.assert(fc.property(fitness.chain((f) => fc.tuple(fc.constant(f), fc.shuffledSubarray(f.map((_, i) => i), { minLength: f.length, maxLength: f.length }))),
      ([f, perm]) => {
        const u = centredRanks(f);
        const up = centredRanks(perm.map((i) => f[i]));
        perm.forEach((i, j) => expect(up[j]).toBe(u[i]));
      }));
  });
});
