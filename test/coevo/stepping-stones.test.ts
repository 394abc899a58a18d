/**
 * Crossed vs solved bookkeeping, confirmation retries, retirement order, per-course rollouts,
 * lineages, parent choice, and the two measures (new ground, coverage) on hand-built states.
 * Expected distances and grid cells are worked out here from the family file's ranges and
 * Pythagoras, not from cairn's descriptor code.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { stream } from '../../src/core/index.js';
import {
  coverage, coveredCells, drawParent, gridSpec, lineageOf, liveLineages, newGround, retirementOrder, step,
  type CourseRecord, type RunEvent, type RunState,
} from '../../src/coevo/index.js';
import { proposeCandidates } from '../../src/coevo/admission.js';
import { Draft } from '../../src/coevo/draft.js';
import { difficulty, normalisedDescriptor, type TerrainGenome } from '../../src/terrain/index.js';
import { contextFor, courseRecord, FakeEvaluator, ROOT, stateWith, tinyRecipe, type FakeRollout } from './helpers.js';

const THRESHOLD = 0.9;
const MIXED = join(ROOT, 'envs/terrain/mixed.json');

/** Two pairs; walker 0 (tag 1) makes `own` on its course, walker 1 makes 0.5; strict checks give `strict`. */
function solveSetup(over: Record<string, unknown> = {}) {
  return contextFor(tinyRecipe({ solve: { threshold: THRESHOLD, checks: 2, push: 0.3, retryEvery: 3, ...over } }));
}

