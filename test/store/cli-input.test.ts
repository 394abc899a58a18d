/**
 * `cairn run` with bad input: exit code 2, one message on stderr without a stack trace, and
 * nothing written — neither the --out directory nor a default runs/<name> under the working
 * directory.
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cli, ensureBuilt, SLOW, tempDir, writeTinyRecipe } from './helpers.js';

let root = '';
let recipe = '';

beforeAll(() => {
  ensureBuilt();
  root = tempDir('input');
  recipe = writeTinyRecipe(root);
}, SLOW);
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** Runs `cairn run` in a fresh working directory and checks the refusal. */
async function expectRefused(label: string, args: (cwd: string, out: string) => string[], message: RegExp): Promise<void> {
  const cwd = join(root, label);
  mkdirSync(cwd);
  const out = join(cwd, 'out');
  const r = await cli(['run', ...args(cwd, out)], cwd);
  expect(r.code, r.stderr).toBe(2);
  expect(r.stderr).toMatch(/^cairn: /);
  expect(r.stderr).toMatch(message);
  expect(r.stderr).not.toMatch(/^\s+at /m);
  expect(r.stdout).toBe('');
  expect(readdirSync(cwd).filter((n) => n !== 'recipe.json')).toEqual([]);
}

describe('cairn run refuses bad input and writes nothing', () => {
  it('an unknown option', () => expectRefused('unknown', (_, out) => [recipe, '--out', out, '--bogus'], /unknown option '--bogus'/));

  it('a worker count that is not an integer', () => expectRefused('workers', (_, out) => [recipe, '--out', out, '--workers', 'two'], /--workers.*expected an integer, found "two"/));

  it('zero iterations', () => expectRefused('iterations', (_, out) => [recipe, '--out', out, '--iterations', '0'], /expected an integer in \[1, /));

  it('a missing recipe file', () => expectRefused('missing', (cwd) => [join(cwd, 'nope.json')], /Recipe file not found or unreadable: .*nope\.json/));

  it('a recipe with an unknown field', () =>
    expectRefused('field', (cwd, out) => {
      const bad = JSON.parse(readFileSync(recipe, 'utf8')) as Record<string, unknown>;
      writeFileSync(join(cwd, 'recipe.json'), JSON.stringify({ ...bad, speed: 3 }));
      return [join(cwd, 'recipe.json'), '--out', out];
    }, /speed/));

  it('a recipe naming a terrain family that does not exist, naming the field and the path', () =>
    expectRefused('family', (cwd, out) => {
      const bad = JSON.parse(readFileSync(recipe, 'utf8')) as Record<string, unknown>;
      writeFileSync(join(cwd, 'recipe.json'), JSON.stringify({ ...bad, terrain: 'no-such-family.json' }));
      return [join(cwd, 'recipe.json'), '--out', out];
    }, /^cairn: Recipe .*\/family\/recipe\.json, field `terrain`: Terrain family file not found or unreadable: .*\/family\/no-such-family\.json \(ENOENT\)\n$/));

  it('a recipe naming a body plan that does not exist, naming the field and the path', () =>
    expectRefused('body', (cwd, out) => {
      const bad = JSON.parse(readFileSync(recipe, 'utf8')) as Record<string, unknown>;
      writeFileSync(join(cwd, 'recipe.json'), JSON.stringify({ ...bad, body: 'bodies/none.json' }));
      return [join(cwd, 'recipe.json'), '--out', out];
    }, /^cairn: Recipe .*\/body\/recipe\.json, field `body`: Body plan file not found or unreadable: .*\/body\/bodies\/none\.json \(ENOENT\)\n$/));

  it('a body plan with a segment 1e9 m from the torso, naming the file and the field', () =>
    expectRefused('far-segment', (cwd, out) => {
      const bad = JSON.parse(readFileSync(recipe, 'utf8')) as Record<string, string>;
      const plan = JSON.parse(readFileSync(bad.body, 'utf8')) as { segments: { position: number[] }[] };
      plan.segments[1].position = [1e9, 0];
      writeFileSync(join(root, 'far.json'), JSON.stringify(plan)); // outside cwd, which must stay empty
      writeFileSync(join(cwd, 'recipe.json'), JSON.stringify({ ...bad, body: join(root, 'far.json') }));
      return [join(cwd, 'recipe.json'), '--out', out];
    }, /field `body`: Body plan .*far\.json is not valid:\n {2}- .*far\.json: segments\[1\]\.position: expected within 10 m of the torso centre/));

  it('an --out directory that already holds something, which is left as it was', async () => {
    const out = join(root, 'taken');
    mkdirSync(out);
    writeFileSync(join(out, 'precious.txt'), 'mine');
    const r = await cli(['run', recipe, '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('already exists');
    expect(readdirSync(out)).toEqual(['precious.txt']);
    expect(existsSync(join(out, 'checkpoints'))).toBe(false);
  });
});
