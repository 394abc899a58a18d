import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** The programs whose versions decide a rollout's floats: the same inputs under others may give other results. */
export interface Versions { readonly node: string; readonly planck: string; readonly cairn: string }

let versions: Versions | undefined;

/** Versions of Node, planck-js and cairn running here. Read once per process. */
export function writerVersions(): Versions {
  if (versions) return versions;
  const require = createRequire(import.meta.url);
  const version = (path: string): string => (JSON.parse(readFileSync(path, 'utf8')) as { version: string }).version;
  // planck-js does not export its package.json; it sits one folder above its main file.
  const planck = version(join(dirname(require.resolve('planck-js')), '..', 'package.json'));
  const cairn = version(fileURLToPath(new URL('../../package.json', import.meta.url)));
  versions = { node: process.version, planck, cairn };
  return versions;
}

/** Where two version sets differ, e.g. "planck-js 1.3.0 here, 1.4.0 there"; empty when equal. */
export function versionDifferences(here: Versions, there: Versions): string[] {
  const names: Record<keyof Versions, string> = { cairn: 'cairn', planck: 'planck-js', node: 'Node' };
  return (Object.keys(names) as (keyof Versions)[]).flatMap((k) => (here[k] === there[k] ? [] : [`${names[k]} ${here[k]} here, ${there[k]} there`]));
}
