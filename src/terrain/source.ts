import { dirname, resolve } from 'node:path';
import { readJsonFile, UserError } from '../core/index.js';
import { parseFamily, loadFamily } from './family.js';
import { parseGenome } from './genome.js';
import type { TerrainFamily, TerrainGenome } from './types.js';

/** A course's ingredients as named on the command line. */
export interface TerrainSource {
  readonly family: TerrainFamily;
  readonly familyPath: string;
  readonly genome: TerrainGenome;
}

function isObject(v: unknown): v is Record<string, unknown> {
  return v !== null && typeof v === 'object' && !Array.isArray(v);
}

/**
 * Reads `--terrain FILE`, which may be: a terrain family (its start genome is used); a genome
 * file `{ "family": "<path, relative to the file>", "genome": {...} }`; or a bare genome
 * `{ "roughness": ..., "features": [...] }`, which needs `familyPath`.
 */
export function loadTerrainSource(path: string, familyPath?: string): TerrainSource {
  const json = readJsonFile(path, 'Terrain');
  if (isObject(json) && 'kinds' in json) {
    const family = parseFamily(json, path);
    return { family, familyPath: path, genome: family.start };
  }
  if (isObject(json) && 'genome' in json) {
    const fp = familyPath ?? (typeof json.family === 'string' ? resolve(dirname(path), json.family) : undefined);
    if (!fp) throw new UserError(`Terrain file ${path}: family: expected the path of a terrain family (a string), found ${JSON.stringify(json.family)}`);
    const family = loadFamily(fp);
    return { family, familyPath: fp, genome: parseGenome(json.genome, family, `${path}: genome`) };
  }
  if (!familyPath) {
    throw new UserError(`Terrain file ${path} is a bare genome: say which family it belongs to with --family FILE, or wrap it as {"family": ..., "genome": ...}`);
  }
  const family = loadFamily(familyPath);
  return { family, familyPath, genome: parseGenome(json, family, path) };
}
