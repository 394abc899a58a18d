import { distance } from '../core/index.js';
import { centredRanks } from '../evolve/index.js';

/**
 * Novelty of `point`: the mean distance to its k nearest neighbours among `refs` (fewer when
 * there are fewer refs; 0 with none). Novelty search as in Lehman & Stanley (2011),
 * "Abandoning Objectives: Evolution Through the Search for Novelty Alone".
 */
export function knnNovelty(point: readonly number[], refs: readonly (readonly number[])[], k: number): number {
  if (refs.length === 0) return 0;
  const d = refs.map((r) => distance(point, r)).sort((a, b) => a - b);
  const n = Math.min(k, d.length);
  let s = 0;
  for (let i = 0; i < n; i++) s += d[i];
  return s / n;
}

/**
 * Performance profile of a course: each reference walker's progress on it, clipped to the
 * minimal-criterion band [low, high] (differences outside it say nothing about the course),
 * then turned into centred ranks so courses compare by how they order the walkers.
 */
export function performanceProfile(progress: readonly number[], low: number, high: number): number[] {
  return centredRanks(progress.map((p) => Math.min(high, Math.max(low, p))));
}
