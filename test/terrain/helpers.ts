/** Shared fixtures for the terrain tests: the shipped families and generators of valid genomes. */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { stream } from '../../src/core/index.js';
import {
  KINDS,
  loadFamily,
  mutate,
  type Feature,
  type FeatureKind,
  type FieldRange,
  type TerrainFamily,
  type TerrainGenome,
} from '../../src/terrain/index.js';

/** Absolute path of a shipped terrain family file. */
export function familyPath(name: string): string {
  return fileURLToPath(new URL(`../../envs/terrain/${name}.json`, import.meta.url));
}

/** The raw JSON of a shipped family, a fresh copy each call (tests edit it). */
export function rawFamily(name: string): Record<string, any> {
  return JSON.parse(readFileSync(familyPath(name), 'utf8')) as Record<string, any>;
}

export const starter = loadFamily(familyPath('starter'));
export const mixed = loadFamily(familyPath('mixed'));
export const FAMILIES: readonly [string, TerrainFamily][] = [
  ['starter', starter],
  ['mixed', mixed],
];

/** `steps` mutations of the family's start genome, all drawn from one stream. */
export function mutationChain(family: TerrainFamily, seed: number, steps: number): TerrainGenome {
  const s = stream(seed, 'test/terrain/chain');
  let g = family.start;
  for (let i = 0; i < steps; i++) g = mutate(g, family, s);
  return g;
}

/** Genomes reached by chains of mutations from the start genome. */
export function mutatedGenome(family: TerrainFamily, maxSteps = 40): fc.Arbitrary<TerrainGenome> {
  return fc.tuple(fc.nat(), fc.integer({ min: 0, max: maxSteps })).map(([seed, n]) => mutationChain(family, seed, n));
}

/** A field value: anywhere in range, at either end, or (when the range spans 0) very near 0. */
function fieldValue(r: FieldRange): fc.Arbitrary<number> {
  const near0 = r.min <= 0 && r.max >= 0 ? [fc.double({ min: Math.max(r.min, -0.02), max: Math.min(r.max, 0.02), noNaN: true })] : [];
  return fc.oneof(fc.double({ min: r.min, max: r.max, noNaN: true }), fc.constantFrom(r.min, r.max), ...near0);
}

interface Draft {
  kind: FeatureKind;
  values: number[];
  extra: number;
  snap: boolean;
}

function draft(family: TerrainFamily): fc.Arbitrary<Draft> {
  const kinds = Object.keys(family.kinds) as FeatureKind[];
  return fc.constantFrom(...kinds).chain((kind) =>
    fc.record({
      kind: fc.constant(kind),
      values: fc.tuple(...KINDS[kind].fields.map((f) => fieldValue(family.kinds[kind]![f]))),
      // 0 puts a feature exactly minSpacing after the previous one: the tightest valid layout.
      extra: fc.oneof(fc.constant(0), fc.double({ min: 0, max: 4, noNaN: true })),
      // Snapping x onto the roughness grid puts a feature's edge where a bump would sit.
      snap: fc.boolean(),
    }),
  );
}

/** Lays drafts out left to right with valid spacing, stopping at the first that does not fit. */
function layOut(family: TerrainFamily, drafts: Draft[]): Feature[] {
  const limit = family.length - family.finishZone;
  const out: Feature[] = [];
  let prevEnd = -Infinity;
  for (const d of drafts) {
    let x = Math.max(family.startZone, prevEnd + family.minSpacing) + d.extra;
    if (d.snap) x = Math.ceil(x / family.roughnessSpacing) * family.roughnessSpacing;
    const f: Record<string, number | string> = { kind: d.kind, x };
    KINDS[d.kind].fields.forEach((name, i) => (f[name] = d.values[i]));
    const end = x + KINDS[d.kind].footprint(f as Feature);
    if (end > limit || out.length >= family.maxFeatures) break;
    out.push(f as Feature);
    prevEnd = end;
  }
  return out;
}

/** Valid genomes built directly, reaching field extremes and tight layouts that mutation rarely hits. */
export function directGenome(family: TerrainFamily): fc.Arbitrary<TerrainGenome> {
  return fc
    .record({
      amplitude: fieldValue(family.roughness),
      seed: fc.integer({ min: 0, max: 2 ** 31 - 1 }),
      drafts: fc.array(draft(family), { maxLength: family.maxFeatures + 2 }),
    })
    .map(({ amplitude, seed, drafts }) => ({ roughness: { amplitude, seed }, features: layOut(family, drafts) }));
}

/** Either kind of valid genome. */
export function anyGenome(family: TerrainFamily): fc.Arbitrary<TerrainGenome> {
  return fc.oneof(mutatedGenome(family), directGenome(family));
}

/** Freezes a value and everything inside it, so any write to it throws (ES modules are strict). */
export function deepFreeze<T>(v: T): T {
  if (v !== null && typeof v === 'object') {
    for (const inner of Object.values(v)) deepFreeze(inner);
    Object.freeze(v);
  }
  return v;
}

/** A genome from a plain list of features (no roughness unless given). */
export function genome(features: Record<string, number | string>[], amplitude = 0, seed = 0): TerrainGenome {
  return { roughness: { amplitude, seed }, features: features as unknown as Feature[] };
}
