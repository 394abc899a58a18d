import { existsSync, mkdirSync, readdirSync, rmSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { loadBodyPlan, type BodyPlan } from '../body/index.js';
import { z } from 'zod';
import { parseWith, readJsonFile, UserError } from '../core/index.js';
import { loadRecipe, parseRecipe, recipeHashOf, type BranchSource, type Recipe } from '../coevo/index.js';
import { loadFamily, type TerrainFamily } from '../terrain/index.js';
import { writeFileAtomic } from './atomic.js';
import { EVENTS, FAULTS, METRICS, SESSIONS } from './logs.js';

export const RECIPE = 'recipe.json';
export const FAMILY = 'family.json';
export const BODY = 'body.json';
/** Branch sources, frozen at creation (only in branched runs). */
export const SOURCES = 'sources.json';

/** A run's fixed inputs as read from (or about to be written to) its directory. */
export interface RunInputs {
  readonly dir: string;
  readonly recipe: Recipe;
  readonly family: TerrainFamily;
  readonly plan: BodyPlan;
  /** Courses and walkers the run started from (empty unless branched). */
  readonly sources: readonly BranchSource[];
  /** Where each source was read from, as given at creation (shown, not hashed). */
  readonly sourcePaths: readonly string[];
  /** Hash of everything that shapes the run's trajectory: recipe (less its budget), family, body plan and sources. */
  readonly recipeHash: string;
}

/** Overrides from the command line, applied before freezing. */
export interface RunOverrides {
  readonly seed?: number;
  readonly iterations?: number;
  readonly minutes?: number;
  /** `--set path=value` overrides, applied before validation. */
  readonly sets?: readonly string[];
  /** `--from` specs (absolute paths); replace the recipe's `from` when given. */
  readonly from?: readonly string[];
  /** Clamp branched genomes into the recipe family's bounds instead of refusing them. */
  readonly clip?: boolean;
}

/** Loads the file a recipe field names; any problem with it is reported with the recipe and the field. */
function loadField<T>(recipePath: string, field: 'terrain' | 'body', load: () => T): T {
  try {
    return load();
  } catch (e) {
    if (e instanceof UserError) throw new UserError(`Recipe ${recipePath}, field \`${field}\`: ${e.message}`);
    throw e;
  }
}

/** Reads a recipe's branch sources (its `from` specs) against its family and body plan; refuses what does not fit. */
export type SourceResolver = (recipe: Recipe, family: TerrainFamily, plan: BodyPlan, clip: boolean) => BranchSource[];

/**
 * Validates a recipe and everything it names, then creates the run directory with the frozen
 * recipe (defaults filled in) and copies of the terrain family and body plan, so the run never
 * depends on files outside it, and its empty logs. Refuses an existing, non-empty directory. Nothing is written
 * unless all inputs are valid.
 */
export function createRunDir(recipePath: string, out: string | undefined, o: RunOverrides, resolveSources?: SourceResolver): RunInputs {
  const loaded = loadRecipe(recipePath, o.sets);
  const recipe: Recipe = {
    ...loaded,
    seed: o.seed ?? loaded.seed,
    from: o.from ? o.from.map((f) => resolve(f)) : loaded.from,
    budget: { iterations: o.iterations ?? loaded.budget.iterations, minutes: o.minutes ?? loaded.budget.minutes },
  };
  const family = loadField(recipePath, 'terrain', () => loadFamily(recipe.terrain));
  const plan = loadField(recipePath, 'body', () => loadBodyPlan(recipe.body));
  if (recipe.from.length > 0 && !resolveSources) throw new Error('createRunDir: a recipe with branch sources needs a source resolver');
  const sources = recipe.from.length > 0 ? resolveSources!(recipe, family, plan, o.clip === true) : [];
  const dir = resolve(out ?? join('runs', recipe.name));
  if (existsSync(dir) && readdirSync(dir).length > 0) {
    throw new UserError(`Run directory ${dir} already exists; to continue that run use \`cairn resume ${dir}\`, or choose another --out`);
  }
  const frozen: Recipe = { ...recipe, terrain: FAMILY, body: BODY };
  mkdirSync(join(dir, 'checkpoints'), { recursive: true });
  try {
    writeFileAtomic(join(dir, FAMILY), `${JSON.stringify(family, null, 2)}\n`);
    writeFileAtomic(join(dir, BODY), `${JSON.stringify(plan, null, 2)}\n`);
    if (sources.length > 0) writeFileAtomic(join(dir, SOURCES), `${JSON.stringify({ paths: recipe.from, sources }, null, 1)}\n`);
    writeFileAtomic(join(dir, RECIPE), `${JSON.stringify(frozen, null, 2)}\n`);
    // The logs exist from the start, empty until something happens, so readers need no special case.
    for (const log of [METRICS, EVENTS, FAULTS, SESSIONS]) writeFileAtomic(join(dir, log), '');
  } catch (e) {
    rmSync(dir, { recursive: true, force: true });
    throw e;
  }
  return { dir, recipe: frozen, family, plan, sources, sourcePaths: recipe.from, recipeHash: recipeHashOf(frozen, family, plan, sources) };
}

const sourcesSchema = z.object({
  paths: z.array(z.string()),
  sources: z.array(z.object({
    fingerprint: z.string().regex(/^[0-9a-f]{64}$/), courseId: z.number().int().min(0), genome: z.object({}).passthrough(),
    clipped: z.boolean(), walkerId: z.number().int().min(0), params: z.array(z.number()),
  }).strict()).min(1),
}).strict();

/** The frozen branch sources; the genomes were checked against the family when the run was created. */
function parseSources(json: unknown, where: string): { paths: string[]; sources: BranchSource[] } {
  return parseWith(sourcesSchema, json, where, 'Branch sources') as unknown as { paths: string[]; sources: BranchSource[] };
}

/** Reads a run directory's frozen inputs. */
export function openRunDir(dirArg: string): RunInputs {
  const dir = resolve(dirArg);
  if (!existsSync(join(dir, RECIPE))) throw new UserError(`${dirArg} is not a cairn run directory (no ${RECIPE} in it)`);
  const recipe = parseRecipe(readJsonFile(join(dir, RECIPE), 'Recipe'), join(dir, RECIPE));
  const family = loadFamily(join(dir, FAMILY));
  const plan = loadBodyPlan(join(dir, BODY));
  const frozen = existsSync(join(dir, SOURCES)) ? parseSources(readJsonFile(join(dir, SOURCES), 'Branch sources'), join(dir, SOURCES)) : { paths: [], sources: [] };
  return { dir, recipe, family, plan, sources: frozen.sources, sourcePaths: frozen.paths, recipeHash: recipeHashOf(recipe, family, plan, frozen.sources) };
}

/** Rewrites the frozen recipe's budget (the only part a resume may change). */
export function updateBudget(inputs: RunInputs, iterations: number, minutes: number): RunInputs {
  const recipe = { ...inputs.recipe, budget: { iterations, minutes } };
  writeFileAtomic(join(inputs.dir, RECIPE), `${JSON.stringify(recipe, null, 2)}\n`);
  return { ...inputs, recipe };
}
