import { canonicalJson, stream, type Stream } from '../core/index.js';
import type { Evaluator } from '../pool/index.js';
import { buildCourse, descriptor, mutate, normalisedDescriptor, type TerrainGenome } from '../terrain/index.js';
import { PhaseBatch } from './batch.js';
import { freshEs, type RunContext } from './context.js';
import type { Draft } from './draft.js';
import { childCounts, lineages } from './lineage.js';
import { knnNovelty, noveltyMeasure } from './novelty.js';
import { predictedTooEasy, withinWindow } from './screen.js';
import type { CandidateOutcome, CourseRecord, PairState } from './state.js';

/** One proposed terrain and what admission found about it. */
export interface Candidate {
  readonly parent: number;
  readonly genome: TerrainGenome;
  outcome: CandidateOutcome | null;
  bestProgress: number;
  walkerId: number | null;
  params: readonly number[] | null;
  novelty: number | null;
  /** Point used for novelty (normalised descriptor or performance profile). */
  point: number[];
  /** Id given on admission. */
  courseId: number | null;
}

/**
 * Draws one parent among `eligible` pairs so that lineages grow side by side rather than as
 * one chain: first a lineage, uniformly among those with an eligible pair; then a pair in it,
 * with weight 1 / (1 + children its course already has).
 */
export function drawParent(draft: Draft, eligible: readonly PairState[], s: Stream): PairState {
  const of = lineages(draft.courses);
  const groups = new Map<number, PairState[]>();
  for (const p of eligible) {
    const id = of.get(p.courseId)!;
    groups.set(id, [...(groups.get(id) ?? []), p]);
  }
  const ids = [...groups.keys()].sort((a, b) => a - b);
  const members = groups.get(ids[s.int(ids.length)])!;
  const children = childCounts(draft.courses);
  const weights = members.map((p) => 1 / (1 + (children.get(p.courseId) ?? 0)));
  let r = s.next() * weights.reduce((a, b) => a + b, 0);
  for (let i = 0; i < members.length; i++) {
    r -= weights[i];
    if (r < 0) return members[i];
  }
  return members[members.length - 1];
}

/**
 * Mutates eligible parents' genomes into candidates; a parent with mutation strength m mutates
 * each child 1 to 2m − 1 times (uniform, mean m). Genomes seen before are marked duplicates.
 * With the recipe's admission.screen on, a proposal predicted too easy (see predictedTooEasy)
 * is returned with outcome 'screened' and another drawn in its place, until `candidates` are
 * left for rollouts or `draws` × candidates proposals were made.
 */
export function proposeCandidates(ctx: RunContext, draft: Draft): Candidate[] {
  const a = ctx.recipe.admission;
  const parents = draft.pairs.filter((p) => p.progress >= a.reproduceAbove);
  if (parents.length === 0) return [];
  const s = stream(ctx.recipe.seed, `iteration/${draft.iteration}/admission`);
  const seen = new Set(draft.courses.map((c) => canonicalJson(c.genome)));
  const memory = a.screen ? withinWindow(draft.screen ?? [], draft.iteration, a.screen.window) : [];
  const out: Candidate[] = [];
  let kept = 0;
  for (let drawn = 0; kept < a.candidates && drawn < a.candidates * (a.screen?.draws ?? 1); drawn++) {
    const parent = drawParent(draft, parents, s);
    const from = draft.course(parent.courseId);
    let genome = from.genome;
    const times = 1 + s.int(2 * from.mutationSteps - 1);
    for (let m = 0; m < times; m++) genome = mutate(genome, ctx.family, s);
    const key = canonicalJson(genome);
    const duplicate = seen.has(key);
    seen.add(key);
    const screened = !duplicate && a.screen !== undefined && predictedTooEasy(normalisedDescriptor(genome, ctx.family), memory, a.screen.k);
    if (!screened) kept++;
    out.push({ parent: parent.courseId, genome, outcome: duplicate ? 'duplicate' : screened ? 'screened' : null, bestProgress: 0, walkerId: null, params: null, novelty: null, point: [], courseId: null });
  }
  return out;
}

