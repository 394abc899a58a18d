/**
 * `cairn train` options: the population is the recipe's `es.population` quantity (even, all
 * candidates), `--stop-at` has no sentinel (omitted = every iteration runs), and `--hidden` is
 * the one network-size option, with or without --curriculum.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CLI, ensureBuilt } from '../build.js';

const cwd = mkdtempSync(join(tmpdir(), 'cairn-train-options-'));
beforeAll(ensureBuilt, 300_000);
afterAll(() => rmSync(cwd, { recursive: true, force: true }));

function train(...args: string[]) {
  const r = spawnSync(process.execPath, [CLI, 'train', '--steps', '40', '--workers', '0', '--quiet', ...args], { cwd, encoding: 'utf8', timeout: 300_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('cairn train options', () => {
  it('without --stop-at runs every iteration, and --population counts every candidate', () => {
    const out = join(cwd, 'all');
    const r = train('--iterations', '3', '--population', '6', '--out', out, '--json');
    expect(r.code, r.stderr).toBe(0);
    const log = readFileSync(join(out, 'train-log.jsonl'), 'utf8').trim().split('\n').map((l) => JSON.parse(l) as { rollouts: number });
    expect(log).toHaveLength(3);
    // Each iteration: the mean walker plus 6 candidates (3 perturbations, each with both signs).
    expect(log.map((l) => l.rollouts)).toEqual([7, 14, 21]);
  });

  it.each([
    [['--stop-at', '2'], "option '--stop-at <progress>' argument '2' is invalid. expected a number in [0, 1], found 2"],
    [['--population', '31'], "option '--population <n>' argument '31' is invalid. expected an even number (candidates come in mirrored pairs), found 31"],
    [['--policy', '8'], "unknown option '--policy'"],
  ])('refuses %j with exit 2 and one message, writing nothing', (args, message) => {
    const out = join(cwd, `bad-${args[0].slice(2)}`);
    const r = train(...args, '--out', out);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(message);
    expect(r.stderr).not.toMatch(/^\s+at /m); // no stack trace
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(cwd)).not.toContain('runs');
  });
});
