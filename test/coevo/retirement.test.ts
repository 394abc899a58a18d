/**
 * Capacity: beyond population.maxActive the oldest pairs retire to the archive, and archived
 * courses still count when the novelty of later candidates is measured.
 */
import { describe, expect, it } from 'vitest';
import { knnNovelty, step, type RunEvent } from '../../src/coevo/index.js';
import { descriptorBounds } from '../../src/terrain/index.js';
import { contextFor, FakeEvaluator, stateWith, tinyRecipe } from './helpers.js';

const OWN = 0.6;
const IN_BAND = 0.5;

function recipe(minNovelty: number, maxActive = 2) {
  return tinyRecipe({
    population: { maxActive },
    admission: { interval: 1, reproduceAbove: 0.3, low: 0.2, high: 0.8, candidates: 6, admitPerRound: 2, minNovelty },
    novelty: { k: 5 },
  });
}

/** Every run course gives OWN, every candidate IN_BAND: all live candidates pass the minimal criterion. */
const rule = (r: { courseId: number | null }): number => (r.courseId !== null ? OWN : IN_BAND);

async function overCapacity() {
  const ctx = contextFor(recipe(0));
  const start = stateWith(ctx, [{ tag: 1, progress: OWN }, { tag: 2, progress: OWN }]);
  const out = await step(start, ctx, new FakeEvaluator(ctx, rule));
  return { start, out };
}

describe('retirement beyond maxActive', () => {
  it('retires the pairs that were there before, a lineage\'s last pair after the others, and keeps the newly admitted ones', async () => {
    const { start, out } = await overCapacity();
    const admitted = out.events.flatMap((e) => (e.type === 'candidate' && e.outcome === 'admitted' ? [e.courseId] : []));
    expect(admitted).toEqual([2, 3]);
    const retired = out.events.filter((e) => e.type === 'retired');
    // Course 0 is alone in its lineage; course 1 shares lineage 1 with the new courses 2 and 3
    // (children of 1), so course 1 goes first, then course 0.
    expect(out.state.courses.filter((c) => c.id >= 2).map((c) => c.parent)).toEqual([1, 1]);
    expect(retired).toEqual([
      { type: 'retired', iteration: 1, courseId: 1, walkerId: 1, progress: OWN },
      { type: 'retired', iteration: 1, courseId: 0, walkerId: 0, progress: OWN },
    ]);
    expect(out.state.pairs.map((p) => p.courseId)).toEqual([2, 3]);
    expect(out.metrics).toMatchObject({ activePairs: 2, admitted: 3, archived: 2 });
    // Retired courses stay in the run, marked archived; nothing is deleted.
    for (const id of [0, 1]) {
      const c = out.state.courses.find((r) => r.id === id)!;
      expect(c.archivedAt).toBe(1);
      expect(c.genome).toEqual(start.courses[id].genome);
    }
    for (const id of [2, 3]) expect(out.state.courses.find((r) => r.id === id)!.archivedAt).toBeNull();
  });

  it('retires nothing while the population fits', async () => {
    const ctx = contextFor(recipe(0, 4));
    const start = stateWith(ctx, [{ tag: 1, progress: OWN }, { tag: 2, progress: OWN }]);
    const out = await step(start, ctx, new FakeEvaluator(ctx, rule));
    expect(out.state.pairs).toHaveLength(4);
    expect(out.events.some((e) => e.type === 'retired')).toBe(false);
    expect(out.state.courses.every((c) => c.archivedAt === null)).toBe(true);
  });

  it('counts archived courses as novelty references', async () => {
    const { out: first } = await overCapacity();
    // Next iteration with a minimum novelty no candidate reaches: each is then measured against
    // every course and reported as not novel, admitting nothing that would shift the references.
    const ctx = contextFor(recipe(1e6));
    const out = await step(first.state, ctx, new FakeEvaluator(ctx, rule));
    const events = out.events.filter((e): e is Extract<RunEvent, { type: 'candidate' }> => e.type === 'candidate' && e.outcome === 'not-novel');
    expect(events.length).toBeGreaterThan(0);
    const bounds = descriptorBounds(ctx.family);
    const norm = (d: readonly number[]): number[] => d.map((v, i) => (bounds[i] > 0 ? v / bounds[i] : 0));
    const all = out.state.courses.map((c) => norm(c.descriptor));
    const active = out.state.courses.filter((c) => c.archivedAt === null).map((c) => norm(c.descriptor));
    expect(all.length).toBeGreaterThan(active.length);
    let differs = 0;
    for (const e of events) {
      const withArchive = knnNovelty(norm(e.descriptor), all, ctx.recipe.novelty.k);
      expect(e.novelty).toBeCloseTo(withArchive, 12);
      if (Math.abs(withArchive - knnNovelty(norm(e.descriptor), active, ctx.recipe.novelty.k)) > 1e-9) differs++;
    }
    // The check means something only if leaving the archive out would change some novelty.
    expect(differs).toBeGreaterThan(0);
  });
});
