/**
 * The takeover rule: another pair's walker, as it is (zero-shot) or after one ES step on the
 * course (fine-tuned), takes a course over only when it beats the incumbent's progress by more
 * than transfer.margin.
 *
 * Walker A (id 0, tag 1) holds course 0 and walker B (id 1, tag 2) course 1. The fake gives
 * every rollout on a walker's own course the same progress, so the ES phase's centred ranks are
 * all equal and, with no weight decay, the walkers' weights do not move: zero-shot rollouts then
 * carry exactly the weights the state started with, and anything else is a fine-tuned walker.
 */
import { describe, expect, it } from 'vitest';
import { step, type RunEvent } from '../../src/coevo/index.js';
import { contextFor, FakeEvaluator, stateWith, tagged, tinyRecipe, type FakeRollout } from './helpers.js';

const MARGIN = 0.05;
const INCUMBENT = 0.5;

interface Offer {
  /** B's progress on course 0 as it is. */
  readonly zeroShot: number;
  /** B's progress on course 0 after its one ES step there. */
  readonly tuned: number;
}

async function transferRound({ zeroShot, tuned }: Offer, interval = 1) {
  const ctx = contextFor(tinyRecipe({ es: { weightDecay: 0 }, transfer: { interval, fineTuneTop: 1, margin: MARGIN } }));
  const start = stateWith(ctx, [{ tag: 1, progress: INCUMBENT }, { tag: 2, progress: INCUMBENT }]);
  const asIs = (r: FakeRollout): boolean => r.params.every((x, i) => x === tagged(ctx, r.tag)[i]);
  const fake = new FakeEvaluator(ctx, (r) => {
    const own = r.courseId === r.tag - 1;
    if (own) return INCUMBENT;
    // The one ES step of fine-tuning sees its + side do better, so its weights move.
    if (r.sign !== 0) return 0.3 + 0.01 * r.sign;
    if (r.tag === 1) return 0.1; // A never does well on course 1
    return asIs(r) ? zeroShot : tuned;
  });
  const out = await step(start, ctx, fake);
  const takeovers = out.events.filter((e): e is Extract<RunEvent, { type: 'takeover' }> => e.type === 'takeover');
  return { ctx, start, out, fake, takeovers, asIs };
}

describe('takeover rule', () => {
  it('hands the course to a zero-shot walker that beats the incumbent by more than the margin', async () => {
    const { ctx, start, out, takeovers } = await transferRound({ zeroShot: 0.6, tuned: 0.2 });
    expect(takeovers).toEqual([{
      type: 'takeover', iteration: 1, courseId: 0, fromCourse: 1, walkerId: 1, newWalkerId: 2,
      how: 'zero-shot', progress: 0.6, incumbentProgress: INCUMBENT,
    }]);
    const pair = out.state.pairs[0];
    expect(pair.courseId).toBe(0);
    expect(pair.walkerId).toBe(start.nextWalkerId);
    expect(pair.progress).toBe(0.6);
    // A fresh optimiser state around B's weights.
    expect(pair.es.t).toBe(0);
    expect(pair.es.mean).toEqual(tagged(ctx, 2));
    expect(pair.es.m.every((x) => x === 0) && pair.es.v.every((x) => x === 0)).toBe(true);
    expect(out.state.nextWalkerId).toBe(start.nextWalkerId + 1);
    expect(out.state.counters.takeovers).toBe(start.counters.takeovers + 1);
    expect(out.metrics.takeovers).toBe(1);
    const course = out.state.courses[0];
    expect(course.holders).toEqual([...start.courses[0].holders, { walkerId: 2, since: 1, how: 'zero-shot' }]);
    expect(course.best).toMatchObject({ progress: 0.6, walkerId: 2, iteration: 1 });
    // B keeps its own course, and the giving walker is not moved.
    expect(out.state.pairs[1]).toMatchObject({ courseId: 1, walkerId: 1 });
  });

  it('hands the course to a fine-tuned walker with the weights that were evaluated', async () => {
    const { ctx, out, fake, takeovers, asIs } = await transferRound({ zeroShot: 0.2, tuned: 0.7 });
    expect(takeovers).toHaveLength(1);
    expect(takeovers[0]).toMatchObject({ courseId: 0, walkerId: 1, newWalkerId: 2, how: 'fine-tuned', progress: 0.7 });
    const tunedRollouts = fake.all().filter((r) => r.courseId === 0 && r.tag === 2 && r.sign === 0 && !asIs(r));
    expect(tunedRollouts).toHaveLength(1);
    const pair = out.state.pairs[0];
    expect(pair.es.mean).toEqual([...tunedRollouts[0].params]);
    expect(pair.es.mean).not.toEqual(tagged(ctx, 2));
    expect(pair.es.t).toBe(0);
    expect(out.state.courses[0].holders.at(-1)).toEqual({ walkerId: 2, since: 1, how: 'fine-tuned' });
  });

  it('prefers the zero-shot walker when fine-tuning does no better', async () => {
    const { takeovers } = await transferRound({ zeroShot: 0.7, tuned: 0.7 });
    expect(takeovers.map((t) => t.how)).toEqual(['zero-shot']);
  });

  it('takes over just above the margin', async () => {
    const { takeovers } = await transferRound({ zeroShot: INCUMBENT + MARGIN + 1e-12, tuned: 0 });
    expect(takeovers).toHaveLength(1);
  });

  it.each([
    ['equal to the incumbent', INCUMBENT],
    ['better by less than the margin', INCUMBENT + MARGIN / 2],
    ['better by exactly the margin', INCUMBENT + MARGIN],
    ['worse', 0.3],
  ])('keeps the incumbent when the best offer is %s', async (_, offer) => {
    const { start, out, takeovers } = await transferRound({ zeroShot: offer, tuned: offer });
    expect(takeovers).toEqual([]);
    expect(out.state.pairs.map((p) => p.walkerId)).toEqual([0, 1]);
    expect(out.state.courses[0].holders).toEqual(start.courses[0].holders);
    expect(out.state.counters.takeovers).toBe(0);
    expect(out.state.nextWalkerId).toBe(start.nextWalkerId);
  });

  it('runs no transfer round off its interval', async () => {
    const { fake, takeovers } = await transferRound({ zeroShot: 0.9, tuned: 0.9 }, 2);
    expect(takeovers).toEqual([]);
    expect(fake.all().every((r) => r.courseId === r.tag - 1)).toBe(true);
  });

  it('tries nothing with a single pair', async () => {
    const ctx = contextFor(tinyRecipe({ transfer: { interval: 1 } }));
    const fake = new FakeEvaluator(ctx, () => 0.5);
    const out = await step(stateWith(ctx, [{ tag: 1, progress: 0.5 }]), ctx, fake);
    expect(fake.log).toHaveLength(1); // the ES phase's batch only
    expect(out.state.pairs[0].walkerId).toBe(0);
  });
});
