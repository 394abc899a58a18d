import { DESCRIPTOR_NAMES, normalisedDescriptor, type TerrainFamily } from '../terrain/index.js';
import type { Recipe } from './recipe.js';
import type { CourseRecord } from './state.js';

/** Solved courses in the order they were solved (ties: by id). */
export function solvedInOrder(courses: readonly CourseRecord[]): CourseRecord[] {
  return courses.filter((c) => c.solvedAt !== null).sort((a, b) => a.solvedAt! - b.solvedAt! || a.id - b.id);
}

function distance(a: readonly number[], b: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i] - b[i]) ** 2;
  return Math.sqrt(s);
}

/**
 * New ground: walking through the solved courses in the order they were solved, the number
 * whose normalised descriptor lies farther than `minDistance` (Euclidean) from that of every
 * course solved before it. The first solved course always counts. It only grows, and it
 * grows only when a run solves a course unlike all it had solved.
 */
export function newGround(courses: readonly CourseRecord[], family: TerrainFamily, minDistance: number): number {
  const seen: number[][] = [];
  let count = 0;
  for (const c of solvedInOrder(courses)) {
    const p = normalisedDescriptor(c.genome, family);
    if (seen.every((q) => distance(p, q) > minDistance)) count++;
    seen.push(p);
  }
  return count;
}

/** The coverage grid's settings: components by index into the descriptor, and bins per component. */
export interface GridSpec {
  readonly components: readonly string[];
  readonly indices: readonly number[];
  readonly bins: number;
}

export function gridSpec(recipe: Recipe): GridSpec {
  const { components, bins } = recipe.measures.grid;
  return { components, indices: components.map((c) => DESCRIPTOR_NAMES.indexOf(c)), bins };
}

/**
 * The coverage-grid cell of a genome's normalised descriptor: per grid component,
 * floor(value × bins), with value 1 put in the last bin. Returned as one index per component.
 */
export function gridCell(normalised: readonly number[], spec: GridSpec): number[] {
  return spec.indices.map((i) => Math.min(spec.bins - 1, Math.floor(normalised[i] * spec.bins)));
}

/** Cells holding at least one solved course, each with the solved courses in it (keys are cell indices joined by ","). */
export function coveredCells(courses: readonly CourseRecord[], family: TerrainFamily, spec: GridSpec): Map<string, number[]> {
  const out = new Map<string, number[]>();
  for (const c of solvedInOrder(courses)) {
    const key = gridCell(normalisedDescriptor(c.genome, family), spec).join(',');
    out.set(key, [...(out.get(key) ?? []), c.id]);
  }
  return out;
}

/** Coverage: the number of grid cells holding a solved course. */
export function coverage(courses: readonly CourseRecord[], family: TerrainFamily, spec: GridSpec): number {
  return coveredCells(courses, family, spec).size;
}
