import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/index.js';
import { KINDS, parseGenome, validateGenome, type TerrainFamily } from '../../src/terrain/index.js';
import { anyGenome, FAMILIES, genome, mixed, starter } from './helpers.js';

/** Asserts that exactly one problem is reported and that it starts with `path` followed by a colon. */
function expectOnlyProblemAt(g: unknown, family: TerrainFamily, path: string, detail?: string): void {
  const problems = validateGenome(g, family);
  expect(problems).toHaveLength(1);
  expect(problems[0].startsWith(`${path}: `)).toBe(true);
  if (detail !== undefined) expect(problems[0]).toContain(detail);
}

const gap = (x: number, width: number) => ({ kind: 'gap', x, width });
const step = (x: number, height: number) => ({ kind: 'step', x, height });

describe('validateGenome accepts', () => {
  it.each(FAMILIES)("the %s family's start genome", (_, family) => {
    expect(validateGenome(family.start, family)).toEqual([]);
  });

  it('a hand-written genome with every kind of the mixed family', () => {
    const g = genome(
      [gap(5, 0.5), step(7, -0.3), { kind: 'block', x: 9, width: 1, height: 0.2 }, { kind: 'slope', x: 12, length: 3, grade: 0.25 }],
      0.05,
      123,
    );
    expect(validateGenome(g, mixed)).toEqual([]);
  });

  it('features at the exact limits: x = startZone, spacing = minSpacing, end = length − finishZone', () => {
    // starter: startZone 4, minSpacing 2, length − finishZone = 28
    const g = genome([gap(4, 0.5), gap(6.5, 1), step(9.5, 0.4), gap(27, 1)]);
    expect(validateGenome(g, starter)).toEqual([]);
  });

  it('a roughness seed of 2^31 − 1 but not 2^31', () => {
    expect(validateGenome(genome([], 0, 2 ** 31 - 1), starter)).toEqual([]);
    expectOnlyProblemAt(genome([], 0, 2 ** 31), starter, 'roughness.seed');
  });

  it.each(FAMILIES)('every generated genome of the %s family (property)', (_, family) => {
    fc.assert(fc.property(anyGenome(family), (g) => validateGenome(g, family).length === 0), { numRuns: 150 });
  });
});

