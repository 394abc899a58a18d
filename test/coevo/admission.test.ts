/**
 * Admission by the minimal criterion and novelty, driven by a fake evaluator that gives each
 * candidate terrain the progress the test chooses. Two walkers (ids 0 and 1, tags 1 and 2)
 * hold courses 0 and 1, both eligible parents.
 */
import { describe, expect, it } from 'vitest';
import { canonicalJson } from '../../src/core/index.js';
import { knnNovelty, step, type RunContext, type RunEvent, type RunState } from '../../src/coevo/index.js';
import { descriptor, normalisedDescriptor, type TerrainGenome } from '../../src/terrain/index.js';
import { contextFor, courseRecord, FakeEvaluator, predictCandidates, stateWith, tagged, tinyRecipe, type RecipeOverrides } from './helpers.js';

type CandidateEvent = Extract<RunEvent, { type: 'candidate' }>;

const LOW = 0.2;
const HIGH = 0.8;
/** Progress of every walker on its own (and any run) course: above reproduceAbove, below the solve threshold. */
const OWN = 0.6;

function setup(admission: RecipeOverrides, extra: RecipeOverrides = {}) {
  const ctx = contextFor(tinyRecipe({ ...extra, admission: { interval: 1, reproduceAbove: 0.5, low: LOW, high: HIGH, ...admission } }));
  const state = stateWith(ctx, [{ tag: 1, progress: OWN }, { tag: 2, progress: OWN }]);
  return { ctx, state };
}

function candidateEvents(events: readonly RunEvent[]): CandidateEvent[] {
  return events.filter((e): e is CandidateEvent => e.type === 'candidate');
}

describe('minimal criterion boundaries', () => {
  // admission.ts: too hard when best < low, too easy when best > high; the band is closed.
  const cases: [string, number, string][] = [
    ['exactly at low', LOW, 'admitted'],
    ['exactly at high', HIGH, 'admitted'],
    ['just below low', LOW - 1e-12, 'too-hard'],
    ['just above high', HIGH + 1e-12, 'too-easy'],
  ];
  it.each(cases)('a candidate whose best walker makes progress %s (%s) is %s', async (_, value, outcome) => {
    const { ctx, state } = setup({ candidates: 4, admitPerRound: 4, minNovelty: 0 });
    // Walker 1 (tag 2) is the better one on every candidate; walker 0 falls short of the band.
    const fake = new FakeEvaluator(ctx, (r) => (r.courseId !== null ? OWN : r.tag === 2 ? value : 0));
    const out = await step(state, ctx, fake);
    const live = candidateEvents(out.events).filter((e) => e.outcome !== 'duplicate');
    expect(live.length).toBeGreaterThan(0);
    for (const e of live) {
      expect(e.outcome).toBe(outcome);
      expect(e.bestProgress).toBe(value);
      expect(e.walkerId).toBe(1);
    }
    expect(out.state.courses.length - state.courses.length).toBe(outcome === 'admitted' ? live.length : 0);
  });
});

interface Planned {
  readonly ctx: RunContext;
  readonly state: RunState;
  readonly genomes: TerrainGenome[];
  /** Expected duplicates, worked out here from the genomes. */
  readonly duplicate: boolean[];
}

/**
 * Eight candidates, with an archived course that copies the first proposal's genome, so that
 * candidate is a duplicate of a course the run already has.
 */
function planned(admission: RecipeOverrides, extra: RecipeOverrides = {}): Planned {
  const { ctx, state: s0 } = setup({ candidates: 8, ...admission }, extra);
  const first = predictCandidates(ctx, s0).findIndex((c) => !c.duplicate);
  const copy = { ...courseRecord(2, predictCandidates(ctx, s0)[first].genome, 0, tagged(ctx, 1)), archivedAt: 0 };
  const state: RunState = { ...s0, courses: [...s0.courses, copy], nextCourseId: 3 };
  const genomes = predictCandidates(ctx, state).map((c) => c.genome);
  // An archived course changes no proposal, only what counts as seen.
  expect(genomes.map((g) => canonicalJson(g))).toEqual(predictCandidates(ctx, s0).map((c) => canonicalJson(c.genome)));
  const seen = new Set(state.courses.map((c) => canonicalJson(c.genome)));
  const duplicate = genomes.map((g) => {
    const dup = seen.has(canonicalJson(g));
    seen.add(canonicalJson(g));
    return dup;
  });
  expect(duplicate[first]).toBe(true);
  return { ctx, state, genomes, duplicate };
}

