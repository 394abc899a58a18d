import { dirname, resolve } from 'node:path';
import { z } from 'zod';
import { parseWith, readJsonFile, UserError } from '../core/index.js';
import { DESCRIPTOR_NAMES } from '../terrain/index.js';

const int = (min: number, max: number) => z.number().int().min(min).max(max);
const num = (min: number, max: number) => z.number().min(min).max(max);
const fraction = num(0, 1);

/**
 * A run configuration. Every field has a default (see README for units and ranges); a recipe
 * file may give any subset. Unknown keys are refused.
 */
export const recipeSchema = z
  .object({
    /** Run name: the default run directory is runs/<name>/. */
    name: z.string().regex(/^[A-Za-z0-9._-]+$/, 'expected letters, digits, ".", "_" or "-"').default('run'),
    /** Run seed: every random draw derives from it. */
    seed: int(0, 2 ** 31 - 1).default(1),
    /** Terrain family file, relative to the recipe file. */
    terrain: z.string().min(1).default('../envs/terrain/mixed.json'),
    /** Body plan file, relative to the recipe file. */
    body: z.string().min(1).default('../envs/bodies/trestle.json'),
    /** Branch sources, `RUN_OR_EXPORT:COURSE_ID` (paths relative to the recipe file); empty = the family's start. */
    from: z.array(z.string().regex(/^.+:\d+$/, 'expected RUN_OR_EXPORT:COURSE_ID')).max(1000).default([]),
    policy: z
      .object({
        hidden: z.array(int(1, 1024)).max(8).default([]),
        activation: z.enum(['tanh', 'relu', 'linear']).default('tanh'),
      })
      .strict()
      .prefault({}),
    es: z
      .object({
        /** Candidates per ES step: population/2 perturbations, each tried with both signs. */
        population: int(2, 20_000).refine((n) => n % 2 === 0, 'expected an even number (candidates come in mirrored pairs)').default(32),
        sigma: num(1e-6, 10).default(0.05),
        learningRate: num(1e-6, 10).default(0.02),
        beta1: z.number().min(0).lt(1).default(0.9),
        beta2: z.number().min(0).lt(1).default(0.999),
        epsilon: num(1e-12, 1).default(1e-8),
        weightDecay: num(0, 1).default(0.005),
      })
      .strict()
      .prefault({}),
    episode: z
      .object({
        maxSteps: int(1, 1_000_000).default(3000),
        stallSeconds: num(0.1, 3600).default(3),
        stallDistance: num(0, 100).default(0.1),
        fallPenalty: num(0, 10).default(0.05),
        /** Largest horizontal push on the torso at the start of ES candidate rollouts, N·s (0 = none). */
        trainingPush: num(0, 100).default(0.2),
        timeStep: num(1e-4, 0.1).default(0.02),
        velocityIterations: int(1, 500).default(20),
        positionIterations: int(1, 500).default(10),
        gravity: num(0, 100).default(9.81),
      })
      .strict()
      .prefault({}),
    population: z
      .object({
        /** Most active pairs; the oldest retire to the archive beyond it. */
        maxActive: int(1, 1000).default(8),
      })
      .strict()
      .prefault({}),
    admission: z
      .object({
        interval: int(1, 1_000_000).default(5),
        /** A pair's walker must have at least this progress for its course to have children. */
        reproduceAbove: fraction.default(0.6),
        candidates: int(1, 10_000).default(16),
        /** Minimal criterion band on the best current walker's progress. */
        low: fraction.default(0.15),
        high: fraction.default(0.9),
        admitPerRound: int(1, 1000).default(2),
        /** Candidates whose novelty is below this are refused as not novel. */
        minNovelty: num(0, 1e6).default(0),
        /** Largest mutation strength a course may reach (see adaptMutationSteps): its children are mutated about this many times. */
        mutations: int(1, 100).default(12),
        /**
         * Optional screen before rollouts: a proposal whose k nearest candidates evaluated in the
         * last `window` iterations (normalised descriptor) were all too easy is skipped and another
         * drawn, up to `draws` × candidates proposals per round. Absent: every proposal is evaluated.
         */
        screen: z
          .object({
            k: int(1, 1000).default(3),
            window: int(1, 1_000_000).default(30),
            draws: int(1, 100).default(4),
          })
          .strict()
          .optional(),
      })
      .strict()
      .prefault({}),
    novelty: z
      .object({
        measure: z.enum(['descriptor', 'profile']).default('descriptor'),
        k: int(1, 1000).default(5),
      })
      .strict()
      .prefault({}),
    transfer: z
      .object({
        interval: int(1, 1_000_000).default(10),
        /** Fine-tune (one ES step) only the best few zero-shot walkers of each course. */
        fineTuneTop: int(0, 1000).default(2),
        /** A transferred walker must beat the incumbent's progress by more than this. */
        margin: num(0, 1).default(0.01),
      })
      .strict()
      .prefault({}),
    solve: z
      .object({
        threshold: fraction.default(0.95),
        /** Confirmation rollouts under perturbations and a stricter solver; all must reach the threshold. */
        checks: int(0, 100).default(3),
        /** Horizontal push on the torso at the start of a confirmation rollout, N·s (random sign and size up to this). */
        push: num(0, 100).default(0.3),
        /** A crossed course whose confirmation failed is tried again after this many iterations, while its pair is still at the threshold. */
        retryEvery: int(1, 1_000_000).default(5),
        /** Iterations after crossing during which an unconfirmed pair is retired only when no other pair can be. */
        patience: int(0, 1_000_000).default(60),
      })
      .strict()
      .prefault({}),
    measures: z
      .object({
        /** New ground: a solved course counts when its normalised descriptor is farther than this (Euclidean) from every course solved before it. */
        newGroundDistance: num(0, 100).default(0.2),
        /** Coverage grid: these descriptor components, each normalised to [0, 1] and cut into `bins` equal cells. */
        grid: z
          .object({
            components: z.array(z.string().min(1)).min(2).max(8).default(['gapWidth', 'stepUp', 'blockHeight', 'uphill']),
            bins: int(2, 20).default(4),
          })
          .strict()
          .prefault({}),
      })
      .strict()
      .prefault({}),
    checkpoint: z
      .object({
        interval: int(1, 1_000_000).default(5),
        keep: int(1, 1000).default(3),
      })
      .strict()
      .prefault({}),
    budget: z
      .object({
        iterations: int(1, 100_000_000).default(200),
        /** Wall-clock limit of one invocation, minutes (0 = none). */
        minutes: num(0, 1e7).default(0),
      })
      .strict()
      .prefault({}),
  })
  .strict();

