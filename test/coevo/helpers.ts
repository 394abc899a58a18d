/**
 * Shared pieces of the co-evolution tests: tiny recipes, hand-built run states with tagged
 * walkers, and a fake evaluator whose progress values the test chooses per rollout, so the
 * loop's decision rules can be checked exactly without physics.
 */
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadBodyPlan } from '../../src/body/index.js';
import { canonicalJson, stream } from '../../src/core/index.js';
import { initEsState } from '../../src/evolve/index.js';
import { makeContext, parseRecipe, type CourseRecord, type PairState, type Recipe, type RunContext, type RunState } from '../../src/coevo/index.js';
import { proposeCandidates } from '../../src/coevo/admission.js';
import { Draft } from '../../src/coevo/draft.js';
import { paramCount } from '../../src/policy/index.js';
import type { Batch, Evaluator } from '../../src/pool/index.js';
import type { RolloutResult } from '../../src/sim/index.js';
import { buildCourse, descriptor, loadFamily, mutate, type TerrainGenome } from '../../src/terrain/index.js';

export const ROOT = fileURLToPath(new URL('../../', import.meta.url));
export const STARTER = join(ROOT, 'envs/terrain/starter.json');
export const TRESTLE = join(ROOT, 'envs/bodies/trestle.json');
export const CLI = join(ROOT, 'dist/cli/main.js');

/** Recipe fields to override, by section (each section's fields are merged into the base). */
export type RecipeOverrides = Record<string, unknown>;

/**
 * A tiny valid recipe on the starter family with the trestle body: an ES population of 4, 100-step
 * episodes, no training push, and admission, transfer and solving switched off unless `over`
 * turns them on.
 */
export function tinyRecipe(over: RecipeOverrides = {}): Recipe {
  const base: Record<string, unknown> = {
    name: 'test', seed: 11, terrain: STARTER, body: TRESTLE,
    es: { population: 4 },
    episode: { maxSteps: 100, trainingPush: 0 },
    admission: { interval: 1_000_000 },
    transfer: { interval: 1_000_000 },
    solve: { threshold: 1, checks: 0 },
  };
  for (const [k, v] of Object.entries(over)) {
    const b = base[k];
    base[k] = isObject(b) && isObject(v) ? { ...b, ...v } : v;
  }
  return parseRecipe(base, 'test recipe');
}

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** A fresh context (its course cache is per run: never share one between runs). */
export function contextFor(recipe: Recipe): RunContext {
  return makeContext(recipe, loadFamily(recipe.terrain), loadBodyPlan(recipe.body));
}

/** Walker weights whose first entry is `tag` (the fake evaluator's way to tell walkers apart) and the rest 0. */
export function tagged(ctx: RunContext, tag: number): number[] {
  const p = new Array<number>(paramCount(ctx.shape)).fill(0);
  p[0] = tag;
  return p;
}

/** One pair of a hand-built state: its walker's tag and recorded progress. */
export interface PairSpec {
  readonly tag: number;
  readonly progress: number;
}

/** `n` distinct genomes: the family's start, then successive mutations of it. */
export function genomes(ctx: RunContext, n: number): TerrainGenome[] {
  const out = [ctx.family.start];
  const seen = new Set([canonicalJson(ctx.family.start)]);
  for (let i = 0; out.length < n; i++) {
    const g = mutate(out[out.length - 1], ctx.family, stream(97, `test/coevo/genome/${i}`));
    if (!seen.has(canonicalJson(g))) {
      seen.add(canonicalJson(g));
      out.push(g);
    }
  }
  return out;
}

/** A course record as admission would write it, held by walker `walkerId` since `at`. */
export function courseRecord(id: number, genome: TerrainGenome, walkerId: number, params: readonly number[], at = 0): CourseRecord {
  return {
    id, parent: id === 0 ? null : 0, admittedAt: at, genome, descriptor: descriptor(genome),
    admission: { bestProgress: 0, walkerId: null, novelty: 0 },
    best: { progress: 0, walkerId, iteration: at, params: [...params] },
    crossedAt: null, solvedAt: null, solvedBy: null, confirmTries: 0, lastConfirmAt: null, rollouts: 0, mutationSteps: 1, archivedAt: null,
    holders: [{ walkerId, since: at, how: 'seed' }],
  };
}

