/**
 * The admission screen: proposals whose nearest recently evaluated candidates were all too easy
 * get no rollouts and are replaced by further draws. Checked on hand-built memories (distances
 * worked out by hand) and on steps driven by the fake evaluator.
 */
import { describe, expect, it } from 'vitest';
import { canonicalJson } from '../../src/core/index.js';
import { step, type RunEvent, type RunState } from '../../src/coevo/index.js';
import { proposeCandidates } from '../../src/coevo/admission.js';
import { Draft } from '../../src/coevo/draft.js';
import { predictedTooEasy, withinWindow, type ScreenEntry } from '../../src/coevo/screen.js';
import { normalisedDescriptor } from '../../src/terrain/index.js';
import { candidateSeries } from '../../src/report/index.js';
import { contextFor, FakeEvaluator, stateWith, tinyRecipe, type RecipeOverrides } from './helpers.js';

type CandidateEvent = Extract<RunEvent, { type: 'candidate' }>;
const at = (iteration: number, point: number[], tooEasy: boolean): ScreenEntry => ({ iteration, point, tooEasy });

describe('predictedTooEasy', () => {
  const memory = [at(1, [0, 0], true), at(1, [1, 0], true), at(1, [5, 5], false)];

  it('predicts too easy when all k nearest were too easy, and not when one of them was not', () => {
    // From (0.1, 0): distances 0.1, 0.9 and about 7.0, so the two nearest are the easy ones.
    expect(predictedTooEasy([0.1, 0], memory, 1)).toBe(true);
    expect(predictedTooEasy([0.1, 0], memory, 2)).toBe(true);
    expect(predictedTooEasy([0.1, 0], memory, 3)).toBe(false);
    expect(predictedTooEasy([5, 4.9], memory, 1)).toBe(false);
  });

  it('predicts nothing with fewer than k remembered candidates', () => {
    expect(predictedTooEasy([0, 0], memory.slice(0, 2), 3)).toBe(false);
    expect(predictedTooEasy([0, 0], [], 1)).toBe(false);
  });

  it('breaks a distance tie in favour of the older entry', () => {
    const easyFirst = [at(1, [1, 0], true), at(2, [-1, 0], false)];
    expect(predictedTooEasy([0, 0], easyFirst, 1)).toBe(true);
    expect(predictedTooEasy([0, 0], [...easyFirst].reverse(), 1)).toBe(false);
  });
});

describe('withinWindow', () => {
  it('keeps the entries from iteration − window on', () => {
    const memory = [at(5, [0], true), at(10, [0], true), at(25, [0], false)];
    expect(withinWindow(memory, 30, 20).map((m) => m.iteration)).toEqual([10, 25]);
    expect(withinWindow(memory, 30, 1)).toEqual([]);
  });
});

function setup(screen: RecipeOverrides | undefined) {
  const admission: RecipeOverrides = { interval: 1, reproduceAbove: 0.5, low: 0.2, high: 0.8, candidates: 4, admitPerRound: 1 };
  const ctx = contextFor(tinyRecipe({ admission: screen ? { ...admission, screen } : admission }));
  const state = stateWith(ctx, [{ tag: 1, progress: 0.6 }, { tag: 2, progress: 0.6 }]);
  return { ctx, state };
}

const proposals = (s: ReturnType<typeof setup>, state: RunState = s.state) =>
  proposeCandidates(s.ctx, new Draft(state, state.iteration + 1)).map((c) => ({ key: canonicalJson(c.genome), outcome: c.outcome }));