describe('crossed and solved', () => {
  it('records the first crossing once, with a crossed event, whether or not it is confirmed', async () => {
    const ctx = solveSetup();
    let state = stateWith(ctx, [{ tag: 1, progress: 0 }, { tag: 2, progress: 0 }]);
    const fake = new FakeEvaluator(ctx, (r) => (r.strict ? 0.5 : r.tag === 1 ? 0.95 : 0.5));
    const events: RunEvent[] = [];
    for (let i = 0; i < 3; i++) {
      const out = await step(state, ctx, fake);
      state = out.state;
      events.push(...out.events);
      expect(out.metrics).toMatchObject({ crossed: 1, solved: 0 });
    }
    expect(events.filter((e) => e.type === 'crossed')).toEqual([{ type: 'crossed', iteration: 1, courseId: 0, walkerId: 0, progress: 0.95 }]);
    expect(state.courses[0]).toMatchObject({ crossedAt: 1, solvedAt: null });
    expect(state.courses[1]).toMatchObject({ crossedAt: null, solvedAt: null });
  });

  it('retries a failed confirmation every solve.retryEvery iterations, and solves when a retry passes', async () => {
    const ctx = solveSetup();
    let state = stateWith(ctx, [{ tag: 1, progress: 0 }, { tag: 2, progress: 0 }]);
    // Walker 0 makes 0.95 everywhere except in pushed strict rollouts (the second check), which
    // fall short until iteration 7.
    let iteration = 0;
    const fake = new FakeEvaluator(ctx, (r) => (r.tag !== 1 ? 0.5 : r.strict && r.push !== 0 && iteration < 7 ? 0.2 : 0.95));
    const tried: number[] = [];
    for (iteration = 1; iteration <= 9; iteration++) {
      const out = await step(state, ctx, fake);
      state = out.state;
      if (out.events.some((e) => e.type === 'solved' || e.type === 'unconfirmed')) tried.push(iteration);
    }
    expect(tried).toEqual([1, 4, 7]);
    expect(state.courses[0]).toMatchObject({ crossedAt: 1, solvedAt: 7, confirmTries: 3, lastConfirmAt: 7 });
    expect(state.courses[0].solvedBy).toMatchObject({ walkerId: 0, iteration: 7, progress: 0.95 });
  });

  it('trains a course under the stricter solver once a confirmation on it has been tried', async () => {
    const ctx = solveSetup();
    let state = stateWith(ctx, [{ tag: 1, progress: 0 }, { tag: 2, progress: 0 }]);
    const fake = new FakeEvaluator(ctx, (r) => (r.tag !== 1 ? 0.5 : r.strict && r.push !== 0 ? 0.2 : 0.95));
    const esStrict: boolean[][] = [];
    for (let i = 1; i <= 3; i++) {
      const before = fake.all().length;
      state = (await step(state, ctx, fake)).state;
      // ES rollouts are the mirrored candidates (sign ±1); group them by course.
      const es = fake.all().slice(before).filter((r) => r.sign !== 0);
      esStrict.push([0, 1].map((id) => es.filter((r) => r.courseId === id).every((r) => r.strict)));
    }
    // Iteration 1: both under the run's solver; course 0 is checked (and fails) in iteration 1.
    expect(esStrict).toEqual([[false, false], [true, false], [true, false]]);
  });

  it('judges transfers onto a course under the solver its walker trains under', async () => {
    const ctx = contextFor(tinyRecipe({ transfer: { interval: 1, fineTuneTop: 0, margin: 0.01 } }));
    const base = stateWith(ctx, [{ tag: 1, progress: 0 }, { tag: 2, progress: 0 }]);
    // Course 0 has had a confirmation tried (so it trains under the stricter solver); course 1 has not.
    const state: RunState = { ...base, courses: base.courses.map((c) => (c.id === 0 ? { ...c, confirmTries: 1, crossedAt: 0, lastConfirmAt: 0 } : c)) };
    // On course 0 walker 1 is the better walker under the stricter solver, walker 2 under the run's own;
    // on course 1 walker 1 is better under the run's own solver.
    const rule = (r: FakeRollout): number => {
      if (r.courseId === 0) return r.strict ? (r.tag === 1 ? 0.9 : 0.5) : r.tag === 1 ? 0.3 : 0.8;
      return r.strict ? 0.1 : r.tag === 1 ? 0.6 : 0.5;
    };
    const fake = new FakeEvaluator(ctx, rule);
    const out = await step(state, ctx, fake);
    const takeovers = out.events.filter((e) => e.type === 'takeover');
    expect(takeovers).toHaveLength(1);
    expect(takeovers[0]).toMatchObject({ courseId: 1, fromCourse: 0, progress: 0.6, incumbentProgress: 0.5 });
    expect(out.state.pairs.find((p) => p.courseId === 0)!.walkerId).toBe(0);
    // Every rollout on course 0 ran under the stricter solver, none on course 1.
    const all = fake.all().filter((r) => r.courseId !== null);
    expect(all.filter((r) => r.courseId === 0).every((r) => r.strict)).toBe(true);
    expect(all.filter((r) => r.courseId === 1).some((r) => r.strict)).toBe(false);
  });

  it('charges every rollout on a run course to that course: ES steps, confirmations', async () => {
    const ctx = solveSetup();
    const state = stateWith(ctx, [{ tag: 1, progress: 0 }, { tag: 2, progress: 0 }]);
    const out = await step(state, ctx, new FakeEvaluator(ctx, (r) => (r.strict ? 1 : r.tag === 1 ? 0.95 : 0.5)));
    const perEs = 1 + ctx.recipe.es.population;
    expect(out.state.courses.map((c) => c.rollouts)).toEqual([perEs + ctx.recipe.solve.checks, perEs]);
    expect(out.state.courses.reduce((a, c) => a + c.rollouts, 0)).toBe(out.state.counters.rollouts);
  });
});

