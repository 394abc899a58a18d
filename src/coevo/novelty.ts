import { distance } from '../core/index.js';
import { centredRanks } from '../evolve/index.js';
import { normalisedDescriptor, type TerrainGenome } from '../terrain/index.js';
import type { PhaseBatch, PhaseResults } from './batch.js';
import type { RunContext } from './context.js';
import type { CourseRecord } from './state.js';

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

/** Where a course sits for novelty: the space candidates and admitted courses are compared in. */
export interface NoveltyMeasure {
  /**
   * Plans whatever rollouts the admitted courses' points need into `b`, and returns how to read
   * those points once the batch has run.
   */
  references(b: PhaseBatch, courses: readonly CourseRecord[], walkers: readonly (readonly number[])[]): (r: PhaseResults) => number[][];
  /** A candidate's point, from its genome and each current walker's progress on it. */
  point(genome: TerrainGenome, progress: readonly number[]): number[];
}

/** The genome's descriptor scaled by the family's bounds: no rollouts needed. */
function descriptorMeasure(ctx: RunContext): NoveltyMeasure {
  return {
    references: (_b, courses) => () => courses.map((rec) => normalisedDescriptor(rec.genome, ctx.family)),
    point: (genome) => normalisedDescriptor(genome, ctx.family),
  };
}

/** How the current walkers rank on the course: every walker is run on every admitted course. */
function profileMeasure(ctx: RunContext): NoveltyMeasure {
  const { low, high } = ctx.recipe.admission;
  return {
    references(b, courses, walkers) {
      const tasks = courses.map((rec) => walkers.map((w) => b.rollout(b.course(rec.id), w)));
      return (r) => tasks.map((ts) => performanceProfile(ts.map((t) => r.progress(t)), low, high));
    },
    point: (_genome, progress) => performanceProfile(progress, low, high),
  };
}

/** The measure a recipe names (`novelty.measure`). */
export function noveltyMeasure(ctx: RunContext): NoveltyMeasure {
  return ctx.recipe.novelty.measure === 'profile' ? profileMeasure(ctx) : descriptorMeasure(ctx);
}