export type Recipe = z.output<typeof recipeSchema>;

/** Every problem of a recipe with its field path; defaults filled in when valid. */
export function parseRecipe(json: unknown, where: string): Recipe {
  const recipe = parseWith(recipeSchema, json, where, 'Recipe');
  const problems: string[] = [];
  if (recipe.admission.low >= recipe.admission.high) {
    problems.push(`${where}: admission.low: expected below admission.high (${recipe.admission.high}), found ${recipe.admission.low}`);
  }
  const names = new Set(DESCRIPTOR_NAMES);
  recipe.measures.grid.components.forEach((c, i) => {
    if (!names.has(c)) problems.push(`${where}: measures.grid.components.${i}: expected one of ${[...names].join(', ')}, found "${c}"`);
  });
  if (new Set(recipe.measures.grid.components).size !== recipe.measures.grid.components.length) {
    problems.push(`${where}: measures.grid.components: each component may appear once`);
  }
  if (problems.length > 0) throw new UserError(`Recipe ${where} is not valid:`, problems);
  return recipe;
}

/**
 * Applies `--set path.to.field=value` overrides to a recipe's raw JSON. The value is read as
 * JSON when it parses (numbers, booleans, arrays), else as a string; the schema then checks
 * the result, so an unknown field or a bad value gets the schema's own message.
 */
export function applySets(json: unknown, sets: readonly string[], where: string): unknown {
  if (!isObject(json)) return json;
  const root: Record<string, unknown> = structuredClone(json);
  for (const set of sets) {
    const eq = set.indexOf('=');
    const path = eq > 0 ? set.slice(0, eq).split('.') : [];
    if (path.length === 0 || path.some((k) => !/^[A-Za-z][A-Za-z0-9]*$/.test(k))) {
      throw new UserError(`--set ${set}: expected path.to.field=value (field names of ${where})`);
    }
    const raw = set.slice(eq + 1);
    let value: unknown = raw;
    try { value = JSON.parse(raw); } catch { /* a plain string */ }
    let at = root;
    for (const [i, key] of path.slice(0, -1).entries()) {
      const next = Object.hasOwn(at, key) ? at[key] : {};
      if (!isObject(next)) throw new UserError(`--set ${set}: ${path.slice(0, i + 1).join('.')} is not an object in ${where}, so it has no field ${path[i + 1]}`);
      at[key] = next;
      at = next;
    }
    at[path[path.length - 1]] = value;
  }
  return root;
}

function isObject(v: unknown): v is Record<string, unknown> {
  return v !== null && typeof v === 'object' && !Array.isArray(v);
}

/** Loads a recipe file with `--set` overrides; `terrain`, `body` and `from` paths come back absolute. */
export function loadRecipe(path: string, sets: readonly string[] = []): Recipe {
  const json = readJsonFile(path, 'Recipe');
  const recipe = parseRecipe(sets.length > 0 ? applySets(json, sets, path) : json, sets.length > 0 ? `${path} with --set` : path);
  const base = dirname(resolve(path));
  return { ...recipe, terrain: resolve(base, recipe.terrain), body: resolve(base, recipe.body), from: recipe.from.map((f) => resolve(base, f)) };
}
