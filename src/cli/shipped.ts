import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** cairn's package folder: this file is src/cli/shipped.ts or dist/cli/shipped.js inside it. */
export const PACKAGE_ROOT = fileURLToPath(new URL('../../', import.meta.url));

/** Terrain family and body plan that `eval` and `train` use when none is given (relative to the package). */
export const DEFAULT_TERRAIN = 'envs/terrain/starter.json';
export const DEFAULT_BODY = 'envs/bodies/trestle.json';

/**
 * A file that ships with cairn, such as `envs/bodies/trestle.json`, as an absolute path, so
 * default files are found whatever the working directory.
 */
export function shipped(path: string): string {
  return join(PACKAGE_ROOT, path);
}
