import type { TerrainGenome } from '../terrain/index.js';

/**
 * One course and walker a branched run starts from, frozen into the run directory
 * (sources.json) at creation: everything the run's future depends on, nothing about where the
 * source lived. `fingerprint` and `courseId` name it in the lineage.
 */
export interface BranchSource {
  /** Fingerprint of the source run's state the course was taken from. */
  readonly fingerprint: string;
  /** Course id in that source. */
  readonly courseId: number;
  /** The genome as the new run uses it (after clipping, when asked). */
  readonly genome: TerrainGenome;
  /** Whether the genome was clipped into the new family's bounds. */
  readonly clipped: boolean;
  /** Walker id in the source and its exact weights (the solver's, else the best walker's). */
  readonly walkerId: number;
  readonly params: readonly number[];
}
