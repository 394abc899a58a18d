import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  DESCRIPTOR_LENGTH,
  DESCRIPTOR_NAMES,
  descriptor,
  descriptorBounds,
  normalisedDescriptor,
  validateGenome,
} from '../../src/terrain/index.js';
import { anyGenome, FAMILIES, genome, mixed, starter } from './helpers.js';

/** The descriptor as a name → value record, so known-value checks read by name. */
function named(v: number[]): Record<string, number> {
  return Object.fromEntries(DESCRIPTOR_NAMES.map((n, i) => [n, v[i]]));
}

describe.each(FAMILIES)('descriptor (%s family, properties)', (_, family) => {
  it('is finite, of fixed length, within [0, descriptorBounds] for every valid genome', () => {
    const bounds = descriptorBounds(family);
    expect(bounds).toHaveLength(DESCRIPTOR_LENGTH);
    fc.assert(
      fc.property(anyGenome(family), (g) => {
        const d = descriptor(g);
        expect(d).toHaveLength(DESCRIPTOR_LENGTH);
        d.forEach((v, i) => {
          expect(Number.isFinite(v)).toBe(true);
          expect(v).toBeGreaterThanOrEqual(0);
          expect(v).toBeLessThanOrEqual(bounds[i]);
        });
        for (const v of normalisedDescriptor(g, family)) {
          expect(v).toBeGreaterThanOrEqual(0);
          expect(v).toBeLessThanOrEqual(1);
        }
      }),
      { numRuns: 150 },
    );
  });

  it('depends on the genome only: the same genome gives the same vector, feature order aside', () => {
    fc.assert(
      fc.property(anyGenome(family), (g) => {
        const reversed = { ...g, features: [...g.features].reverse() };
        expect(descriptor(reversed)).toEqual(descriptor(structuredClone(g)));
      }),
      { numRuns: 100 },
    );
  });
});

describe('descriptor known values', () => {
  it('has one name per component', () => {
    expect(DESCRIPTOR_NAMES).toHaveLength(DESCRIPTOR_LENGTH);
    expect(new Set(DESCRIPTOR_NAMES).size).toBe(DESCRIPTOR_LENGTH);
  });

  it('is all zeros for the flat, empty genome', () => {
    expect(descriptor(starter.start)).toEqual(new Array(DESCRIPTOR_LENGTH).fill(0));
  });

  it('takes the widest gap and the deepest step down, and counts features', () => {
    const g = genome(
      [
        { kind: 'gap', x: 5, width: 0.3 },
        { kind: 'step', x: 8, height: -0.2 },
        { kind: 'gap', x: 11, width: 0.7 },
        { kind: 'step', x: 14, height: -0.1 },
      ],
      0.03,
      9,
    );
    expect(named(descriptor(g))).toEqual({
      gapWidth: 0.7,
      stepUp: 0,
      stepDown: 0.2,
      blockHeight: 0,
      uphill: 0,
      downhill: 0,
      roughness: 0.03,
      count: 4,
    });
  });

  it('separates up from down for steps and slopes, and takes the tallest block', () => {
    const g = genome([
      { kind: 'step', x: 5, height: 0.25 },
      { kind: 'step', x: 7, height: 0.4 },
      { kind: 'block', x: 9, width: 1, height: 0.3 },
      { kind: 'block', x: 12, width: 0.5, height: 0.1 },
      { kind: 'slope', x: 15, length: 2, grade: 0.2 },
      { kind: 'slope', x: 19, length: 3, grade: -0.35 },
      { kind: 'slope', x: 24, length: 1, grade: -0.1 },
    ]);
    expect(named(descriptor(g))).toEqual({
      gapWidth: 0,
      stepUp: 0.4,
      stepDown: 0,
      blockHeight: 0.3,
      uphill: 0.2,
      downhill: 0.35,
      roughness: 0,
      count: 7,
    });
  });
});

describe('descriptorBounds', () => {
  it("reads each bound from the family's ranges (0 for kinds the family does not allow)", () => {
    const k = starter.kinds;
    expect(descriptorBounds(starter)).toEqual([
      k.gap!.width.max,
      k.step!.height.max,
      -k.step!.height.min,
      0,
      0,
      0,
      starter.roughness.max,
      starter.maxFeatures,
    ]);
    const m = mixed.kinds;
    expect(descriptorBounds(mixed)).toEqual([
      m.gap!.width.max,
      m.step!.height.max,
      -m.step!.height.min,
      m.block!.height.max,
      m.slope!.grade.max,
      -m.slope!.grade.min,
      mixed.roughness.max,
      mixed.maxFeatures,
    ]);
  });

  it('scales a genome at the bounds to all ones, and leaves components with bound 0 at 0', () => {
    const g = genome(
      [
        { kind: 'gap', x: 4, width: 1 },
        { kind: 'step', x: 7, height: 0.4 },
        { kind: 'step', x: 9, height: -0.4 },
        ...[11, 13, 15, 17, 19].map((x) => ({ kind: 'step', x, height: 0 })),
      ],
      0.06,
    );
    expect(validateGenome(g, starter)).toEqual([]);
    expect(normalisedDescriptor(g, starter)).toEqual([1, 1, 1, 0, 0, 0, 1, 1]);
  });
});
