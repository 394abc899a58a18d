import { KINDS } from './kinds/index.js';
import type { Feature, FieldRange, TerrainFamily, TerrainGenome } from './types.js';

const clamp = (v: number, r: FieldRange): number => Math.min(r.max, Math.max(r.min, v));

/**
 * Brings a genome from another family into `family`'s bounds: each numeric field and the
 * roughness amplitude clamped into its range, then features kept left to right while they fit
 * the course (after the start zone, before the finish zone, minSpacing apart, at most
 * maxFeatures). Features of a kind the family does not allow cannot be clipped: they are
 * reported in `refused` and the caller decides. `changes` lists every field that moved and every
 * feature dropped, by path.
 */
export function clipGenome(genome: TerrainGenome, family: TerrainFamily): { genome: TerrainGenome; changes: string[]; refused: string[] } {
  const changes: string[] = [];
  const refused: string[] = [];
  const amplitude = clamp(genome.roughness.amplitude, family.roughness);
  if (amplitude !== genome.roughness.amplitude) changes.push(`roughness.amplitude ${genome.roughness.amplitude} → ${amplitude}`);
  const kept: Feature[] = [];
  let prevEnd = -Infinity;
  genome.features.forEach((f, i) => {
    const ranges = Object.hasOwn(family.kinds, f.kind) ? family.kinds[f.kind] : undefined;
    if (!ranges) {
      refused.push(`features[${i}].kind: family "${family.name}" does not allow ${f.kind} (it allows ${Object.keys(family.kinds).join(', ')})`);
      return;
    }
    const next: Record<string, number | string> = { kind: f.kind, x: f.x };
    for (const field of KINDS[f.kind].fields) {
      const v = clamp(f[field] as number, ranges[field]);
      if (v !== f[field]) changes.push(`features[${i}].${field} ${f[field]} → ${v}`);
      next[field] = v;
    }
    const clipped = next as unknown as Feature;
    const end = f.x + KINDS[f.kind].footprint(clipped);
    const fits = f.x >= family.startZone && end <= family.length - family.finishZone && f.x >= prevEnd + family.minSpacing && kept.length < family.maxFeatures;
    if (!fits) {
      changes.push(`features[${i}] (${f.kind} at x ${f.x}) dropped: it does not fit on the course`);
      return;
    }
    kept.push(clipped);
    prevEnd = end;
  });
  return { genome: { roughness: { ...genome.roughness, amplitude }, features: kept }, changes, refused };
}