describe('retirement order', () => {
  /** Four pairs at iteration 20: course 0 solved at 12, course 1 crossed at `crossedAt`, courses 2 and 3 neither. */
  function fourPairs(crossedAt: number, patience: number) {
    const ctx = contextFor(tinyRecipe({ solve: { threshold: THRESHOLD, checks: 2, patience } }));
    const s = stateWith(ctx, [0, 1, 2, 3].map((tag) => ({ tag, progress: 0.5 })), 20);
    const courses = s.courses.map((c): CourseRecord => {
      if (c.id === 0) return { ...c, crossedAt: 10, solvedAt: 12, solvedBy: c.best };
      if (c.id === 1) return { ...c, crossedAt };
      return c;
    });
    const draft = new Draft({ ...s, courses }, 21);
    return retirementOrder(ctx, draft).map((p) => p.courseId);
  }

  // stateWith gives course 0 no parent and courses 1-3 parent 0: four lineages of one pair each,
  // so the last-of-lineage rule does not separate them.
  it('retires solved pairs first, then unprotected ones oldest first, and crossed-unconfirmed ones last', () => {
    expect(fourPairs(18, 10)).toEqual([0, 2, 3, 1]);
  });

  it('stops protecting a crossed pair solve.patience iterations after it crossed', () => {
    // Crossed at 11, now 21: 10 iterations ago, patience 10 → no longer protected; oldest first.
    expect(fourPairs(11, 10)).toEqual([0, 1, 2, 3]);
  });

  it('retires a pair whose lineage has others before the last pair of a lineage', () => {
    const ctx = contextFor(tinyRecipe({ solve: { threshold: THRESHOLD, checks: 2 } }));
    const s = stateWith(ctx, [0, 1, 2, 3].map((tag) => ({ tag, progress: 0.5 })), 20);
    // Course 3 becomes a child of course 1: lineage 1 = {1, 3}; lineages 0 and 2 have one pair each.
    const courses = s.courses.map((c): CourseRecord => (c.id === 3 ? { ...c, parent: 1 } : c));
    const order = retirementOrder(ctx, new Draft({ ...s, courses }, 21)).map((p) => p.courseId);
    // 1 (oldest of lineage 1); then 3 is its lineage's last, like 0 and 2: oldest first.
    expect(order).toEqual([1, 0, 2, 3]);
  });

  it('keeps pairs admitted in this round until the others have gone', () => {
    const ctx = contextFor(tinyRecipe({ solve: { threshold: THRESHOLD, checks: 2 } }));
    const s = stateWith(ctx, [0, 1, 2].map((tag) => ({ tag, progress: 0.5 })), 20);
    const courses = s.courses.map((c): CourseRecord => (c.id === 1 ? { ...c, admittedAt: 21 } : c));
    expect(retirementOrder(ctx, new Draft({ ...s, courses }, 21)).map((p) => p.courseId)).toEqual([0, 2, 1]);
  });
});

/** A course record of the mixed family with the given features, solved at `solvedAt`. */
function solvedCourse(id: number, features: TerrainGenome['features'], solvedAt: number | null, parent: number | null = 0): CourseRecord {
  const genome: TerrainGenome = { roughness: { amplitude: 0, seed: 0 }, features };
  const c = courseRecord(id, genome, id, [0]);
  return { ...c, parent: id === 0 ? null : parent, crossedAt: solvedAt, solvedAt, solvedBy: solvedAt === null ? null : c.best };
}

