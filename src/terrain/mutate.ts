import { canonicalJson, clamp, type Stream } from '../core/index.js';
import { KINDS } from './kinds/index.js';
import type { Feature, FeatureKind, FieldRange, TerrainFamily, TerrainGenome } from './types.js';
import { ROUGHNESS_SEED_LIMIT, validateGenome } from './validate.js';

type MutableFeature = { kind: FeatureKind; x: number; [field: string]: number | string };

/** A fresh field value near its easiest setting (the allowed value closest to 0), so complexity grows gently. */
function gentleValue(r: FieldRange, span: number, s: Stream): number {
  const easy = clamp(0, r.min, r.max);
  const reach = span * (r.max - r.min);
  return s.uniform(Math.max(r.min, easy - reach), Math.min(r.max, easy + reach));
}

function newFeature(family: TerrainFamily, s: Stream): MutableFeature {
  const kinds = Object.keys(family.kinds) as FeatureKind[];
  const kind = kinds[s.int(kinds.length)];
  const f: MutableFeature = { kind, x: 0 };
  const ranges = family.kinds[kind]!;
  for (const field of KINDS[kind].fields) f[field] = gentleValue(ranges[field], family.mutation.newFeatureSpan, s);
  const room = family.length - family.finishZone - KINDS[kind].footprint(f) - family.startZone;
  f.x = family.startZone + s.next() * Math.max(0, room);
  return f;
}

/** Sorts by x, pushes features right until spacing holds, drops those that no longer fit. */
function repair(features: MutableFeature[], family: TerrainFamily): MutableFeature[] {
  const sorted = [...features].sort((a, b) => a.x - b.x);
  const out: MutableFeature[] = [];
  let prevEnd = -Infinity;
  for (const f of sorted) {
    f.x = Math.max(f.x, family.startZone, prevEnd + family.minSpacing);
    const end = f.x + KINDS[f.kind].footprint(f);
    if (end > family.length - family.finishZone || out.length >= family.maxFeatures) continue;
    out.push(f);
    prevEnd = end;
  }
  return out;
}

function mutateOnce(genome: TerrainGenome, family: TerrainFamily, s: Stream): TerrainGenome {
  const m = family.mutation;
  let amplitude = genome.roughness.amplitude;
  let seed = genome.roughness.seed;
  if (s.next() < m.fieldProbability) amplitude = clamp(amplitude + family.roughness.mutation * s.normal(), family.roughness.min, family.roughness.max);
  if (s.next() < m.reseedProbability) seed = s.int(ROUGHNESS_SEED_LIMIT);
  let features: MutableFeature[] = genome.features.map((f) => ({ ...(f as MutableFeature) }));
  for (const f of features) {
    const ranges = family.kinds[f.kind]!;
    for (const field of KINDS[f.kind].fields) {
      if (s.next() < m.fieldProbability) {
        const r = ranges[field];
        f[field] = clamp((f[field] as number) + r.mutation * s.normal(), r.min, r.max);
      }
    }
  }
  if (features.length > 0 && s.next() < m.shiftProbability) features[s.int(features.length)].x += m.shift * s.normal();
  if (features.length > 0 && s.next() < m.removeProbability) features.splice(s.int(features.length), 1);
  // A family may allow no kinds at all (roughness only): then there is nothing to add.
  const canAdd = features.length < family.maxFeatures && Object.keys(family.kinds).length > 0;
  if (canAdd && s.next() < m.addProbability) features.push(newFeature(family, s));
  features = repair(features, family);
  return { roughness: { amplitude, seed }, features: features as Feature[] };
}

/**
 * A mutated copy of a valid `genome`: fields perturbed, features added, removed or moved,
 * then repaired so the result is always valid under `family`. Tries up to 20 times to return
 * a genome that differs from its parent; returns the last (valid) attempt otherwise.
 */
export function mutate(genome: TerrainGenome, family: TerrainFamily, s: Stream): TerrainGenome {
  const parent = canonicalJson(genome);
  let child = genome;
  for (let attempt = 0; attempt < 20; attempt++) {
    child = mutateOnce(genome, family, s);
    if (canonicalJson(child) !== parent) break;
  }
  const problems = validateGenome(child, family);
  if (problems.length > 0) throw new Error(`mutate produced an invalid genome: ${problems.join('; ')}`);
  return child;
}
