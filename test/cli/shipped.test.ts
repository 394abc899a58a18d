/**
 * `eval` and `train` find their default terrain family and body plan in cairn's package, not
 * in the working directory: both work when started from a folder with no envs/ in it.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CLI, ensureBuilt, ROOT } from '../build.js';

const cwd = mkdtempSync(join(tmpdir(), 'cairn-elsewhere-'));
beforeAll(ensureBuilt, 300_000);
afterAll(() => rmSync(cwd, { recursive: true, force: true }));

function cairn(...args: string[]) {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd, encoding: 'utf8', timeout: 300_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('default files from any working directory', () => {
  it('eval with no --terrain or --body runs the package\'s starter course and trestle body', () => {
    expect(existsSync(join(cwd, 'envs'))).toBe(false);
    const here = cairn('eval', '--steps', '50', '--json');
    expect(here.code, here.stderr).toBe(0);
    // The same rollout with the package's files named explicitly gives the same figures.
    const named = cairn('eval', '--steps', '50', '--json', '--terrain', join(ROOT, 'envs/terrain/starter.json'), '--body', join(ROOT, 'envs/bodies/trestle.json'));
    expect(here.stdout).toBe(named.stdout);
  });

  it('train with no --terrain or --body trains on the package\'s files and records which', () => {
    const r = cairn('train', '--iterations', '1', '--population', '2', '--steps', '50', '--workers', '0', '--quiet', '--json');
    expect(r.code, r.stderr).toBe(0);
    expect(readdirSync(join(cwd, 'runs'))).toEqual(['train-starter-trestle-s1']);
    const walker = JSON.parse(readFileSync(join(cwd, 'runs/train-starter-trestle-s1/walker.json'), 'utf8')) as { body: string; meta: { terrain: string } };
    expect(walker.body).toBe(join(ROOT, 'envs/bodies/trestle.json'));
    expect(walker.meta.terrain).toBe(join(ROOT, 'envs/terrain/starter.json'));
  });
});
