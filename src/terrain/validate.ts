import { KINDS } from './kinds/index.js';
import type { Feature, FieldRange, TerrainFamily } from './types.js';

const SEED_LIMIT = 2 ** 31;

function checkRange(v: unknown, r: FieldRange, path: string, out: string[]): void {
  if (typeof v !== 'number' || !Number.isFinite(v)) out.push(`${path}: expected a number in [${r.min}, ${r.max}], found ${JSON.stringify(v)}`);
  else if (v < r.min || v > r.max) out.push(`${path}: expected a number in [${r.min}, ${r.max}], found ${v}`);
}

function isObject(v: unknown): v is Record<string, unknown> {
  return v !== null && typeof v === 'object' && !Array.isArray(v);
}

function featureProblems(f: unknown, i: number, family: TerrainFamily, out: string[]): boolean {
  const path = `features[${i}]`;
  if (!isObject(f)) return out.push(`${path}: expected an object, found ${JSON.stringify(f)}`) < 0;
  const kind = f.kind as keyof typeof KINDS;
  // Own keys only: a kind such as "constructor" must be reported, not looked up on Object.prototype.
  const ranges = typeof kind === 'string' && Object.hasOwn(family.kinds, kind) ? family.kinds[kind] : undefined;
  if (!ranges) {
    out.push(`${path}.kind: expected one of ${Object.keys(family.kinds).join(', ')}, found ${JSON.stringify(f.kind)}`);
    return false;
  }
  const before = out.length;
  for (const key of Object.keys(f)) {
    if (key !== 'kind' && key !== 'x' && !KINDS[kind].fields.includes(key)) out.push(`${path}.${key}: unknown field for a ${kind}`);
  }
  if (typeof f.x !== 'number' || !Number.isFinite(f.x)) out.push(`${path}.x: expected a number, found ${JSON.stringify(f.x)}`);
  for (const field of KINDS[kind].fields) checkRange(f[field], ranges[field], `${path}.${field}`, out);
  return out.length === before;
}

function placementProblems(features: readonly Feature[], family: TerrainFamily, out: string[]): void {
  let prevEnd = -Infinity;
  features.forEach((f, i) => {
    const end = f.x + KINDS[f.kind].footprint(f);
    if (f.x < family.startZone) out.push(`features[${i}].x: expected ≥ startZone (${family.startZone}), found ${f.x}`);
    if (end > family.length - family.finishZone) {
      out.push(`features[${i}]: ends at ${end}, expected ≤ length − finishZone (${family.length - family.finishZone})`);
    }
    if (f.x < prevEnd + family.minSpacing) {
      out.push(`features[${i}].x: expected ≥ ${prevEnd + family.minSpacing} (previous feature's end plus minSpacing ${family.minSpacing}), found ${f.x}`);
    }
    prevEnd = end;
  });
}

/**
 * Every problem of `genome` against `family`, each prefixed with its field path
 * (`features[2].width: expected a number in [0.2, 1.5], found 3`). Empty when valid.
 */
export function validateGenome(genome: unknown, family: TerrainFamily): string[] {
  const out: string[] = [];
  if (!isObject(genome)) return [`(top level): expected an object with roughness and features, found ${JSON.stringify(genome)}`];
  for (const key of Object.keys(genome)) if (key !== 'roughness' && key !== 'features') out.push(`${key}: unknown field`);
  const r = genome.roughness;
  if (!isObject(r)) out.push(`roughness: expected an object {amplitude, seed}, found ${JSON.stringify(r)}`);
  else {
    for (const key of Object.keys(r)) if (key !== 'amplitude' && key !== 'seed') out.push(`roughness.${key}: unknown field`);
    checkRange(r.amplitude, family.roughness, 'roughness.amplitude', out);
    if (!Number.isInteger(r.seed) || (r.seed as number) < 0 || (r.seed as number) >= SEED_LIMIT) {
      out.push(`roughness.seed: expected an integer in [0, ${SEED_LIMIT}), found ${JSON.stringify(r.seed)}`);
    }
  }
  if (!Array.isArray(genome.features)) {
    out.push(`features: expected an array, found ${JSON.stringify(genome.features)}`);
    return out;
  }
  if (genome.features.length > family.maxFeatures) {
    out.push(`features: expected at most ${family.maxFeatures} features, found ${genome.features.length}`);
  }
  const allWellFormed = genome.features.map((f, i) => featureProblems(f, i, family, out)).every(Boolean);
  if (allWellFormed) placementProblems(genome.features as Feature[], family, out);
  return out;
}

export const ROUGHNESS_SEED_LIMIT = SEED_LIMIT;