/** Evaluates every active walker on every live candidate (and, for profile novelty, on every course); fills in outcomes. */
export async function admissionPhase(ctx: RunContext, draft: Draft, evaluator: Evaluator): Promise<void> {
  const cands = proposeCandidates(ctx, draft);
  if (cands.length === 0) return;
  const live = cands.filter((c) => c.outcome === null);
  const measure = noveltyMeasure(ctx);
  const b = new PhaseBatch(ctx, draft);
  const walkers = draft.pairs.map((p) => ({ pair: p, params: p.es.mean }));
  const candTasks = live.map((c) => {
    const course = b.candidate(buildCourse(c.genome, ctx.family));
    return walkers.map((w) => b.rollout(course, w.params));
  });
  const readRefs = measure.references(b, draft.courses, walkers.map((w) => w.params));
  const results = await b.run(evaluator, draft);
  const { low, high } = ctx.recipe.admission;
  live.forEach((c, i) => {
    const progress = candTasks[i].map((t) => results.progress(t));
    let best = 0;
    for (let w = 1; w < progress.length; w++) if (progress[w] > progress[best]) best = w;
    c.bestProgress = progress[best];
    c.walkerId = walkers[best].pair.walkerId;
    c.params = walkers[best].params;
    c.point = measure.point(c.genome, progress);
    if (c.bestProgress < low) c.outcome = 'too-hard';
    else if (c.bestProgress > high) c.outcome = 'too-easy';
  });
  const refs = readRefs(results);
  // Before admission, so admitted children inherit their parent's adapted strength.
  adaptMutationSteps(ctx, draft, live);
  admitByNovelty(ctx, draft, live.filter((c) => c.outcome === null), refs);
  const screened = cands.filter((c) => c.outcome === 'screened').length;
  draft.counters.candidates += cands.length - screened;
  draft.counters.tooEasy += cands.filter((c) => c.outcome === 'too-easy').length;
  const screen = ctx.recipe.admission.screen;
  if (screen) {
    draft.counters.screened = (draft.counters.screened ?? 0) + screened;
    const fresh = live.map((c) => ({ iteration: draft.iteration, point: normalisedDescriptor(c.genome, ctx.family), tooEasy: c.outcome === 'too-easy' }));
    draft.screen = withinWindow([...(draft.screen ?? []), ...fresh], draft.iteration, screen.window);
  }
  draft.counters.tooHard += cands.filter((c) => c.outcome === 'too-hard').length;
  for (const c of cands) {
    draft.events.push({
      type: 'candidate', iteration: draft.iteration, parent: c.parent, outcome: c.outcome!, courseId: c.courseId,
      bestProgress: c.bestProgress, walkerId: c.walkerId, novelty: c.novelty, descriptor: descriptor(c.genome),
    });
  }
  retireOverCap(ctx, draft);
}

/**
 * Adapts each parent's mutation strength to where its children fell this round: when more
 * than half of its evaluated children were too easy, one step more (up to
 * `admission.mutations`); when more than half were too hard, one step fewer (down to 1).
 * In the spirit of step-size control by success rate in evolution strategies.
 */
export function adaptMutationSteps(ctx: RunContext, draft: Draft, evaluated: readonly Candidate[]): void {
  const byParent = new Map<number, { easy: number; hard: number; n: number }>();
  for (const c of evaluated) {
    const t = byParent.get(c.parent) ?? { easy: 0, hard: 0, n: 0 };
    t.n++;
    if (c.outcome === 'too-easy') t.easy++;
    if (c.outcome === 'too-hard') t.hard++;
    byParent.set(c.parent, t);
  }
  for (const [id, t] of [...byParent].sort(([a], [b]) => a - b)) {
    const c = draft.course(id);
    let steps = c.mutationSteps;
    if (2 * t.easy > t.n) steps = Math.min(ctx.recipe.admission.mutations, steps + 1);
    else if (2 * t.hard > t.n) steps = Math.max(1, steps - 1);
    if (steps !== c.mutationSteps) draft.setCourse({ ...c, mutationSteps: steps });
  }
}

/**
 * Greedy novelty ranking: repeatedly admit the most novel survivor (ties: earliest proposed),
 * counting each admitted one as a reference for the rest, so two near-identical candidates are
 * not both admitted. Survivors below minNovelty or beyond admitPerRound are 'not-novel'.
 */
function admitByNovelty(ctx: RunContext, draft: Draft, survivors: Candidate[], refs: number[][]): void {
  const { k } = ctx.recipe.novelty;
  const { admitPerRound, minNovelty } = ctx.recipe.admission;
  const pool = [...survivors];
  const admitted: Candidate[] = [];
  while (pool.length > 0) {
    for (const c of pool) c.novelty = knnNovelty(c.point, refs, k);
    let best = 0;
    for (let i = 1; i < pool.length; i++) if (pool[i].novelty! > pool[best].novelty!) best = i;
    const c = pool[best];
    if (admitted.length >= admitPerRound || c.novelty! < minNovelty) break;
    pool.splice(best, 1);
    c.outcome = 'admitted';
    admitted.push(c);
    refs.push(c.point);
  }
  for (const c of pool) c.outcome = 'not-novel';
  // Admit in proposal order so course ids follow the candidates' order.
  for (const c of survivors) if (c.outcome === 'admitted') admit(ctx, draft, c);
}