/**
 * A run state at iteration `iteration` with one active pair per spec: pair i holds course i
 * (course 0 is the family's start) with walker i, whose weights are `tagged(ctx, spec.tag)`.
 */
export function stateWith(ctx: RunContext, specs: readonly PairSpec[], iteration = 0): RunState {
  const gs = genomes(ctx, specs.length);
  const courses = specs.map((s, i) => courseRecord(i, gs[i], i, tagged(ctx, s.tag)));
  const pairs: PairState[] = specs.map((s, i) => ({
    courseId: i, walkerId: i, progress: s.progress,
    es: initEsState(tagged(ctx, s.tag), stream(ctx.recipe.seed, `test/pair/${i}`)),
  }));
  return {
    format: 2, iteration, nextCourseId: specs.length, nextWalkerId: specs.length, courses, pairs,
    counters: { candidates: 0, tooEasy: 0, tooHard: 0, takeovers: 0, rollouts: 0, steps: 0 },
  };
}

/** What the fake evaluator tells its rule about one rollout. */
export interface FakeRollout {
  /** Id of the run's course the rollout is on, or null for a course not in the run (a candidate). */
  readonly courseId: number | null;
  /** Proposal index of the candidate the course was built from (see `predictCandidates`), or null. */
  readonly candidate: number | null;
  /** The walker's tag: its first weight, rounded. */
  readonly tag: number;
  /** Weights given outright, or the base of a mirrored perturbation. */
  readonly params: readonly number[];
  /** 0 for weights given outright, ±1 for the two sides of a mirrored perturbation. */
  readonly sign: 0 | 1 | -1;
  /** Run under the stricter solver (solve confirmations). */
  readonly strict: boolean;
  /** Push on the torso at the start, N·s (0 = none). */
  readonly push: number;
}

export type ProgressRule = (r: FakeRollout) => number;

/**
 * An evaluator that runs no physics: each rollout's progress (and fitness) is what `rule` says.
 * Every batch's rollouts are kept in `log` for inspection.
 */
export class FakeEvaluator implements Evaluator {
  readonly workers = 0;
  readonly log: FakeRollout[][] = [];
  private readonly candidateKeys: string[];

  constructor(private readonly ctx: RunContext, private readonly rule: ProgressRule, candidates: readonly TerrainGenome[] = []) {
    this.candidateKeys = candidates.map((g) => canonicalJson(buildCourse(g, ctx.family)));
  }

  async evaluate(batch: Batch): Promise<RolloutResult[]> {
    const ids = batch.courses.map((c) => {
      for (const [id, cached] of this.ctx.courseCache) if (cached === c) return id;
      return null;
    });
    const cands = batch.courses.map((c, i) => (ids[i] === null ? this.candidateKeys.indexOf(canonicalJson(c)) : -1));
    const seen = batch.tasks.map((t): FakeRollout => {
      if (t.kind !== 'rollout') throw new Error('the fake evaluator runs rollouts only');
      const params = t.policy.kind === 'params' ? t.policy.params : batch.bases[t.policy.base];
      const o = batch.options[t.options];
      return {
        courseId: ids[t.course], candidate: cands[t.course] >= 0 ? cands[t.course] : null, tag: Math.round(params[0]), params,
        sign: t.policy.kind === 'params' ? 0 : t.policy.sign,
        strict: o.physics.velocityIterations > this.ctx.rollout.physics.velocityIterations, push: o.push ?? 0,
      };
    });
    this.log.push(seen);
    return seen.map((r) => {
      const progress = this.rule(r);
      return { progress, fitness: progress, steps: 1, fell: false, end: 'budget' };
    });
  }

  /** Every rollout of every batch so far. */
  all(): FakeRollout[] {
    return this.log.flat();
  }

  async close(): Promise<void> {}
}

/**
 * The candidates the next iteration's admission will propose from `state`, in proposal order
 * (duplicates marked), assuming the ES phase leaves every pair's progress as it is in `state`
 * (a fake rule that gives each walker's own course the recorded progress does that).
 */
export function predictCandidates(ctx: RunContext, state: RunState): { genome: TerrainGenome; duplicate: boolean }[] {
  return proposeCandidates(ctx, new Draft(state, state.iteration + 1)).map((c) => ({ genome: c.genome, duplicate: c.outcome === 'duplicate' }));
}

export { ensureBuilt } from '../build.js';
