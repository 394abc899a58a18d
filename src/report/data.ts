import { dominantKind, fingerprint, gridSpec, lineages, liveLineages, type IterationMetrics, type RunContext, type RunState } from '../coevo/index.js';
import { emptyBatch, type Evaluator } from '../pool/index.js';
import { buildCourse, DESCRIPTOR_NAMES, difficulty, KIND_NAMES, type Course, type TerrainGenome } from '../terrain/index.js';
import type { Baseline } from './baseline.js';
import { coverageGrid, type CoverageGrid } from './coverage.js';

/** Everything the report page shows, as plain data embedded in the page. */
export interface ReportData {
  readonly run: { name: string; seed: number; iteration: number; target: number; fingerprint: string; timeStep: number };
  readonly metrics: readonly IterationMetrics[];
  readonly descriptorNames: readonly string[];
  readonly segments: readonly { shape: string; size?: readonly number[]; radius?: number; foot: boolean }[];
  readonly courses: readonly ReportCourse[];
  /** Feature kinds in registration order (their colours in the lineage tree follow it). */
  readonly kinds: readonly string[];
  /** Every lineage, alive or not, by its first course's id. */
  readonly lineages: readonly ReportLineage[];
  readonly grid: CoverageGrid;
  /** The run's direct baseline (baseline.json), when it has a valid one. */
  readonly baseline?: Baseline | null;
}

/**
 * One lineage (see lineageOf in src/coevo). Its kind is the dominant feature kind of its active
 * courses while it is alive (as `status` gives it), else of all its courses.
 */
export interface ReportLineage {
  readonly id: number;
  readonly alive: boolean;
  readonly active: number;
  readonly courses: number;
  readonly kind: string;
}

export interface ReportCourse {
  readonly id: number;
  readonly parent: number | null;
  readonly admittedAt: number;
  readonly status: 'active' | 'archived';
  readonly crossedAt: number | null;
  readonly solvedAt: number | null;
  /** Its lineage: the id of the lineage's first course. */
  readonly lineage: number;
  readonly difficulty: number;
  readonly descriptor: readonly number[];
  readonly features: readonly string[];
  readonly best: number;
  readonly walkerId: number;
  readonly holders: number;
  /** Where a branched run's starting course came from (source fingerprint and course id), else null. */
  readonly source: { readonly fingerprint: string; readonly courseId: number } | null;
  readonly ground: readonly number[];
  readonly obstacles: readonly (readonly number[])[];
  readonly startX: number;
  readonly finishX: number;
  /** Replay of the course's walker (its solver, else its best): frames of [x, y, angle] per segment, rounded to mm / mrad. */
  readonly replay: { readonly every: number; readonly progress: number; readonly frames: readonly (readonly number[])[] };
}

const round = (v: number): number => Math.round(v * 1000) / 1000;

function lineageList(state: RunState, diff: (g: TerrainGenome) => number): ReportLineage[] {
  const of = lineages(state.courses);
  const alive = new Map(liveLineages(state, diff).map((l) => [l.id, l]));
  const ids = [...new Set(of.values())].sort((a, b) => a - b);
  return ids.map((id) => {
    const members = state.courses.filter((c) => of.get(c.id) === id);
    const live = alive.get(id);
    return { id, alive: live !== undefined, active: live?.active.length ?? 0, courses: members.length, kind: live?.kind ?? dominantKind(members.map((c) => c.genome)) };
  });
}

/** Replays every course's walker (one batch on the evaluator) and gathers the report's data; `metrics` are the run's log lines. */
export async function reportData(ctx: RunContext, state: RunState, metrics: readonly IterationMetrics[], evaluator: Evaluator, every = 5): Promise<ReportData> {
  const batch = emptyBatch();
  batch.plans.push(ctx.plan);
  batch.shapes.push(ctx.shape);
  batch.options.push({ ...ctx.rollout, traceEvery: every });
  const courses: Course[] = state.courses.map((c) => buildCourse(c.genome, ctx.family));
  batch.courses.push(...courses);
  state.courses.forEach((c, i) => {
    const w = c.solvedBy ?? c.best;
    batch.tasks.push({ kind: 'rollout', course: i, plan: 0, shape: 0, options: 0, policy: { kind: 'params', params: w.params } });
  });
  const results = await evaluator.evaluate(batch);
  const active = new Set(state.pairs.map((p) => p.courseId));
  const diff = (g: TerrainGenome): number => difficulty(g, ctx.family);
  const lineageOf = lineages(state.courses);
  return {
    run: { name: ctx.recipe.name, seed: ctx.recipe.seed, iteration: state.iteration, target: ctx.recipe.budget.iterations, fingerprint: fingerprint(state, ctx.recipeHash), timeStep: ctx.recipe.episode.timeStep },
    metrics: metrics.filter((m) => m.iteration <= state.iteration),
    descriptorNames: DESCRIPTOR_NAMES,
    segments: ctx.plan.segments.map((s) => ({ shape: s.shape, size: s.size, radius: s.radius, foot: s.foot })),
    courses: state.courses.map((c, i) => ({
      id: c.id, parent: c.parent, admittedAt: c.admittedAt, status: active.has(c.id) ? 'active' : 'archived',
      crossedAt: c.crossedAt, solvedAt: c.solvedAt, lineage: lineageOf.get(c.id)!, difficulty: round(diff(c.genome)), descriptor: c.descriptor.map(round),
      features: c.genome.features.map((f) => f.kind), best: c.best.progress, walkerId: (c.solvedBy ?? c.best).walkerId, holders: c.holders.length, source: c.source ?? null,
      ground: courses[i].ground.map(round), obstacles: courses[i].obstacles.map((p) => p.map(round)),
      startX: courses[i].startX, finishX: courses[i].finishX,
      replay: { every, progress: results[i].progress, frames: (results[i].trace?.frames ?? []).map((f) => f.map(round)) },
    })),
    kinds: KIND_NAMES,
    lineages: lineageList(state, diff),
    grid: coverageGrid(state, ctx.family, gridSpec(ctx.recipe), diff),
  };
}
