import { KINDS, Slot } from './kinds/index.js';
import type { TerrainFamily, TerrainGenome } from './types.js';

/**
 * Names of the descriptor's components, in order. All are ≥ 0:
 * 0 gapWidth   widest gap, m                 (bound: family gap.width.max, or 0)
 * 1 stepUp     tallest upward step, m        (bound: max(0, step.height.max))
 * 2 stepDown   deepest downward step, m      (bound: max(0, −step.height.min))
 * 3 blockHeight tallest block, m             (bound: block.height.max)
 * 4 uphill     steepest uphill grade, rise/run (bound: max(0, slope.grade.max))
 * 5 downhill   steepest downhill grade, fall/run (bound: max(0, −slope.grade.min))
 * 6 roughness  roughness amplitude, m        (bound: roughness.max)
 * 7 count      number of features            (bound: maxFeatures)
 */
export const DESCRIPTOR_NAMES = ['gapWidth', 'stepUp', 'stepDown', 'blockHeight', 'uphill', 'downhill', 'roughness', 'count'] as const;

export const DESCRIPTOR_LENGTH = DESCRIPTOR_NAMES.length;

/** The fixed-length difficulty vector of a genome (see DESCRIPTOR_NAMES for components and units). */
export function descriptor(genome: TerrainGenome): number[] {
  const d = new Array<number>(DESCRIPTOR_LENGTH).fill(0);
  for (const f of genome.features) KINDS[f.kind].describe(f, d);
  d[Slot.Roughness] = genome.roughness.amplitude;
  d[Slot.Count] = genome.features.length;
  return d;
}

/** Upper bound of each descriptor component over every valid genome of `family` (lower bounds are 0). */
export function descriptorBounds(family: TerrainFamily): number[] {
  const k = family.kinds;
  return [
    k.gap?.width.max ?? 0,
    Math.max(0, k.step?.height.max ?? 0),
    Math.max(0, -(k.step?.height.min ?? 0)),
    k.block?.height.max ?? 0,
    Math.max(0, k.slope?.grade.max ?? 0),
    Math.max(0, -(k.slope?.grade.min ?? 0)),
    family.roughness.max,
    family.maxFeatures,
  ];
}

/** Descriptor scaled to [0, 1] per component by the family's bounds (components with bound 0 stay 0). */
export function normalisedDescriptor(genome: TerrainGenome, family: TerrainFamily): number[] {
  const b = descriptorBounds(family);
  return descriptor(genome).map((v, i) => (b[i] > 0 ? v / b[i] : 0));
}

/**
 * The difficulty measure used to order curricula and compare courses: the mean of the
 * normalised descriptor components, in [0, 1]. 0 is flat ground; 1 would be every obstacle
 * at its family's extreme and the most features. A plain, documented measure rather than a
 * learned one, so other programs can recompute it from the genome.
 */
export function difficulty(genome: TerrainGenome, family: TerrainFamily): number {
  const d = normalisedDescriptor(genome, family);
  return d.reduce((a, b) => a + b, 0) / d.length;
}