describe('new ground and coverage', () => {
  const family = JSON.parse(readFileSync(MIXED, 'utf8'));
  const maxGap = family.kinds.gap.width.max; // 1.2 m in envs/terrain/mixed.json
  const maxStep = family.kinds.step.height.max; // 0.5 m
  const maxCount = family.maxFeatures; // 10
  const ctx = contextFor(tinyRecipe({ terrain: MIXED, measures: { newGroundDistance: 0.2, grid: { components: ['gapWidth', 'stepUp'], bins: 4 } } }));
  const gap = (w: number, x = 6) => ({ kind: 'gap' as const, x, width: w });
  const up = (h: number, x = 10) => ({ kind: 'step' as const, x, height: h });
  // Normalised points (gapWidth, stepUp, count; other components 0):
  // c0 flat (0, 0, 0); c1 (0.6, 0, 0.1); c2 (0.7, 0, 0.1); c3 (0, 0.6, 0.1); c4 gap at its maximum (1, 0, 0.1).
  const courses = [
    solvedCourse(0, [], 1),
    solvedCourse(1, [gap(0.6 * maxGap)], 5),
    solvedCourse(2, [gap(0.7 * maxGap)], 9),
    solvedCourse(3, [up(0.6 * maxStep)], 14),
    solvedCourse(4, [gap(maxGap)], null),
  ];

  it('the test genomes have the normalised descriptors the comments say', () => {
    const count = 1 / maxCount;
    expect(normalisedDescriptor(courses[1].genome, ctx.family)).toEqual([0.6, 0, 0, 0, 0, 0, 0, count].map((v) => expect.closeTo(v, 12)));
    expect(normalisedDescriptor(courses[3].genome, ctx.family)).toEqual([0, 0.6, 0, 0, 0, 0, 0, count].map((v) => expect.closeTo(v, 12)));
  });

  it('counts solved courses farther than the distance from every earlier solved one, in solve order', () => {
    // c0 counts (first); c1 is √(0.6² + 0.1²) ≈ 0.61 from c0: counts; c2 is 0.1 from c1: does not;
    // c3 is ≥ √(0.6² + 0.1²) from c0 and √(0.6² + 0.6²) ≈ 0.85 from c1: counts; c4 is not solved.
    expect(newGround(courses, ctx.family, 0.2)).toBe(3);
    // With a distance of 0.05 every solved course is new ground (closest pair: 0.1 apart).
    expect(newGround(courses, ctx.family, 0.05)).toBe(4);
    // With 0.62 only c0 counts: c1 and c3 are √0.37 ≈ 0.608 from c0, c2 is 0.1 from c1.
    expect(newGround(courses, ctx.family, 0.62)).toBe(1);
    // Solve order matters: if c2 had been solved before c1, c2 counts and c1 does not; the total is the same.
    const swapped = courses.map((c) => (c.id === 2 ? { ...c, solvedAt: 3 } : c));
    expect(newGround(swapped, ctx.family, 0.2)).toBe(3);
  });

  it('puts each solved course in its grid cell and counts occupied cells', () => {
    // Four bins per component: 0.6 and 0.7 → bin 2, 0 → bin 0, 1 (the maximum) → the last bin, 3.
    const cells = coveredCells(courses, ctx.family, gridSpec(ctx.recipe));
    expect(Object.fromEntries(cells)).toEqual({ '0,0': [0], '2,0': [1, 2], '0,2': [3] });
    expect(coverage(courses, ctx.family, gridSpec(ctx.recipe))).toBe(3);
    const all = courses.map((c) => (c.id === 4 ? { ...c, solvedAt: 20 } : c));
    expect(Object.fromEntries(coveredCells(all, ctx.family, gridSpec(ctx.recipe)))).toMatchObject({ '3,0': [4] });
  });

  it('refuses grid components that are not descriptor components (exit-2 error naming the field)', () => {
    expect(() => tinyRecipe({ measures: { grid: { components: ['gapWidth', 'wobble'] } } })).toThrow(/measures\.grid\.components\.1.*wobble/);
  });
});

