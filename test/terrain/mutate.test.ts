import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { canonicalJson, restoreStream, stream } from '../../src/core/index.js';
import { KINDS, mutate, parseFamily, validateGenome, type TerrainGenome } from '../../src/terrain/index.js';
import { anyGenome, deepFreeze, FAMILIES, mutationChain, rawFamily, starter } from './helpers.js';

describe.each(FAMILIES)('mutate (%s family)', (_, family) => {
  it('keeps every genome along a chain of mutations valid and within maxFeatures (property)', () => {
    fc.assert(
      fc.property(anyGenome(family), fc.nat(), fc.integer({ min: 1, max: 15 }), (start, seed, n) => {
        const s = stream(seed, 'test/mutate/chain');
        let g = start;
        for (let i = 0; i < n; i++) {
          g = mutate(g, family, s);
          expect(validateGenome(g, family)).toEqual([]);
          expect(g.features.length).toBeLessThanOrEqual(family.maxFeatures);
        }
      }),
      { numRuns: 120 },
    );
  });

  it('gives the identical child for the same stream seed, and leaves the parent untouched (property)', () => {
    fc.assert(
      fc.property(anyGenome(family), fc.nat(), (g, seed) => {
        const parent = deepFreeze(structuredClone(g));
        const before = canonicalJson(parent);
        const a = mutate(parent, family, stream(seed, 'test/mutate/same'));
        const b = mutate(parent, family, stream(seed, 'test/mutate/same'));
        expect(canonicalJson(a)).toBe(canonicalJson(b));
        expect(canonicalJson(parent)).toBe(before);
      }),
      { numRuns: 150 },
    );
  });

  it('continues identically from a saved stream state', () => {
    const s = stream(11, 'test/mutate/resume');
    const g1 = mutate(family.start, family, s);
    const saved = s.state();
    const g2 = mutate(g1, family, s);
    expect(canonicalJson(mutate(g1, family, restoreStream(saved)))).toBe(canonicalJson(g2));
  });

  it('usually gives different children for different seeds, and children that differ from the parent', () => {
    const parent = mutationChain(family, 5, 30);
    const children = Array.from({ length: 60 }, (_, seed) => canonicalJson(mutate(parent, family, stream(seed, 'test/mutate/differ'))));
    expect(new Set(children).size).toBeGreaterThanOrEqual(54);
    expect(children.filter((c) => c === canonicalJson(parent)).length).toBeLessThanOrEqual(3);
  });

  it('grows complexity: chains from the empty start genome add features (property)', () => {
    expect(family.start.features).toHaveLength(0);
    fc.assert(
      fc.property(fc.nat(), (seed) => {
        const s = stream(seed, 'test/mutate/grow');
        let g = family.start;
        let most = 0;
        for (let i = 0; i < 80; i++) {
          g = mutate(g, family, s);
          most = Math.max(most, g.features.length);
        }
        expect(most).toBeGreaterThanOrEqual(2);
        expect(most).toBeLessThanOrEqual(family.maxFeatures);
      }),
      { numRuns: 30 },
    );
  });

  it('over a long chain uses every kind the family allows, and reaches maxFeatures without passing it', () => {
    const seen = new Set<string>();
    let most = 0;
    for (let seed = 0; seed < 6; seed++) {
      const s = stream(seed, 'test/mutate/kinds');
      let g = family.start;
      for (let i = 0; i < 300; i++) {
        g = mutate(g, family, s);
        for (const f of g.features) seen.add(f.kind);
        most = Math.max(most, g.features.length);
      }
    }
    expect([...seen].sort()).toEqual(Object.keys(family.kinds).sort());
    expect(most).toBe(family.maxFeatures);
  });

  it('starts a new feature near its easiest setting (within newFeatureSpan of the value closest to 0)', () => {
    let checked = 0;
    for (let seed = 0; checked < 40 && seed < 400; seed++) {
      const child = mutate(family.start, family, stream(seed, 'test/mutate/new'));
      if (child.features.length !== 1) continue;
      const f = child.features[0];
      for (const field of KINDS[f.kind].fields) {
        const r = family.kinds[f.kind]![field];
        const easiest = Math.min(Math.max(0, r.min), r.max);
        expect(Math.abs((f[field] as number) - easiest)).toBeLessThanOrEqual(family.mutation.newFeatureSpan * (r.max - r.min) + 1e-12);
      }
      checked++;
    }
    expect(checked).toBe(40);
  });
});

describe('mutate (edge families)', () => {
  it('works for a family that allows no feature kinds: features stay empty, roughness still evolves', () => {
    // Regression: adding a feature used to pick a kind from an empty list and throw a TypeError.
    const j = rawFamily('starter');
    j.kinds = {};
    const family = parseFamily(j, 'roughness-only');
    const s = stream(3, 'test/mutate/no-kinds');
    let g: TerrainGenome = family.start;
    const amplitudes = new Set<number>();
    for (let i = 0; i < 50; i++) {
      g = mutate(g, family, s);
      expect(validateGenome(g, family)).toEqual([]);
      expect(g.features).toHaveLength(0);
      amplitudes.add(g.roughness.amplitude);
    }
    expect(amplitudes.size).toBeGreaterThan(10);
  });

  it('never adds features to a family with maxFeatures 0', () => {
    const j = rawFamily('starter');
    j.maxFeatures = 0;
    const family = parseFamily(j, 'flat');
    let g: TerrainGenome = family.start;
    const s = stream(4, 'test/mutate/max0');
    for (let i = 0; i < 50; i++) g = mutate(g, family, s);
    expect(g.features).toHaveLength(0);
    expect(validateGenome(g, family)).toEqual([]);
  });

  it('repairs a shifted layout: features stay ordered and spaced even when moves are large', () => {
    const j = rawFamily('starter');
    j.mutation.shiftProbability = 1;
    j.mutation.shift = 20;
    const family = parseFamily(j, 'shifty');
    fc.assert(
      fc.property(anyGenome(starter), fc.nat(), (g, seed) => {
        const child = mutate(g, family, stream(seed, 'test/mutate/shift'));
        expect(validateGenome(child, family)).toEqual([]);
      }),
      { numRuns: 150 },
    );
  });
});
