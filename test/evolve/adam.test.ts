import { describe, expect, it } from 'vitest';
import { adamAscent } from '../../src/evolve/index.js';

// Update rule of Kingma & Ba 2015, "Adam: A Method for Stochastic Optimization", Algorithm 1,
// written here for ascent: θ ← θ + α·m̂/(sqrt(v̂) + ε).
const s = { learningRate: 0.1, beta1: 0.9, beta2: 0.999, epsilon: 1e-8 };

describe('adamAscent', () => {
  it('takes a first step of about α in the direction of each gradient sign', () => {
    const r = adamAscent([1, 1], [0, 0], [0, 0], 0, [3, -0.001], s);
    // t = 1: m̂ = g, v̂ = g², so the step is α·g/(|g| + ε)
    expect(r.params[0]).toBeCloseTo(1 + 0.1 * 3 / (3 + 1e-8), 15);
    expect(r.params[1]).toBeCloseTo(1 - 0.1 * 0.001 / (0.001 + 1e-8), 15);
    expect(r.t).toBe(1);
  });

  it('matches the bias-corrected moments by hand on a second step', () => {
    const first = adamAscent([0], [0], [0], 0, [2], s);
    const second = adamAscent(first.params, first.m, first.v, first.t, [-1], s);
    const m = 0.9 * (0.1 * 2) + 0.1 * -1; // 0.08
    const v = 0.999 * (0.001 * 4) + 0.001 * 1; // 0.004996
    const step = 0.1 * (m / (1 - 0.9 ** 2)) / (Math.sqrt(v / (1 - 0.999 ** 2)) + 1e-8);
    expect(second.m[0]).toBeCloseTo(m, 15);
    expect(second.v[0]).toBeCloseTo(v, 15);
    expect(second.params[0]).toBeCloseTo(first.params[0] + step, 14);
    expect(second.t).toBe(2);
  });

  it('leaves its inputs untouched', () => {
    const p = [1, 2];
    const m = [0.1, 0.2];
    const v = [0.01, 0.02];
    adamAscent(p, m, v, 4, [1, 1], s);
    expect([p, m, v]).toEqual([[1, 2], [0.1, 0.2], [0.01, 0.02]]);
  });
});