describe('validateGenome rejects, naming the field path', () => {
  it('a gap wider than the family allows', () => {
    expectOnlyProblemAt(genome([gap(5, 0.5), gap(10, 1.5)]), starter, 'features[1].width', '1.5');
  });

  it('a field below its range and a roughness amplitude above its range', () => {
    expectOnlyProblemAt(genome([step(5, -0.41)]), starter, 'features[0].height');
    expectOnlyProblemAt(genome([], 0.07), starter, 'roughness.amplitude', '0.07');
  });

  it('an unknown kind, a kind the family does not allow, and a prototype name as a kind', () => {
    expectOnlyProblemAt(genome([gap(5, 0.5), { kind: 'hole', x: 8, width: 0.5 }]), starter, 'features[1].kind', 'hole');
    expectOnlyProblemAt(genome([{ kind: 'block', x: 5, width: 0.5, height: 0.1 }]), starter, 'features[0].kind', 'block');
    // Regression: "constructor" used to be looked up on Object.prototype and crash validation.
    expectOnlyProblemAt(genome([{ kind: 'constructor', x: 5 }]), starter, 'features[0].kind');
    expectOnlyProblemAt(genome([{ kind: 7, x: 5 }]), starter, 'features[0].kind');
  });

  it('an unknown field, in a feature, in roughness and at the top level', () => {
    expectOnlyProblemAt(genome([gap(5, 0.5), { ...gap(8, 0.5), depth: 1 }]), starter, 'features[1].depth');
    expectOnlyProblemAt({ roughness: { amplitude: 0, seed: 0, scale: 1 }, features: [] }, starter, 'roughness.scale');
    expectOnlyProblemAt({ roughness: { amplitude: 0, seed: 0 }, features: [], name: 'x' }, starter, 'name');
  });

  it('a missing field', () => {
    expectOnlyProblemAt(genome([gap(5, 0.5), { kind: 'gap', x: 8 }]), starter, 'features[1].width');
    expectOnlyProblemAt(genome([{ kind: 'gap', width: 0.5 }]), starter, 'features[0].x');
    expectOnlyProblemAt(genome([{ kind: 'block', x: 5, width: 0.5 }]), mixed, 'features[0].height');
    expectOnlyProblemAt({ roughness: { seed: 0 }, features: [] }, starter, 'roughness.amplitude');
    expectOnlyProblemAt({ roughness: { amplitude: 0, seed: 0 } }, starter, 'features');
    expectOnlyProblemAt({ features: [] }, starter, 'roughness');
  });

  it('a non-number or non-finite field', () => {
    expectOnlyProblemAt(genome([gap(5, NaN)]), starter, 'features[0].width');
    expectOnlyProblemAt(genome([{ kind: 'gap', x: '5', width: 0.5 }]), starter, 'features[0].x');
    expectOnlyProblemAt(genome([{ kind: 'gap', x: Infinity, width: 0.5 }]), starter, 'features[0].x');
  });

  it('features out of order', () => {
    expectOnlyProblemAt(genome([gap(10, 0.5), gap(6, 0.5)]), starter, 'features[1].x', '6');
  });

  it('features closer than minSpacing (2 m in starter)', () => {
    // first gap ends at 5.5, so the next may start at 7.5 at the earliest
    expectOnlyProblemAt(genome([gap(5, 0.5), gap(7.4, 0.5)]), starter, 'features[1].x', '7.4');
    expectOnlyProblemAt(genome([gap(5, 0.5), step(9, 0.1), step(10.9, 0.1)]), starter, 'features[2].x');
  });

  it('a feature inside the start zone', () => {
    expectOnlyProblemAt(genome([gap(3.9, 0.5)]), starter, 'features[0].x', 'startZone');
  });

  it('a feature reaching past length − finishZone', () => {
    // 27.5 + 0.6 = 28.1 > 30 − 2
    expectOnlyProblemAt(genome([gap(5, 0.5), gap(27.5, 0.6)]), starter, 'features[1]', '28.1');
    expectOnlyProblemAt(genome([step(28.5, 0.1)]), starter, 'features[0]');
  });

  it('too many features', () => {
    const nine = Array.from({ length: 9 }, (_, i) => step(4 + 2 * i, 0.1));
    expectOnlyProblemAt(genome(nine), starter, 'features', 'at most 8');
    expect(validateGenome(genome(nine.slice(0, 8)), starter)).toEqual([]);
  });

  it('a non-integer, negative or non-number roughness seed', () => {
    expectOnlyProblemAt(genome([], 0, 1.5), starter, 'roughness.seed', '1.5');
    expectOnlyProblemAt(genome([], 0, -1), starter, 'roughness.seed', '-1');
    expectOnlyProblemAt({ roughness: { amplitude: 0, seed: '3' }, features: [] }, starter, 'roughness.seed');
  });

  it('non-object input and non-object parts', () => {
    for (const bad of [null, undefined, 42, 'genome', [], true]) expectOnlyProblemAt(bad, starter, '(top level)');
    expectOnlyProblemAt({ roughness: [0, 0], features: [] }, starter, 'roughness');
    expectOnlyProblemAt({ roughness: { amplitude: 0, seed: 0 }, features: {} }, starter, 'features');
    expectOnlyProblemAt(genome([gap(5, 0.5), 3 as never]), starter, 'features[1]');
  });

  it('any one field pushed past its range, at the index and field pushed (property)', () => {
    const withFeature = fc
      .tuple(anyGenome(mixed), fc.nat(), fc.nat(), fc.boolean())
      .filter(([g]) => g.features.length > 0);
    fc.assert(
      fc.property(withFeature, ([g, i0, j0, above]) => {
        const i = i0 % g.features.length;
        const f = g.features[i];
        const field = KINDS[f.kind].fields[j0 % KINDS[f.kind].fields.length];
        const r = mixed.kinds[f.kind]![field];
        const bad = { ...f, [field]: above ? r.max + 0.01 : r.min - 0.01 };
        const features = g.features.map((h, k) => (k === i ? bad : h));
        expectOnlyProblemAt({ ...g, features }, mixed, `features[${i}].${field}`);
      }),
      { numRuns: 150 },
    );
  });
});

describe('parseGenome', () => {
  it('returns a valid genome and throws one UserError listing every problem with its location', () => {
    const ok = genome([gap(5, 0.5)]);
    expect(parseGenome(ok, starter, 'g.json')).toBe(ok);
    const bad = genome([gap(5, 0.5), gap(8, 2)], 1, -1);
    let err: unknown;
    try {
      parseGenome(bad, starter, 'g.json');
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(UserError);
    const problems = (err as UserError).problems;
    expect(problems).toHaveLength(3);
    for (const path of ['roughness.amplitude', 'roughness.seed', 'features[1].width']) {
      expect(problems.some((p) => p.startsWith(`g.json: ${path}: `))).toBe(true);
    }
    expect((err as UserError).message).toContain('starter');
  });
});
