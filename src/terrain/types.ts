import type { FeatureKind } from './kinds/index.js';

export type { FeatureKind };

/**
 * One element of a terrain genome. `x` is where it starts, in metres from the course origin;
 * the other numeric fields depend on the kind (see each kind's file), all in SI units.
 */
export interface Feature {
  readonly kind: FeatureKind;
  readonly x: number;
  readonly [field: string]: number | string;
}

/** Bumpy ground: a piecewise-linear height offset of up to ±amplitude metres, fixed by `seed`. */
export interface Roughness {
  /** Peak height offset, m. */
  readonly amplitude: number;
  /** Integer that fixes the bump pattern (part of the genome, so the course is pure in it). */
  readonly seed: number;
}

/** The heritable description of one course. Plain data. */
export interface TerrainGenome {
  readonly roughness: Roughness;
  /** Features in increasing `x`, at most the family's `maxFeatures`. */
  readonly features: readonly Feature[];
}

/** Range and mutation size of one numeric field. */
export interface FieldRange {
  /** Smallest allowed value. */
  readonly min: number;
  /** Largest allowed value. */
  readonly max: number;
  /** Standard deviation of a Gaussian field mutation, same unit as the field. */
  readonly mutation: number;
}

/** Rates and sizes of genome mutation. */
export interface MutationSettings {
  /** Probability that each numeric field is perturbed. */
  readonly fieldProbability: number;
  /** Probability of adding one feature. */
  readonly addProbability: number;
  /** Probability of removing one feature. */
  readonly removeProbability: number;
  /** Probability of moving one feature. */
  readonly shiftProbability: number;
  /** Standard deviation of a feature move, m. */
  readonly shift: number;
  /** Probability of re-drawing the roughness seed. */
  readonly reseedProbability: number;
  /** A new feature's fields start within newFeatureSpan·(max − min) of their easiest allowed value (the one closest to 0): complexity grows gently. */
  readonly newFeatureSpan: number;
}

/** A terrain family: bounds every genome of its kind of course. Loaded from `envs/terrain/*.json`. */
export interface TerrainFamily {
  readonly name: string;
  /** Distance from the course origin to the finish line, m. */
  readonly length: number;
  /** Flat, feature-free ground from the origin, m. The walker starts in it. */
  readonly startZone: number;
  /** Feature-free ground before the finish line, m. */
  readonly finishZone: number;
  /** Where the walker's torso starts, m from the origin (inside the start zone). */
  readonly spawnX: number;
  /** Most features a genome may hold. */
  readonly maxFeatures: number;
  /** Least flat ground between the end of one feature and the start of the next, m. */
  readonly minSpacing: number;
  /** Ground and obstacle friction coefficient. */
  readonly friction: number;
  /** Depth of the pit under every gap, m. */
  readonly gapDepth: number;
  /** Horizontal spacing of roughness bumps, m. */
  readonly roughnessSpacing: number;
  /** Range of the roughness amplitude, m. */
  readonly roughness: FieldRange;
  /** Allowed feature kinds, each with the range of every field. */
  readonly kinds: Readonly<Partial<Record<FeatureKind, Readonly<Record<string, FieldRange>>>>>;
  readonly mutation: MutationSettings;
  /** The genome the first pair starts from. */
  readonly start: TerrainGenome;
}

/** A closed convex polygon, counter-clockwise, flat [x0, y0, x1, y1, ...] in metres. */
export type Polygon = readonly number[];

/** Concrete geometry built from a genome: deterministic from the genome and family alone. */
export interface Course {
  /** Ground polyline, flat [x0, y0, x1, y1, ...] in metres; x never decreases (vertical faces allowed). */
  readonly ground: readonly number[];
  /** Static obstacles standing on the ground (blocks). */
  readonly obstacles: readonly Polygon[];
  /** Friction coefficient of ground and obstacles. */
  readonly friction: number;
  /** x where progress 0 is counted (the walker's spawn), m. */
  readonly startX: number;
  /** x of the finish line (progress 1), m. */
  readonly finishX: number;
  /** Ground height at the spawn point, m. */
  readonly spawnGroundY: number;
}