describe('lineages and parent choice', () => {
  const ctx = contextFor(tinyRecipe({ terrain: MIXED }));
  // Tree: 0 → 1 → 3 → 4, 0 → 2. Lineages: {0}, {1, 3, 4}, {2}.
  const gap = (x: number) => ({ kind: 'gap' as const, x, width: 0.5 });
  const slope = (x: number) => ({ kind: 'slope' as const, x, length: 2, grade: 0.2 });
  const courses = [
    solvedCourse(0, [], null, null),
    solvedCourse(1, [gap(6)], null, 0),
    solvedCourse(2, [slope(6)], null, 0),
    solvedCourse(3, [gap(6), gap(10)], null, 1),
    solvedCourse(4, [gap(6), gap(10), slope(14)], null, 3),
  ];

  it('names each course by the child of the start it descends from', () => {
    expect(courses.map((c) => lineageOf(courses, c.id))).toEqual([0, 1, 2, 1, 1]);
  });

  it('lists live lineages with their dominant feature kind', () => {
    const base = stateWith(ctx, [{ tag: 1, progress: 0.5 }, { tag: 2, progress: 0.5 }, { tag: 3, progress: 0.5 }]);
    const state: RunState = { ...base, courses, pairs: [{ ...base.pairs[0], courseId: 4 }, { ...base.pairs[1], courseId: 3 }, { ...base.pairs[2], courseId: 2 }] };
    const live = liveLineages(state, (g) => difficulty(g, ctx.family));
    expect(live.map(({ id, active, courses: n, kind }) => ({ id, active, n, kind }))).toEqual([
      { id: 1, active: [3, 4], n: 3, kind: 'gap' },
      { id: 2, active: [2], n: 1, kind: 'slope' },
    ]);
  });

  it('draws parents lineage by lineage: a lineage with one eligible pair is drawn as often as one with three', () => {
    const base = stateWith(ctx, [1, 2, 3, 4].map((tag) => ({ tag, progress: 0.8 })));
    const state: RunState = { ...base, courses, pairs: [1, 3, 4, 2].map((id, i) => ({ ...base.pairs[i], courseId: id })) };
    const draft = new Draft(state, 1);
    const s = stream(5, 'test/parents');
    const n = 4000;
    let lone = 0;
    for (let i = 0; i < n; i++) if (drawParent(draft, draft.pairs, s).courseId === 2) lone++;
    // Expected share 1/2; binomial standard deviation √(0.25 / 4000) ≈ 0.008, so ±0.04 is five of them.
    expect(lone / n).toBeGreaterThan(0.46);
    expect(lone / n).toBeLessThan(0.54);
  });

  it('mutates children of a stronger course farther on average', () => {
    const meanStep = (steps: number): number => {
      const c = contextFor(tinyRecipe({ terrain: MIXED, admission: { interval: 1, candidates: 200, reproduceAbove: 0, mutations: 8 } }));
      const base = stateWith(c, [{ tag: 1, progress: 0.5 }]);
      const st: RunState = { ...base, courses: base.courses.map((k) => ({ ...k, mutationSteps: steps })) };
      const parent = normalisedDescriptor(st.courses[0].genome, c.family);
      const cands = proposeCandidates(c, new Draft(st, 1));
      const d = cands.map((k) => Math.hypot(...normalisedDescriptor(k.genome, c.family).map((v, i) => v - parent[i])));
      return d.reduce((a, b) => a + b, 0) / d.length;
    };
    expect(meanStep(4)).toBeGreaterThan(1.3 * meanStep(1));
  });

  it('raises a parent\'s mutation strength when most of its children were too easy, lowers it when most were too hard', async () => {
    const c = contextFor(tinyRecipe({ terrain: MIXED, admission: { interval: 1, candidates: 6, reproduceAbove: 0.3, low: 0.2, high: 0.8, mutations: 2 } }));
    let state = stateWith(c, [{ tag: 1, progress: 0.5 }]);
    const steps = async (candidateProgress: number): Promise<number> => {
      state = (await step(state, c, new FakeEvaluator(c, (r) => (r.courseId !== null ? 0.5 : candidateProgress)))).state;
      return state.courses[0].mutationSteps;
    };
    expect(await steps(0.95)).toBe(2);
    expect(await steps(0.95)).toBe(2); // capped at admission.mutations
    expect(await steps(0.05)).toBe(1);
    expect(await steps(0.05)).toBe(1); // never below 1
    // In band: admitted children inherit the parent's strength at the time.
    state = { ...state, courses: state.courses.map((k) => (k.id === 0 ? { ...k, mutationSteps: 2 } : k)) };
    await steps(0.5);
    const children = state.courses.filter((k) => k.parent === 0);
    expect(children.length).toBeGreaterThan(0);
    for (const k of children) expect(k.mutationSteps).toBe(2);
  });
});
