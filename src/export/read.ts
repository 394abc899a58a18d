import { readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { loadBodyPlan, type BodyPlan } from '../body/index.js';
import { readJsonFile, sha256, UserError } from '../core/index.js';
import type { EsConfig } from '../evolve/index.js';
import type { PolicyShape } from '../policy/index.js';
import { defaultRolloutOptions, type RolloutOptions } from '../sim/index.js';
import { loadWalker } from '../store/index.js';
import type { Course, TerrainGenome } from '../terrain/index.js';
import { decodeSafetensors } from './safetensors.js';
import { assertCurriculum } from './schema.js';
import { tensorsToParams } from './walker-tensors.js';

interface WalkerRefJson { id: number; iteration: number; file: string; sha256: string }

/** The parts of a curriculum file cairn reads back (the schema describes all of it). */
export interface CurriculumEntry {
  readonly id: number;
  readonly parent: number | null;
  readonly genome: TerrainGenome;
  readonly difficulty: number;
  readonly geometry: { ground: number[][]; obstacles: number[][][]; friction: number; startX: number; finishX: number; spawnGroundY: number };
  readonly best: { progress: number; walker: WalkerRefJson };
  readonly solvedBy: { progress: number; walker: WalkerRefJson } | null;
  readonly solvedAt: number | null;
  /** Absent in exports written before they were recorded. */
  readonly crossedAt?: number | null;
  readonly rollouts?: number;
  readonly lineageRollouts?: number;
}

/** How the run trained and confirmed walkers (absent in exports written before it was recorded). */
export interface CurriculumTraining {
  readonly es: EsConfig;
  /** Largest horizontal push on ES candidates, N·s. */
  readonly trainingPush: number;
  readonly solve: { readonly checks: number; readonly push: number };
}

export interface Curriculum {
  readonly path: string;
  readonly dir: string;
  readonly physics: { gravity: number; timeStep: number; velocityIterations: number; positionIterations: number };
  readonly episode: { maxSteps: number; stallSeconds: number; stallDistance: number; fallPenalty: number };
  readonly solveThreshold: number;
  readonly training?: CurriculumTraining;
  readonly run: { readonly name: string; readonly seed: number; readonly iteration: number; readonly fingerprint: string; readonly recipeHash: string };
  readonly policy: PolicyShape;
  readonly family: { readonly file: string; readonly name: string };
  readonly body: { file: string; name: string };
  readonly courses: readonly CurriculumEntry[];
}

/** Loads a curriculum file and validates it against the shipped schema. */
export function loadCurriculum(path: string): Curriculum {
  const json = readJsonFile(path, 'Curriculum');
  assertCurriculum(json, path);
  return { ...(json as Omit<Curriculum, 'path' | 'dir'>), path, dir: dirname(resolve(path)) };
}

export function findCourse(c: Curriculum, id: number): CurriculumEntry {
  const e = c.courses.find((x) => x.id === id);
  if (!e) throw new UserError(`Curriculum ${c.path} has no course ${id}; it has ${c.courses.map((x) => x.id).join(', ') || 'none'}`);
  return e;
}

/** The course geometry exactly as exported. */
export function courseOf(e: CurriculumEntry): Course {
  const g = e.geometry;
  return { ground: g.ground.flat(), obstacles: g.obstacles.map((p) => p.flat()), friction: g.friction, startX: g.startX, finishX: g.finishX, spawnGroundY: g.spawnGroundY };
}

/** Episode and physics settings the run used, as rollout options. */
export function rolloutOptionsOf(c: Curriculum): RolloutOptions {
  return { ...defaultRolloutOptions(), physics: { ...c.physics }, ...c.episode };
}

export function bodyOf(c: Curriculum): BodyPlan {
  return loadBodyPlan(join(c.dir, c.body.file));
}

/** Reads a safetensors walker; checks its SHA-256 when `expected` is given. */
export function loadSafetensorsWalker(path: string, expected?: string): { shape: PolicyShape; params: Float64Array; metadata: Record<string, string> } {
  let bytes: Buffer;
  try {
    bytes = readFileSync(path);
  } catch (e) {
    throw new UserError(`Walker file not found or unreadable: ${path} (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
  if (expected && sha256(bytes) !== expected) throw new UserError(`Walker file ${path}: SHA-256 mismatch: the curriculum says ${expected}, the file is ${sha256(bytes)}`);
  const { tensors, metadata } = decodeSafetensors(bytes, path);
  return { ...tensorsToParams(tensors, metadata, path), metadata };
}

/**
 * A walker from either kind of file: an exported `.safetensors` walker or cairn's walker JSON
 * (what `train` writes). `bodyName` is the body plan it was made for, where the file says.
 */
export function loadAnyWalker(path: string): { shape: PolicyShape; params: ArrayLike<number>; bodyName: string | undefined } {
  if (path.endsWith('.safetensors')) {
    const w = loadSafetensorsWalker(path);
    return { shape: w.shape, params: w.params, bodyName: w.metadata.bodyName };
  }
  const w = loadWalker(path);
  return { shape: w.shape, params: w.params, bodyName: w.bodyName };
}

/** The walker a curriculum names for a course: the one that solved it, else the best one. */
export function walkerRefOf(c: Curriculum, e: CurriculumEntry): { path: string; sha256: string; progress: number } {
  const w = e.solvedBy ?? e.best;
  return { path: join(c.dir, w.walker.file), sha256: w.walker.sha256, progress: w.progress };
}
