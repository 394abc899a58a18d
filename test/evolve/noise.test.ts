import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { candidate, perturbation } from '../../src/evolve/index.js';

const seed = fc.integer({ min: 0, max: 0xffffffff });
const vector = fc.array(fc.double({ min: -100, max: 100, noNaN: true }), { minLength: 1, maxLength: 30 });

describe('perturbation', () => {
  it('is rebuilt identically from its seed alone, and longer vectors extend shorter ones', () => {
    const a = perturbation(123, 10);
    expect(Array.from(perturbation(123, 10))).toEqual(Array.from(a));
    expect(Array.from(perturbation(123, 4))).toEqual(Array.from(a.subarray(0, 4)));
    expect(Array.from(perturbation(124, 10))).not.toEqual(Array.from(a));
  });

  it('writes into a caller buffer', () => {
    const buf = new Float64Array(6);
    expect(perturbation(5, 6, buf)).toBe(buf);
    expect(Array.from(buf)).toEqual(Array.from(perturbation(5, 6)));
  });

  it('has the moments of a standard normal', () => {
    const n = 40_000;
    const e = perturbation(77, n);
    const mean = e.reduce((a, b) => a + b, 0) / n;
    const variance = e.reduce((a, b) => a + (b - mean) ** 2, 0) / n;
    // Standard errors: 1/sqrt(n) = 0.005 for the mean, sqrt(2/n) ≈ 0.007 for the variance; bounds ≈ 4 s.e.
    expect(Math.abs(mean)).toBeLessThan(0.02);
    expect(Math.abs(variance - 1)).toBeLessThan(0.03);
  });
});

describe('candidate', () => {
  it('builds mirrored candidates that are exact negatives around a zero mean (property)', () => {
    fc.assert(fc.property(seed, fc.integer({ min: 1, max: 30 }), fc.double({ min: 1e-6, max: 10, noNaN: true }), (s, dim, sigma) => {
      const zero = new Array<number>(dim).fill(0);
      const plus = candidate(zero, s, 1, sigma);
      const minus = candidate(zero, s, -1, sigma);
      for (let i = 0; i < dim; i++) expect(plus[i]).toBe(-minus[i]);
    }));
  });

  it('builds mirrored candidates whose offsets from any mean cancel up to rounding (property)', () => {
    // (mean + d) − mean is d only up to one rounding of the sum, so around a non-zero mean the two
    // offsets are negatives of each other to within a few ulps of the operands, not bit for bit.
    fc.assert(fc.property(seed, vector, fc.double({ min: 1e-6, max: 10, noNaN: true }), (s, mean, sigma) => {
      const eps = perturbation(s, mean.length);
      const plus = candidate(mean, s, 1, sigma);
      const minus = candidate(mean, s, -1, sigma);
      for (let i = 0; i < mean.length; i++) {
        const scale = Math.abs(mean[i]) + Math.abs(sigma * eps[i]);
        expect(Math.abs((plus[i] - mean[i]) + (minus[i] - mean[i]))).toBeLessThanOrEqual(4 * Number.EPSILON * scale);
        expect(Math.abs(plus[i] - mean[i] - sigma * eps[i])).toBeLessThanOrEqual(2 * Number.EPSILON * scale);
      }
    }));
  });
});
