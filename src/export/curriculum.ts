import { observationNames, type BodyPlan } from '../body/index.js';
import { sha256 } from '../core/index.js';
import { fingerprint, crossedOrSolved, lineageRollouts, type BestOnCourse, type CourseRecord, type RunContext, type RunState } from '../coevo/index.js';
import type { PolicyShape } from '../policy/index.js';
import { buildCourse, DESCRIPTOR_NAMES, difficulty, type Course } from '../terrain/index.js';
import { encodeSafetensors } from './safetensors.js';
import { paramsToTensors } from './walker-tensors.js';

export const CURRICULUM_FORMAT = 'cairn-curriculum';
export const CURRICULUM_VERSION = 1;
export const SCHEMA_FILE = 'curriculum.schema.json';

export type Order = 'admission' | 'difficulty';
/** Which courses an export keeps: solved ones, crossed or solved ones, or all. */
export type Only = 'solved' | 'crossed' | 'all';

/** A walker file to write beside the curriculum. */
export interface WalkerBlob {
  readonly file: string;
  readonly bytes: Uint8Array;
  readonly sha256: string;
}

interface WalkerRef { readonly id: number; readonly iteration: number; readonly file: string; readonly sha256: string }

/** Collects walker files, one per distinct weight vector. */
class WalkerFiles {
  readonly blobs: WalkerBlob[] = [];
  private readonly byHash = new Map<string, WalkerBlob>();

  constructor(private readonly shape: PolicyShape, private readonly meta: Record<string, string>) {}

  add(w: BestOnCourse): WalkerRef {
    const bytes = encodeSafetensors(paramsToTensors(this.shape, w.params), { ...this.meta, walkerId: String(w.walkerId), iteration: String(w.iteration) });
    const hash = sha256(bytes);
    let blob = this.byHash.get(hash);
    if (!blob) {
      blob = { file: `walkers/walker-${w.walkerId}-it${w.iteration}.safetensors`, bytes, sha256: hash };
      this.byHash.set(hash, blob);
      this.blobs.push(blob);
    }
    return { id: w.walkerId, iteration: w.iteration, file: blob.file, sha256: hash };
  }
}

function geometry(c: Course): Record<string, unknown> {
  const pts = (flat: readonly number[]): number[][] => Array.from({ length: flat.length / 2 }, (_, i) => [flat[2 * i], flat[2 * i + 1]]);
  return { ground: pts(c.ground), obstacles: c.obstacles.map(pts), friction: c.friction, startX: c.startX, finishX: c.finishX, spawnGroundY: c.spawnGroundY };
}

function walkerMetadata(plan: BodyPlan, shape: PolicyShape): Record<string, string> {
  return {
    format: 'cairn-walker-safetensors/1',
    shape: JSON.stringify(shape),
    activation: shape.activation,
    outputActivation: 'tanh',
    layout: 'layer<l>.weight [out, in] row-major, layer<l>.bias [out]; y = act(W x + b); hidden layers use `activation`, the last layer tanh',
    observation: JSON.stringify(observationNames(plan)),
    actions: JSON.stringify(plan.joints.map((j) => j.name)),
    actionMode: plan.action,
    body: 'body.json',
    bodyName: plan.name,
  };
}

/** The curriculum object and the walker files it references, from a run's state. */
export function buildCurriculum(ctx: RunContext, state: RunState, order: Order, only: Only): { curriculum: Record<string, unknown>; walkers: WalkerBlob[] } {
  const files = new WalkerFiles(ctx.shape, walkerMetadata(ctx.plan, ctx.shape));
  const diff = (c: CourseRecord): number => difficulty(c.genome, ctx.family);
  const keep = { all: () => true, crossed: crossedOrSolved, solved: (c: CourseRecord) => c.solvedAt !== null }[only];
  const lineage = lineageRollouts(state.courses);
  let courses = state.courses.filter(keep);
  if (order === 'difficulty') courses = [...courses].sort((a, b) => diff(a) - diff(b) || a.id - b.id);
  const active = new Set(state.pairs.map((p) => p.courseId));
  const entries = courses.map((c) => ({
    id: c.id,
    parent: c.parent,
    admittedAt: c.admittedAt,
    status: active.has(c.id) ? 'active' : 'archived',
    archivedAt: c.archivedAt,
    genome: c.genome,
    descriptor: c.descriptor,
    difficulty: diff(c),
    geometry: geometry(buildCourse(c.genome, ctx.family)),
    admission: { bestProgress: c.admission.bestProgress, walkerId: c.admission.walkerId, novelty: c.admission.novelty, band: [ctx.recipe.admission.low, ctx.recipe.admission.high] },
    best: { progress: c.best.progress, walker: files.add(c.best) },
    crossedAt: c.crossedAt,
    solvedAt: c.solvedAt,
    rollouts: c.rollouts,
    lineageRollouts: lineage.get(c.id)!,
    solvedBy: c.solvedBy ? { progress: c.solvedBy.progress, walker: files.add(c.solvedBy) } : null,
    holders: c.holders,
    ...(c.source ? { source: c.source } : {}),
  }));
  const e = ctx.recipe.episode;
  const curriculum = {
    $schema: `./${SCHEMA_FILE}`,
    format: CURRICULUM_FORMAT,
    version: CURRICULUM_VERSION,
    run: { name: ctx.recipe.name, seed: ctx.recipe.seed, iteration: state.iteration, fingerprint: fingerprint(state, ctx.recipeHash), recipeHash: ctx.recipeHash },
    order,
    only,
    difficultyMeasure: 'mean of the descriptor components, each divided by its family bound (0 = flat ground, 1 = every component at its bound)',
    descriptorNames: DESCRIPTOR_NAMES,
    physics: { gravity: e.gravity, timeStep: e.timeStep, velocityIterations: e.velocityIterations, positionIterations: e.positionIterations },
    episode: { maxSteps: e.maxSteps, stallSeconds: e.stallSeconds, stallDistance: e.stallDistance, fallPenalty: e.fallPenalty },
    solveThreshold: ctx.recipe.solve.threshold,
    training: { es: { ...ctx.es }, trainingPush: e.trainingPush, solve: { checks: ctx.recipe.solve.checks, push: ctx.recipe.solve.push } },
    body: { file: 'body.json', name: ctx.plan.name, actionMode: ctx.plan.action, observation: observationNames(ctx.plan), actions: ctx.plan.joints.map((j) => j.name) },
    family: { file: 'family.json', name: ctx.family.name },
    policy: ctx.shape,
    courses: entries,
  };
  return { curriculum, walkers: files.blobs };
}
