/**
 * Solve confirmation: a pair at or above solve.threshold is re-run `checks` times under the
 * stricter solver, the first rollout unpushed and the rest pushed; the course counts as solved
 * only when every check reaches the threshold.
 */
import { describe, expect, it } from 'vitest';
import { step, type RunEvent, type RunState } from '../../src/coevo/index.js';
import { contextFor, FakeEvaluator, stateWith, tagged, tinyRecipe } from './helpers.js';

const THRESHOLD = 0.9;
const PUSH = 0.3;

/**
 * One iteration with walker 0 (tag 1) on course 0 making `progress`, walker 1 (tag 2) on
 * course 1 making 0.5, and the confirmation rollouts of each course returning `checks` in order.
 */
async function solveRound(progress: number, checks: readonly number[], prepare: (s: RunState) => RunState = (s) => s) {
  const ctx = contextFor(tinyRecipe({ solve: { threshold: THRESHOLD, checks: 3, push: PUSH } }));
  const start = prepare(stateWith(ctx, [{ tag: 1, progress: 0 }, { tag: 2, progress: 0 }]));
  const next = new Map<number | null, number>();
  const fake = new FakeEvaluator(ctx, (r) => {
    if (!r.strict) return r.tag === 1 ? progress : 0.5;
    const i = next.get(r.courseId) ?? 0;
    next.set(r.courseId, i + 1);
    return checks[i];
  });
  const out = await step(start, ctx, fake);
  const solveEvents = out.events.filter((e): e is Extract<RunEvent, { type: 'solved' | 'unconfirmed' }> => e.type === 'solved' || e.type === 'unconfirmed');
  return { ctx, start, out, fake, solveEvents };
}

describe('solve confirmation', () => {
  it('marks a course solved when every check reaches the threshold (at the threshold counts)', async () => {
    const { ctx, out, solveEvents } = await solveRound(0.95, [0.97, THRESHOLD, 1]);
    expect(solveEvents).toEqual([{ type: 'solved', iteration: 1, courseId: 0, walkerId: 0, progress: 0.95, checks: [0.97, THRESHOLD, 1] }]);
    const c = out.state.courses[0];
    expect(c.solvedAt).toBe(1);
    // The weights that were evaluated this iteration (before the ES update), not the updated mean.
    expect(c.solvedBy).toEqual({ progress: 0.95, walkerId: 0, iteration: 1, params: tagged(ctx, 1) });
    expect(out.metrics.solved).toBe(1);
    expect(out.state.courses[1].solvedAt).toBeNull();
  });

  it('reports an unconfirmed solve when any check falls short', async () => {
    const { out, solveEvents } = await solveRound(0.95, [0.97, THRESHOLD - 1e-12, 1]);
    expect(solveEvents).toEqual([{ type: 'unconfirmed', iteration: 1, courseId: 0, walkerId: 0, progress: 0.95, checks: [0.97, THRESHOLD - 1e-12, 1] }]);
    expect(out.state.courses[0].solvedAt).toBeNull();
    expect(out.state.courses[0].solvedBy).toBeNull();
    expect(out.metrics.solved).toBe(0);
  });

  it('runs the checks under the stricter solver, the first unpushed and the rest pushed within solve.push', async () => {
    const { ctx, out, fake } = await solveRound(THRESHOLD, [1, 1, 1]);
    const strict = fake.all().filter((r) => r.strict);
    expect(strict).toHaveLength(3);
    expect(ctx.strictRollout.physics.velocityIterations).toBe(2 * ctx.recipe.episode.velocityIterations);
    expect(ctx.strictRollout.physics.positionIterations).toBe(2 * ctx.recipe.episode.positionIterations);
    for (const r of strict) {
      expect(r.courseId).toBe(0);
      expect(r.sign).toBe(0);
      expect(r.params).toEqual(tagged(ctx, 1));
    }
    expect(strict[0].push).toBe(0);
    for (const r of strict.slice(1)) {
      expect(r.push).not.toBe(0);
      expect(Math.abs(r.push)).toBeLessThanOrEqual(PUSH);
    }
    // The checks are counted with the run's rollouts: 2 pairs × (mean + 4 candidates) + 3.
    expect(out.state.counters.rollouts).toBe(2 * (1 + ctx.recipe.es.population) + 3);
  });

  it('does not check a pair below the threshold', async () => {
    const { fake, solveEvents } = await solveRound(THRESHOLD - 1e-12, [1, 1, 1]);
    expect(fake.all().some((r) => r.strict)).toBe(false);
    expect(solveEvents).toEqual([]);
  });

  it('does not check a course that is already solved', async () => {
    const solved = (s: RunState): RunState => ({ ...s, courses: s.courses.map((c) => (c.id === 0 ? { ...c, solvedAt: 0, solvedBy: c.best } : c)) });
    const { out, fake, solveEvents } = await solveRound(0.99, [1, 1, 1], solved);
    expect(fake.all().some((r) => r.strict)).toBe(false);
    expect(solveEvents).toEqual([]);
    expect(out.state.courses[0].solvedAt).toBe(0);
  });
});
