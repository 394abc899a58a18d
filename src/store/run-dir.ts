import { existsSync, mkdirSync, readdirSync, rmSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { loadBodyPlan, type BodyPlan } from '../body/index.js';
import { readJsonFile, UserError } from '../core/index.js';
import { loadRecipe, parseRecipe, recipeHashOf, type Recipe } from '../coevo/index.js';
import { loadFamily, type TerrainFamily } from '../terrain/index.js';
import { writeFileAtomic } from './atomic.js';
import { EVENTS, FAULTS, METRICS } from './logs.js';

export const RECIPE = 'recipe.json';
export const FAMILY = 'family.json';
export const BODY = 'body.json';

/** A run's fixed inputs as read from (or about to be written to) its directory. */
export interface RunInputs {
  readonly dir: string;
  readonly recipe: Recipe;
  readonly family: TerrainFamily;
  readonly plan: BodyPlan;
  /** Hash of everything that shapes the run's trajectory: recipe (less its budget), family and body plan. */
  readonly recipeHash: string;
}

/** Overrides from the command line, applied before freezing. */
export interface RunOverrides {
  readonly seed?: number;
  readonly iterations?: number;
  readonly minutes?: number;
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

/**
 * Validates a recipe and everything it names, then creates the run directory with the frozen
 * recipe (defaults filled in) and copies of the terrain family and body plan, so the run never
 * depends on files outside it, and its empty logs. Refuses an existing, non-empty directory. Nothing is written
 * unless all inputs are valid.
 */
export function createRunDir(recipePath: string, out: string | undefined, o: RunOverrides): RunInputs {
  const loaded = loadRecipe(recipePath);
  const recipe: Recipe = {
    ...loaded,
    seed: o.seed ?? loaded.seed,
    budget: { iterations: o.iterations ?? loaded.budget.iterations, minutes: o.minutes ?? loaded.budget.minutes },
  };
  const family = loadField(recipePath, 'terrain', () => loadFamily(recipe.terrain));
  const plan = loadField(recipePath, 'body', () => loadBodyPlan(recipe.body));
  const dir = resolve(out ?? join('runs', recipe.name));
  if (existsSync(dir) && readdirSync(dir).length > 0) {
    throw new UserError(`Run directory ${dir} already exists; to continue that run use \`cairn resume ${dir}\`, or choose another --out`);
  }
  const frozen: Recipe = { ...recipe, terrain: FAMILY, body: BODY };
  mkdirSync(join(dir, 'checkpoints'), { recursive: true });
  try {
    writeFileAtomic(join(dir, FAMILY), `${JSON.stringify(family, null, 2)}\n`);
    writeFileAtomic(join(dir, BODY), `${JSON.stringify(plan, null, 2)}\n`);
    writeFileAtomic(join(dir, RECIPE), `${JSON.stringify(frozen, null, 2)}\n`);
    // The logs exist from the start, empty until something happens, so readers need no special case.
    for (const log of [METRICS, EVENTS, FAULTS]) writeFileAtomic(join(dir, log), '');
  } catch (e) {
    rmSync(dir, { recursive: true, force: true });
    throw e;
  }
  return { dir, recipe: frozen, family, plan, recipeHash: recipeHashOf(frozen, family, plan) };
}

/** Reads a run directory's frozen inputs. */
export function openRunDir(dirArg: string): RunInputs {
  const dir = resolve(dirArg);
  if (!existsSync(join(dir, RECIPE))) throw new UserError(`${dirArg} is not a cairn run directory (no ${RECIPE} in it)`);
  const recipe = parseRecipe(readJsonFile(join(dir, RECIPE), 'Recipe'), join(dir, RECIPE));
  const family = loadFamily(join(dir, FAMILY));
  const plan = loadBodyPlan(join(dir, BODY));
  return { dir, recipe, family, plan, recipeHash: recipeHashOf(recipe, family, plan) };
}

/** Rewrites the frozen recipe's budget (the only part a resume may change). */
export function updateBudget(inputs: RunInputs, iterations: number, minutes: number): RunInputs {
  const recipe = { ...inputs.recipe, budget: { iterations, minutes } };
  writeFileAtomic(join(inputs.dir, RECIPE), `${JSON.stringify(recipe, null, 2)}\n`);
  return { ...inputs, recipe };
}
