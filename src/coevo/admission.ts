import { canonicalJson, stream } from '../core/index.js';
import type { Evaluator } from '../pool/index.js';
import { buildCourse, descriptor, mutate, type TerrainGenome } from '../terrain/index.js';
import { PhaseBatch } from './batch.js';
import { freshEs, type RunContext } from './context.js';
import type { Draft } from './draft.js';
import { knnNovelty, noveltyMeasure } from './novelty.js';
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

/** Mutates eligible parents' genomes into candidates; genomes seen before are marked duplicates. */
export function proposeCandidates(ctx: RunContext, draft: Draft): Candidate[] {
  const a = ctx.recipe.admission;
  const parents = draft.pairs.filter((p) => p.progress >= a.reproduceAbove);
  if (parents.length === 0) return [];
  const s = stream(ctx.recipe.seed, `iteration/${draft.iteration}/admission`);
  const seen = new Set(draft.courses.map((c) => canonicalJson(c.genome)));
  const out: Candidate[] = [];
  for (let i = 0; i < a.candidates; i++) {
    const parent = parents[s.int(parents.length)];
    const genome = mutate(draft.course(parent.courseId).genome, ctx.family, s);
    const key = canonicalJson(genome);
    const duplicate = seen.has(key);
    seen.add(key);
    out.push({ parent: parent.courseId, genome, outcome: duplicate ? 'duplicate' : null, bestProgress: 0, walkerId: null, params: null, novelty: null, point: [], courseId: null });
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
  admitByNovelty(ctx, draft, live.filter((c) => c.outcome === null), refs);
  draft.counters.candidates += cands.length;
  for (const c of cands) {
    draft.events.push({
      type: 'candidate', iteration: draft.iteration, parent: c.parent, outcome: c.outcome!, courseId: c.courseId,
      bestProgress: c.bestProgress, walkerId: c.walkerId, novelty: c.novelty, descriptor: descriptor(c.genome),
    });
  }
  retireOverCap(ctx, draft);
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
    solvedAt: null, solvedBy: null, archivedAt: null,
    holders: [{ walkerId, since: draft.iteration, how: 'seed' }],
  };
  draft.courses.push(rec);
  const pair: PairState = { courseId: id, walkerId, es: freshEs(ctx, params, `course/${id}/walker/${walkerId}/es-noise`), progress: c.bestProgress };
  draft.pairs.push(pair);
}

/** Retires the oldest pairs to the archive while there are more than maxActive. */
function retireOverCap(ctx: RunContext, draft: Draft): void {
  while (draft.pairs.length > ctx.recipe.population.maxActive) {
    const old = draft.pairs.shift()!;
    draft.setCourse({ ...draft.course(old.courseId), archivedAt: draft.iteration });
    draft.events.push({ type: 'retired', iteration: draft.iteration, courseId: old.courseId, walkerId: old.walkerId, progress: old.progress });
  }
}