/** Live candidate number j gets: too hard, too easy, then in-band values that differ. */
function valueFor(j: number): number {
  return j === 0 ? 0.1 : j === 1 ? 0.95 : 0.3 + 0.05 * j;
}

async function runPlanned(p: Planned) {
  const liveIndex = p.duplicate.map((_, i) => p.duplicate.slice(0, i).filter((d) => !d).length);
  // The better walker alternates: tag 1 on even live candidates, tag 2 on odd ones.
  const fake = new FakeEvaluator(p.ctx, (r) => {
    if (r.courseId !== null) return OWN;
    const j = liveIndex[r.candidate!];
    const bestTag = j % 2 === 0 ? 1 : 2;
    return r.tag === bestTag ? valueFor(j) : valueFor(j) - 0.05;
  }, p.genomes);
  const out = await step(p.state, p.ctx, fake);
  return { out, fake, liveIndex, events: candidateEvents(out.events) };
}

const point = (p: Planned, g: TerrainGenome): number[] => normalisedDescriptor(g, p.ctx.family);

describe('candidate outcome records', () => {
  it('records one event per candidate, in proposal order, with its descriptor and parent', async () => {
    const p = planned({ admitPerRound: 2 });
    const { out, events } = await runPlanned(p);
    expect(events).toHaveLength(8);
    events.forEach((e, i) => {
      expect(e.iteration).toBe(1);
      expect(e.descriptor).toEqual(descriptor(p.genomes[i]));
      expect([0, 1]).toContain(e.parent);
    });
    expect(out.state.counters.candidates).toBe(8);
  });

  it('marks duplicates without evaluating them', async () => {
    const p = planned({ admitPerRound: 2 });
    const { events, fake } = await runPlanned(p);
    events.forEach((e, i) => {
      if (!p.duplicate[i]) return expect(e.outcome).not.toBe('duplicate');
      expect(e).toMatchObject({ outcome: 'duplicate', courseId: null, bestProgress: 0, walkerId: null, novelty: null });
      expect(fake.all().some((r) => r.candidate === i)).toBe(false);
    });
  });

  it('reports the best walker and its progress for candidates outside the band', async () => {
    const p = planned({ admitPerRound: 2 });
    const { events, liveIndex } = await runPlanned(p);
    const out = events.filter((_, i) => !p.duplicate[i] && liveIndex[i] < 2);
    expect(out.map((e) => e.outcome)).toEqual(['too-hard', 'too-easy']);
    out.forEach((e, j) => expect(e).toMatchObject({ bestProgress: valueFor(j), walkerId: j % 2, novelty: null, courseId: null }));
  });

  it('admits at most admitPerRound, the most novel first, with new course ids in proposal order', async () => {
    // k no larger than the run's 3 courses: then adding references can only lower a novelty.
    const p = planned({ admitPerRound: 2, minNovelty: 0 }, { novelty: { k: 3 } });
    expect(p.state.courses.length).toBeGreaterThanOrEqual(p.ctx.recipe.novelty.k);
    const { out, events, liveIndex } = await runPlanned(p);
    const inBand = events.map((e, i) => ({ e, i })).filter(({ i }) => !p.duplicate[i] && liveIndex[i] >= 2);
    expect(inBand.length).toBeGreaterThanOrEqual(3);
    const admitted = inBand.filter(({ e }) => e.outcome === 'admitted');
    expect(admitted.map(({ e }) => e.courseId)).toEqual([3, 4]);
    expect(inBand.filter(({ e }) => e.outcome === 'not-novel')).toHaveLength(inBand.length - 2);
    // Greedy: the candidate most novel against the run's courses (archived ones included) is taken.
    const refs0 = p.state.courses.map((c) => point(p, c.genome));
    const n0 = inBand.map(({ i }) => knnNovelty(point(p, p.genomes[i]), refs0, p.ctx.recipe.novelty.k));
    const top = inBand[n0.indexOf(Math.max(...n0))];
    expect(top.e.outcome).toBe('admitted');
    expect(top.e.novelty).toBeCloseTo(Math.max(...n0), 12);
    // The rest were measured against every course including the admitted ones, and none beats an admitted one.
    const refs1 = out.state.courses.map((c) => point(p, c.genome));
    for (const { e, i } of inBand.filter(({ e }) => e.outcome === 'not-novel')) {
      expect(e.novelty).toBeCloseTo(knnNovelty(point(p, p.genomes[i]), refs1, p.ctx.recipe.novelty.k), 12);
      for (const a of admitted) expect(e.novelty!).toBeLessThanOrEqual(a.e.novelty!);
    }
  });

  it('turns each admitted candidate into a course and a pair seeded from the best walker', async () => {
    const p = planned({ admitPerRound: 2 });
    const { out, events } = await runPlanned(p);
    const admitted = events.map((e, i) => ({ e, i })).filter(({ e }) => e.outcome === 'admitted');
    expect(admitted).toHaveLength(2);
    admitted.forEach(({ e, i }, n) => {
      const rec = out.state.courses.find((c) => c.id === e.courseId)!;
      expect(rec).toMatchObject({ parent: e.parent, admittedAt: 1, archivedAt: null, solvedAt: null });
      expect(rec.genome).toEqual(p.genomes[i]);
      expect(rec.admission).toEqual({ bestProgress: e.bestProgress, walkerId: e.walkerId, novelty: e.novelty });
      const pair = out.state.pairs.find((q) => q.courseId === e.courseId)!;
      expect(pair.walkerId).toBe(2 + n);
      expect(rec.holders).toEqual([{ walkerId: pair.walkerId, since: 1, how: 'seed' }]);
      expect(pair.es.t).toBe(0);
      expect(pair.progress).toBe(e.bestProgress);
      // Seeded with the weights that made the best progress: that walker's mean after this iteration's ES step.
      const parentWalker = out.state.pairs.find((q) => q.walkerId === e.walkerId)!;
      expect(pair.es.mean).toEqual(parentWalker.es.mean);
    });
    expect(out.state.nextCourseId).toBe(5);
    expect(out.state.nextWalkerId).toBe(4);
  });

  it('refuses every in-band candidate as not novel when minNovelty is out of reach', async () => {
    const p = planned({ admitPerRound: 8, minNovelty: 1e6 });
    const { out, events, liveIndex } = await runPlanned(p);
    const inBand = events.filter((_, i) => !p.duplicate[i] && liveIndex[i] >= 2);
    expect(inBand.length).toBeGreaterThan(0);
    for (const e of inBand) {
      expect(e.outcome).toBe('not-novel');
      expect(e.novelty).toBeLessThan(1e6);
    }
    expect(out.state.courses).toHaveLength(p.state.courses.length);
  });

  it('admits a candidate whose novelty equals minNovelty and refuses the less novel', async () => {
    // k no larger than the run's 3 courses, so admitting one can only lower the others' novelty.
    const probe = planned({}, { novelty: { k: 3 } });
    const { liveIndex } = await runPlanned(probe);
    const refs0 = probe.state.courses.map((c) => point(probe, c.genome));
    const inBand = probe.genomes.map((g, i) => i).filter((i) => !probe.duplicate[i] && liveIndex[i] >= 2);
    const n0 = inBand.map((i) => knnNovelty(point(probe, probe.genomes[i]), refs0, probe.ctx.recipe.novelty.k));
    const best = Math.max(...n0);
    expect(n0.filter((n) => n === best)).toHaveLength(1);
    const p = planned({ admitPerRound: 8, minNovelty: best }, { novelty: { k: 3 } });
    const { events } = await runPlanned(p);
    inBand.forEach((i, j) => expect(events[i].outcome).toBe(n0[j] === best ? 'admitted' : 'not-novel'));
  });
});
