export { UserError, assertNoProblems } from './errors.js';
export { stream, restoreStream, hash01 } from './rng.js';
export type { Stream, StreamState } from './rng.js';
export { canonicalJson, sha256, hashValue } from './canonical.js';
export { dot, norm, distance, clamp, median } from './vec.js';
export type { Vec } from './vec.js';
export { readJsonFile } from './json.js';
export { parseWith, formatPath } from './schema.js';
export { NOISE_LABEL, perturbation, candidate } from './noise.js';