function admit(ctx: RunContext, draft: Draft, c: Candidate): void {
  const id = draft.nextCourseId++;
  c.courseId = id;
  const walkerId = draft.newWalkerId();
  const params = [...c.params!];
  const rec: CourseRecord = {
    id, parent: c.parent, admittedAt: draft.iteration, genome: c.genome, descriptor: descriptor(c.genome),
    admission: { bestProgress: c.bestProgress, walkerId: c.walkerId, novelty: c.novelty ?? 0 },
    best: { progress: c.bestProgress, walkerId, iteration: draft.iteration, params },
    crossedAt: null, solvedAt: null, solvedBy: null, confirmTries: 0, lastConfirmAt: null, rollouts: 0, mutationSteps: draft.course(c.parent).mutationSteps, archivedAt: null,
    holders: [{ walkerId, since: draft.iteration, how: 'seed' }],
  };
  draft.courses.push(rec);
  const pair: PairState = { courseId: id, walkerId, es: freshEs(ctx, params, `course/${id}/walker/${walkerId}/es-noise`), progress: c.bestProgress };
  draft.pairs.push(pair);
}

/**
 * The pair to retire next. Protected pairs (crossed but not yet confirmed, within
 * `solve.patience` iterations of crossing) go last, so they keep training toward a confirmed
 * solve; before them, pairs admitted in this very round (oldest first). Among the rest, a pair whose lineage has another active pair goes before the last pair
 * of a lineage, so lineages are not lost while others have pairs to spare; then solved pairs
 * (earliest solved first) before unsolved ones (oldest first). Protected pairs among themselves:
 * earliest crossed first.
 */
export function nextToRetire(ctx: RunContext, draft: Draft): PairState {
  const patience = ctx.recipe.solve.patience;
  const of = lineages(draft.courses);
  const perLineage = new Map<number, number>();
  for (const p of draft.pairs) perLineage.set(of.get(p.courseId)!, (perLineage.get(of.get(p.courseId)!) ?? 0) + 1);
  const rank = (p: PairState, i: number): number[] => {
    const c = draft.course(p.courseId);
    if (c.solvedAt === null && c.crossedAt !== null && draft.iteration - c.crossedAt < patience) return [2, 0, 0, c.crossedAt, i];
    if (c.admittedAt === draft.iteration && c.parent !== null) return [1, 0, 0, 0, i];
    const last = perLineage.get(of.get(p.courseId)!) === 1 ? 1 : 0;
    return c.solvedAt !== null ? [0, last, 0, c.solvedAt, i] : [0, last, 1, 0, i];
  };
  let best = 0;
  let bestRank = rank(draft.pairs[0], 0);
  draft.pairs.forEach((p, i) => {
    const r = rank(p, i);
    const cmp = r.findIndex((v, k) => v !== bestRank[k]);
    if (cmp >= 0 && r[cmp] < bestRank[cmp]) [best, bestRank] = [i, r];
  });
  return draft.pairs[best];
}

/** The order in which pairs would retire if all had to go, one at a time (see nextToRetire). */
export function retirementOrder(ctx: RunContext, draft: Draft): PairState[] {
  const saved = draft.pairs;
  const out: PairState[] = [];
  try {
    while (draft.pairs.length > 0) {
      const p = nextToRetire(ctx, draft);
      out.push(p);
      draft.pairs = draft.pairs.filter((q) => q !== p);
    }
  } finally {
    draft.pairs = saved;
  }
  return out;
}

/** Retires pairs to the archive, one at a time in the order of nextToRetire, while there are more than maxActive. */
function retireOverCap(ctx: RunContext, draft: Draft): void {
  while (draft.pairs.length > ctx.recipe.population.maxActive) {
    const old = nextToRetire(ctx, draft);
    draft.pairs = draft.pairs.filter((p) => p !== old);
    draft.setCourse({ ...draft.course(old.courseId), archivedAt: draft.iteration });
    draft.events.push({ type: 'retired', iteration: draft.iteration, courseId: old.courseId, walkerId: old.walkerId, progress: old.progress });
  }
}