describe('admission with the screen', () => {
  it('changes no proposal while its memory is empty', () => {
    const off = setup(undefined);
    const on = setup({ k: 1 });
    expect(proposals(on)).toEqual(proposals(off));
  });

  it('keeps nothing in the state of a run without a screen', async () => {
    const { ctx, state } = setup(undefined);
    const out = await step(state, ctx, new FakeEvaluator(ctx, (r) => (r.courseId !== null ? 0.6 : 1)));
    expect(out.events.some((e) => e.type === 'candidate')).toBe(true);
    expect(out.state.screen).toBeUndefined();
    expect(out.state.counters.screened).toBeUndefined();
    expect(out.metrics.screened).toBeUndefined();
    expect(canonicalJson(out.state)).not.toMatch(/screen/);
  });

  it('remembers each evaluated candidate with whether it was too easy, then screens near ones without rollouts', async () => {
    const s = setup({ k: 1, window: 10, draws: 3 });
    // Every candidate is too easy for walker tag 2; own courses stay at 0.6.
    const fake = new FakeEvaluator(s.ctx, (r) => (r.courseId !== null ? 0.6 : r.tag === 2 ? 0.95 : 0.5));
    const first = await step(s.state, s.ctx, fake);
    const evaluated = first.events.filter((e): e is CandidateEvent => e.type === 'candidate' && e.outcome !== 'duplicate');
    expect(evaluated.length).toBeGreaterThan(0);
    expect(evaluated.every((e) => e.outcome === 'too-easy')).toBe(true);
    expect(first.state.screen).toHaveLength(evaluated.length);
    expect(first.state.screen!.every((m) => m.iteration === 1 && m.tooEasy)).toBe(true);
    expect(first.state.counters.screened).toBe(0);

    // Round two: with k = 1 and only too-easy memories, every new proposal is screened, so
    // the round draws candidates × draws proposals and runs no rollout on a candidate.
    const rolloutsBefore = fake.all().length;
    const second = await step(first.state, s.ctx, fake);
    const events = second.events.filter((e): e is CandidateEvent => e.type === 'candidate');
    expect(events).toHaveLength(4 * 3);
    const screened = events.filter((e) => e.outcome === 'screened');
    expect(screened.length).toBe(events.filter((e) => e.outcome !== 'duplicate').length);
    expect(screened.length).toBeGreaterThan(0);
    for (const e of screened) expect(e).toMatchObject({ courseId: null, bestProgress: 0, walkerId: null, novelty: null });
    expect(fake.all().slice(rolloutsBefore).some((r) => r.candidate !== null || r.courseId === null)).toBe(false);
    expect(second.state.counters.screened).toBe(screened.length);
    expect(second.metrics.screened).toBe(screened.length);
    // Screened proposals are not counted as candidates (duplicates still are).
    expect(second.state.counters.candidates - first.state.counters.candidates).toBe(events.length - screened.length);
    expect(second.state.counters.tooEasy).toBe(first.state.counters.tooEasy);
  });

  it('gives the report a screened curve only when the run has a screen', async () => {
    const rule = (r: { courseId: number | null; tag: number }) => (r.courseId !== null ? 0.6 : r.tag === 2 ? 0.95 : 0.5);
    const twoSteps = async (screen: Parameters<typeof setup>[0]) => {
      const s = setup(screen);
      const fake = new FakeEvaluator(s.ctx, rule);
      const first = await step(s.state, s.ctx, fake);
      const second = await step(first.state, s.ctx, fake);
      return { log: [first.metrics, second.metrics], events: [...first.events, ...second.events].filter((e): e is CandidateEvent => e.type === 'candidate') };
    };
    const on = await twoSteps({ k: 1, window: 10, draws: 3 });
    const byName = (log: typeof on.log) => Object.fromEntries(candidateSeries(log).map((c) => [c.name, c.values]));
    const count = (events: CandidateEvent[], it: number, keep: (o: string) => boolean) => events.filter((e) => e.iteration <= it && keep(e.outcome)).length;
    const want = (events: CandidateEvent[]) => ({
      tried: [1, 2].map((i) => count(events, i, (o) => o !== 'screened')),
      'too easy': [1, 2].map((i) => count(events, i, (o) => o === 'too-easy')),
    });
    expect(byName(on.log)).toEqual({ ...want(on.events), screened: [1, 2].map((i) => count(on.events, i, (o) => o === 'screened')) });
    expect(byName(on.log).screened[1]).toBeGreaterThan(0);
    const off = await twoSteps(undefined);
    expect(byName(off.log)).toEqual(want(off.events));
  });

  it('screens by the descriptor: a proposal far from every too-easy memory is evaluated', () => {
    const s = setup({ k: 1, window: 10, draws: 3 });
    const plain = proposeCandidates(s.ctx, new Draft(s.state, 1));
    // Remember one too-easy candidate exactly at the first proposal and one not-too-easy one
    // exactly at the second (if they differ in descriptor): the first is screened, the second kept.
    const [a, b] = plain.map((c) => normalisedDescriptor(c.genome, s.ctx.family));
    expect(canonicalJson(a)).not.toBe(canonicalJson(b));
    const state: RunState = { ...s.state, screen: [at(0, a, true), at(0, b, false)] };
    const got = proposeCandidates(s.ctx, new Draft(state, 1));
    expect(got[0].outcome).toBe('screened');
    expect(canonicalJson(got[1].genome)).toBe(canonicalJson(plain[1].genome));
    expect(got[1].outcome).toBe(null);
  });

  it('gives the same next step from a state that went through JSON (as a checkpoint does)', async () => {
    // In-band candidates: nothing is screened, and the memory grows round by round.
    const s = setup({ k: 2, window: 10 });
    const rule = (r: { courseId: number | null; tag: number; candidate: number | null }) => (r.courseId !== null ? 0.6 : r.tag === 2 ? 0.7 : 0.4);
    const first = await step(s.state, s.ctx, new FakeEvaluator(s.ctx, rule));
    const copy = JSON.parse(JSON.stringify(first.state)) as RunState;
    const fresh = (state: RunState) => {
      const ctx = contextFor(s.ctx.recipe);
      return step(state, ctx, new FakeEvaluator(ctx, rule));
    };
    const [a, b] = [await fresh(first.state), await fresh(copy)];
    expect(a.state.screen!.length).toBeGreaterThan(first.state.screen!.length);
    expect(canonicalJson(b.state)).toBe(canonicalJson(a.state));
    expect(canonicalJson(b.events)).toBe(canonicalJson(a.events));
  });
});
