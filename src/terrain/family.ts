import { z } from 'zod';
import { parseWith, readJsonFile, UserError } from '../core/index.js';
import { KINDS, KIND_NAMES } from './kinds/index.js';
import type { TerrainFamily } from './types.js';
import { validateGenome } from './validate.js';

const range = z
  .object({
    min: z.number(),
    max: z.number(),
    mutation: z.number().nonnegative(),
  })
  .strict();

const feature = z.object({ kind: z.enum(KIND_NAMES as [string, ...string[]]), x: z.number() }).catchall(z.union([z.number(), z.string()]));

const familySchema = z
  .object({
    name: z.string().min(1),
    length: z.number().positive().max(10_000),
    startZone: z.number().positive(),
    finishZone: z.number().nonnegative(),
    spawnX: z.number().positive(),
    maxFeatures: z.number().int().min(0).max(1000),
    minSpacing: z.number().positive(),
    friction: z.number().min(0).max(10),
    gapDepth: z.number().positive().max(100),
    roughnessSpacing: z.number().positive(),
    roughness: range,
    kinds: z.partialRecord(z.enum(KIND_NAMES as [string, ...string[]]), z.record(z.string(), range)),
    mutation: z
      .object({
        fieldProbability: z.number().min(0).max(1),
        addProbability: z.number().min(0).max(1),
        removeProbability: z.number().min(0).max(1),
        shiftProbability: z.number().min(0).max(1),
        shift: z.number().nonnegative(),
        reseedProbability: z.number().min(0).max(1),
        newFeatureSpan: z.number().min(0).max(1),
      })
      .strict(),
    start: z.object({ roughness: z.object({ amplitude: z.number(), seed: z.number() }).strict(), features: z.array(feature) }).strict(),
  })
  .strict();

/** Cross-field checks a schema cannot express. */
function familyProblems(f: TerrainFamily, where: string): string[] {
  const p: string[] = [];
  const at = (path: string, msg: string): number => p.push(`${where}: ${path}: ${msg}`);
  if (f.spawnX >= f.startZone) at('spawnX', `expected less than startZone (${f.startZone}), found ${f.spawnX}`);
  if (f.startZone + f.finishZone >= f.length) at('length', `expected more than startZone + finishZone (${f.startZone + f.finishZone}), found ${f.length}`);
  const ranges: [string, { min: number; max: number }][] = [['roughness', f.roughness]];
  if (f.roughness.min < 0) at('roughness.min', `expected ≥ 0, found ${f.roughness.min}`);
  for (const kind of Object.keys(f.kinds) as (keyof typeof KINDS)[]) {
    const fields = f.kinds[kind] ?? {};
    for (const field of KINDS[kind].fields) {
      if (!(field in fields)) at(`kinds.${kind}`, `missing the range of field "${field}"`);
    }
    for (const field of Object.keys(fields)) {
      if (!KINDS[kind].fields.includes(field)) at(`kinds.${kind}.${field}`, `unknown field; ${kind} has ${KINDS[kind].fields.join(', ')}`);
      else ranges.push([`kinds.${kind}.${field}`, fields[field]]);
    }
  }
  for (const [path, r] of ranges) if (r.min > r.max) at(path, `min (${r.min}) is above max (${r.max})`);
  for (const kind of Object.keys(f.kinds) as (keyof typeof KINDS)[]) {
    for (const field of KINDS[kind].positive) {
      const r = f.kinds[kind]?.[field];
      if (r && r.min <= 0) at(`kinds.${kind}.${field}.min`, `expected > 0, found ${r.min}`);
    }
  }
  return p;
}

/** Validates a parsed JSON value as a terrain family; throws one UserError listing every problem. */
export function parseFamily(json: unknown, where: string): TerrainFamily {
  const family = parseWith(familySchema, json, where, 'Terrain family') as unknown as TerrainFamily;
  const problems = familyProblems(family, where);
  if (problems.length === 0) problems.push(...validateGenome(family.start, family).map((q) => `${where}: start.${q}`));
  if (problems.length > 0) throw new UserError(`Terrain family ${where} is not valid:`, problems);
  return family;
}

/** Loads and validates a terrain family file. */
export function loadFamily(path: string): TerrainFamily {
  return parseFamily(readJsonFile(path, 'Terrain family'), path);
}
