import type { Feature, FeatureKind } from '../types.js';

/** Collects course geometry while features are laid out left to right. */
export interface CourseBuilder {
  /** Appends a ground point (a repeat of the last point is dropped). */
  point(x: number, y: number): void;
  /** Ground from the last point to (x1, y1), straight, with the genome's roughness bumps on it. */
  stretch(x1: number, y1: number): void;
  /** Adds a static convex obstacle, flat [x0, y0, ...], counter-clockwise. */
  obstacle(poly: number[]): void;
  /** Depth of gap pits, m. */
  readonly pitDepth: number;
}

/** Indices into the descriptor vector (see `descriptor.ts` for meanings and units). */
export const enum Slot {
  GapWidth = 0,
  StepUp = 1,
  StepDown = 2,
  BlockHeight = 3,
  Uphill = 4,
  Downhill = 5,
  Roughness = 6,
  Count = 7,
}

/** Everything cairn needs to know about one kind of feature. */
export interface KindDef {
  readonly kind: FeatureKind;
  /** Numeric fields besides `x`, in the order they are documented. */
  readonly fields: readonly string[];
  /** Horizontal extent from `x`, m. */
  footprint(f: Feature): number;
  /** Lays the feature out starting at ground level `level` (the builder's last point is at x = f.x); returns the level after it. */
  build(f: Feature, level: number, b: CourseBuilder): number;
  /** Raises the descriptor slots this feature affects. */
  describe(f: Feature, d: number[]): void;
}

/** Numeric field `name` of a feature. */
export function num(f: Feature, name: string): number {
  return f[name] as number;
}
