import { assertNoProblems } from '../core/index.js';
import { paramCount, type PolicyShape } from './shape.js';

/**
 * Parameters read from JSON (a plain array of numbers, as `canonicalJson` writes a
 * `Float64Array`) for a network of `shape`; throws a UserError naming `where` when the array
 * has the wrong length or holds anything but finite numbers.
 */
export function parseParams(json: unknown, shape: PolicyShape, where: string): Float64Array {
  const expected = paramCount(shape);
  const problems: string[] = [];
  if (!Array.isArray(json)) {
    problems.push(`${where}: expected an array of ${expected} numbers, found ${json === null ? 'null' : typeof json}`);
  } else {
    if (json.length !== expected) problems.push(`${where}: expected ${expected} numbers for this shape, found ${json.length}`);
    const bad = json.findIndex((x: unknown) => typeof x !== 'number' || !Number.isFinite(x));
    if (bad >= 0) problems.push(`${where}[${bad}]: expected a finite number, found ${JSON.stringify(json[bad]) ?? 'nothing'}`);
  }
  assertNoProblems(`policy parameters at ${where}`, problems);
  return Float64Array.from(json as number[]);
}
