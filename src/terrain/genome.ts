import { readJsonFile, UserError } from '../core/index.js';
import type { TerrainFamily, TerrainGenome } from './types.js';
import { validateGenome } from './validate.js';

/** Validates a parsed JSON value as a genome of `family`; throws one UserError naming every bad field. */
export function parseGenome(json: unknown, family: TerrainFamily, where: string): TerrainGenome {
  const problems = validateGenome(json, family);
  if (problems.length > 0) throw new UserError(`Terrain genome ${where} is not valid for family "${family.name}":`, problems.map((p) => `${where}: ${p}`));
  return json as TerrainGenome;
}

/** Loads and validates a genome file. */
export function loadGenome(path: string, family: TerrainFamily): TerrainGenome {
  return parseGenome(readJsonFile(path, 'Terrain genome'), family, path);
}
