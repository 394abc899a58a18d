import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { canonicalJson, stream } from '../../src/core/index.js';
import {
  ask, candidate, defaultEsConfig, esStep, estimateGradient, initEsState, tell, type EsConfig, type EsState,
} from '../../src/evolve/index.js';

const dot = (a: ArrayLike<number>, b: ArrayLike<number>): number => {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
};
const cosine = (a: ArrayLike<number>, b: ArrayLike<number>): number => dot(a, b) / Math.sqrt(dot(a, a) * dot(b, b));
const sphere = (x: ArrayLike<number>): number => dot(x, x);

function deepFreeze<T>(o: T): T {
  if (typeof o === 'object' && o !== null) {
    for (const v of Object.values(o)) deepFreeze(v);
    Object.freeze(o);
  }
  return o;
}

/** Evaluates the mirrored pairs of `seeds` around `mean` on `f`. */
function evaluatePairs(mean: readonly number[], seeds: number[], sigma: number, f: (x: Float64Array) => number) {
  return {
    plus: seeds.map((s) => f(candidate(mean, s, 1, sigma))),
    minus: seeds.map((s) => f(candidate(mean, s, -1, sigma))),
  };
}

describe('ask', () => {
  const cfg = defaultEsConfig();

  it('draws one uint32 seed per mirrored pair (half the population) and advances the stream', () => {
    const s0 = initEsState([0, 0, 0], stream(1, 'es'));
    const a = ask(s0, cfg);
    expect(a.seeds).toHaveLength(cfg.population / 2);
    for (const s of a.seeds) expect(Number.isInteger(s) && s >= 0 && s < 2 ** 32).toBe(true);
    expect(canonicalJson(ask(s0, cfg))).toBe(canonicalJson(a));
    expect(ask(a.state, cfg).seeds).not.toEqual(a.seeds);
  });

  it('never mutates the state it is given', () => {
    const s0 = deepFreeze(initEsState([1, 2], stream(2, 'es')));
    const before = canonicalJson(s0);
    const a = ask(s0, cfg);
    const f = evaluatePairs(a.state.mean, a.seeds, cfg.sigma, sphere);
    tell(deepFreeze(a.state), cfg, a.seeds, f.plus, f.minus);
    expect(canonicalJson(s0)).toBe(before);
  });
});

describe('tell', () => {
  it('estimates the direction of a linear objective f(x) = c·x (property)', () => {
    // E[(f(θ+σε) − f(θ−σε)) ε] ∝ c for a linear f, and ranks are monotone in f, so the estimate
    // must align with c. 500 mirrored pairs in 8 dimensions: observed cosines are above 0.98.
    const c8 = fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 8, maxLength: 8 })
      .filter((c) => Math.sqrt(dot(c, c)) > 0.1);
    fc.assert(fc.property(c8, fc.nat(), (c, seed) => {
      const cfg: EsConfig = { ...defaultEsConfig(), population: 1000, sigma: 0.1 };
      const s0 = initEsState(new Array<number>(8).fill(0.5), stream(seed, 'es'));
      const a = ask(s0, cfg);
      const f = evaluatePairs(s0.mean, a.seeds, cfg.sigma, (x) => dot(c, x));
      expect(cosine(estimateGradient(a.seeds, f.plus, f.minus, cfg.sigma, 8), c)).toBeGreaterThan(0.95);
      const next = tell(a.state, { ...cfg, weightDecay: 0 }, a.seeds, f.plus, f.minus);
      const moved = next.mean.map((m, i) => m - s0.mean[i]);
      expect(dot(moved, c)).toBeGreaterThan(0); // the first step goes uphill
    }), { numRuns: 25 });
  });

  it('does not move the mean when every fitness is equal and there is no weight decay', () => {
    const cfg = { ...defaultEsConfig(), weightDecay: 0 };
    const a = ask(initEsState([0.3, -0.7], stream(3, 'es')), cfg);
    const flat = new Array<number>(cfg.population / 2).fill(1);
    const next = tell(a.state, cfg, a.seeds, flat, flat);
    expect(next.mean).toEqual([0.3, -0.7]);
    expect(next.t).toBe(1);
  });

  it('shrinks the mean by weight decay alone when fitness carries no signal', () => {
    const cfg = defaultEsConfig();
    const a = ask(initEsState([0.3, -0.7], stream(3, 'es')), cfg);
    const failed = new Array<number>(cfg.population / 2).fill(NaN);
    const next = tell(a.state, cfg, a.seeds, failed, failed);
    expect(Math.abs(next.mean[0])).toBeLessThan(0.3);
    expect(Math.abs(next.mean[1])).toBeLessThan(0.7);
  });

  it('treats a NaN fitness as the worst outcome', () => {
    // Pair 0's plus side failed (NaN), its minus side scored the best: the update must move along −ε₀.
    const cfg: EsConfig = { ...defaultEsConfig(), population: 2, weightDecay: 0 };
    const a = ask(initEsState([0, 0, 0], stream(4, 'es')), cfg);
    const g = estimateGradient(a.seeds, [NaN], [-1e9], cfg.sigma, 3);
    const eps = candidate([0, 0, 0], a.seeds[0], 1, 1);
    expect(cosine(g, eps)).toBeCloseTo(-1, 12);
  });

  it('refuses a seed count that differs from half of config.population', () => {
    const cfg = defaultEsConfig();
    const s0 = initEsState([0], stream(5, 'es'));
    expect(() => tell(s0, cfg, [1, 2], [0, 0], [0, 0])).toThrow(/16 seeds/);
  });
});

describe('state round trip', () => {
  it('continues bit for bit from a state that went through canonical JSON', () => {
    const cfg = defaultEsConfig();
    const f = (x: Float64Array): number => -sphere(x.map((v, i) => v - i));
    let s: EsState = initEsState([0.1, -0.2, 0.3, 0.4, -0.5, 0.6], stream(6, 'es'));
    for (let i = 0; i < 3; i++) s = esStep(s, cfg, f).state;
    let restored = JSON.parse(canonicalJson(s)) as EsState;
    for (let i = 0; i < 3; i++) {
      const a = ask(s, cfg);
      const b = ask(restored, cfg);
      expect(b.seeds).toEqual(a.seeds);
      const fa = evaluatePairs(a.state.mean, a.seeds, cfg.sigma, f);
      const fb = evaluatePairs(b.state.mean, b.seeds, cfg.sigma, f);
      s = tell(a.state, cfg, a.seeds, fa.plus, fa.minus);
      restored = tell(b.state, cfg, b.seeds, fb.plus, fb.minus);
      expect(canonicalJson(restored)).toBe(canonicalJson(s));
    }
    expect(s.t).toBe(6);
  });

  it('gives esStep the same result as ask, candidate and tell by hand', () => {
    const cfg = defaultEsConfig();
    const s0 = initEsState([1, 2, 3], stream(7, 'es'));
    const a = ask(s0, cfg);
    const f = evaluatePairs(s0.mean, a.seeds, cfg.sigma, sphere);
    const step = esStep(s0, cfg, sphere);
    expect(step.fitnessPlus).toEqual(f.plus);
    expect(step.fitnessMinus).toEqual(f.minus);
    expect(canonicalJson(step.state)).toBe(canonicalJson(tell(a.state, cfg, a.seeds, f.plus, f.minus)));
  });
});
