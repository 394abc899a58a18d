import type { Feature, FieldRange } from '../types.js';

/** Collects course geometry while features are laid out left to right. */
export interface CourseBuilder {
  /** Appends a ground point (a repeat of the last point is dropped). */
  point(x: number, y: number): void;
  /** Ground from the last point to (x1, y1), straight, with the genome's roughness bumps on it. */
  stretch(x1: number, y1: number): void;
  /** Adds a static convex obstacle, flat [x0, y0, ...], counter-clockwise. */
  obstacle(poly: number[]): void;
  /** Depth of gap pits, m. */
  readonly gapDepth: number;
}

/** The ranges a family gives one kind's fields, by field name. */
export type KindRanges = Readonly<Record<string, FieldRange>>;

/** One component of the descriptor that a kind contributes: the largest value over its features. */
export interface DescriptorComponent {
  /** Name in DESCRIPTOR_NAMES, reports and exports. */
  readonly name: string;
  /** What it measures, with its unit. */
  readonly meaning: string;
  /** Its value for one feature (≥ 0; 0 when the feature does not raise it). */
  of(f: Feature): number;
  /** Its largest value over every valid feature of a family with these ranges. */
  bound(r: KindRanges): number;
}

/** Everything cairn needs to know about one kind of feature. */
export interface KindDef {
  /** Numeric fields besides `x`, in the order they are documented. */
  readonly fields: readonly string[];
  /** Fields whose family range must lie above 0 (sizes that cannot be zero or negative). */
  readonly positive: readonly string[];
  /** Descriptor components this kind raises, in descriptor order. */
  readonly descriptor: readonly DescriptorComponent[];
  /** Horizontal extent from `x`, m. */
  footprint(f: Feature): number;
  /** Lays the feature out starting at ground level `level` (the builder's last point is at x = f.x); returns the level after it. */
  build(f: Feature, level: number, b: CourseBuilder): number;
}

/** Numeric field `name` of a feature. */
export function num(f: Feature, name: string): number {
  return f[name] as number;
}
