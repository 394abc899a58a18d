import { KINDS, KIND_NAMES } from './kinds/index.js';
import type { TerrainFamily, TerrainGenome } from './types.js';

/** Each kind's components in registration order, then roughness and count. */
const KIND_COMPONENTS = KIND_NAMES.flatMap((kind) => KINDS[kind].descriptor.map((c) => ({ kind, c })));
const ROUGHNESS = KIND_COMPONENTS.length;
const COUNT = ROUGHNESS + 1;

/**
 * Names of the descriptor's components, in order. All are ≥ 0 and bounded by the family:
 * first each feature kind's own components (see its file: gapWidth, stepUp, stepDown,
 * blockHeight, uphill, downhill), each the largest value over the genome's features of that
 * kind; then roughness (amplitude, m; bound roughness.max) and count (number of features;
 * bound maxFeatures).
 */
export const DESCRIPTOR_NAMES: readonly string[] = [...KIND_COMPONENTS.map(({ c }) => c.name), 'roughness', 'count'];

export const DESCRIPTOR_LENGTH = DESCRIPTOR_NAMES.length;

/** The fixed-length difficulty vector of a genome (see DESCRIPTOR_NAMES for components and units). */
export function descriptor(genome: TerrainGenome): number[] {
  const d = new Array<number>(DESCRIPTOR_LENGTH).fill(0);
  for (const f of genome.features) {
    KIND_COMPONENTS.forEach(({ kind, c }, i) => {
      if (kind === f.kind) d[i] = Math.max(d[i], c.of(f));
    });
  }
  d[ROUGHNESS] = genome.roughness.amplitude;
  d[COUNT] = genome.features.length;
  return d;
}

/** Upper bound of each descriptor component over every valid genome of `family` (lower bounds are 0; a kind the family does not allow bounds its components at 0). */
export function descriptorBounds(family: TerrainFamily): number[] {
  return [
    ...KIND_COMPONENTS.map(({ kind, c }) => {
      const r = family.kinds[kind];
      return r ? c.bound(r) : 0;
    }),
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
