/**
 * `cairn run RECIPE --set path=value`: overrides go through the recipe's own schema (same
 * messages as the same mistake in a recipe file), are frozen into the run's recipe.json, and
 * an unknown field or bad value is refused with exit 2 and nothing written.
 */
import { existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Run } from '../../src/run/index.js';
import { cli, ensureBuilt, SLOW, tempDir, writeTinyRecipe } from '../store/helpers.js';

let root = '';
let recipe = '';

beforeAll(() => {
  ensureBuilt();
  root = tempDir('overrides');
  recipe = writeTinyRecipe(root);
}, SLOW);
afterAll(() => rmSync(root, { recursive: true, force: true }));

describe('--set', () => {
  it('freezes the overridden fields into recipe.json, with numbers, arrays and words read as such', () => {
    const out = join(root, 'set');
    Run.create(recipe, out, { sets: ['es.sigma=0.03', 'policy.hidden=[5,3]', 'novelty.measure=profile', 'name=other'] });
    const frozen = JSON.parse(readFileSync(join(out, 'recipe.json'), 'utf8')) as { es: { sigma: number }; policy: { hidden: number[] }; novelty: { measure: string }; name: string };
    expect(frozen.es.sigma).toBe(0.03);
    expect(frozen.policy.hidden).toEqual([5, 3]);
    expect(frozen.novelty.measure).toBe('profile');
    expect(frozen.name).toBe('other');
    expect(Run.open(out).ctx.shape.hidden).toEqual([5, 3]);
  });

  it('changes the recipe hash as the same edit of the recipe file does', () => {
    const edited = JSON.parse(readFileSync(recipe, 'utf8')) as Record<string, Record<string, unknown>>;
    const file = join(root, 'edited.json');
    writeFileSync(file, JSON.stringify({ ...edited, es: { ...edited.es, sigma: 0.03 } }));
    const viaSet = Run.create(recipe, join(root, 'hash-set'), { sets: ['es.sigma=0.03'] });
    const viaFile = Run.create(file, join(root, 'hash-file'), {});
    expect(viaSet.recipeHash).toBe(viaFile.recipeHash);
    expect(viaSet.recipeHash).not.toBe(Run.create(recipe, join(root, 'hash-plain'), {}).recipeHash);
  });

  /** The message of the same mistake made in a recipe file, less the file name. */
  async function fileMessage(edit: (r: Record<string, Record<string, unknown>>) => void): Promise<string> {
    const r = JSON.parse(readFileSync(recipe, 'utf8')) as Record<string, Record<string, unknown>>;
    edit(r);
    const file = join(root, 'bad.json');
    writeFileSync(file, JSON.stringify(r));
    const res = await cli(['run', file, '--out', join(root, 'never')]);
    expect(res.code).toBe(2);
    return res.stderr.split('\n').slice(1).join('\n').replaceAll(file, 'FILE');
  }

  it.each([
    ['an unknown field', 'es.pace=3', (r: Record<string, Record<string, unknown>>) => { r.es = { ...r.es, pace: 3 }; }],
    ['an unknown section', 'speed.max=3', (r: Record<string, Record<string, unknown>>) => { r.speed = { max: 3 }; }],
    ['a value out of range', 'es.sigma=-1', (r: Record<string, Record<string, unknown>>) => { r.es = { ...r.es, sigma: -1 }; }],
    ['a word where a number belongs', 'seed=abc', (r: Record<string, Record<string, unknown>>) => { (r as Record<string, unknown>).seed = 'abc'; }],
  ])('refuses %s with the schema\'s own message, exit 2, nothing written', async (_what, set, edit) => {
    const out = join(root, `refused-${set.replace(/[^a-z]/g, '')}`);
    const res = await cli(['run', recipe, '--out', out, '--set', set]);
    expect(res.code).toBe(2);
    expect(res.stderr).not.toMatch(/^\s+at /m);
    expect(res.stderr.split('\n').slice(1).join('\n').replaceAll(`${recipe} with --set`, 'FILE')).toBe(await fileMessage(edit));
    expect(existsSync(out)).toBe(false);
  });

  it('refuses a path through a field that is not a section, and a malformed override', async () => {
    for (const [set, msg] of [['seed.x=1', /--set seed\.x=1: seed is not an object/], ['es.sigma', /--set es\.sigma: expected path\.to\.field=value/]] as const) {
      const out = join(root, 'refused-path');
      const res = await cli(['run', recipe, '--out', out, '--set', set]);
      expect(res.code).toBe(2);
      expect(res.stderr).toMatch(msg);
      expect(existsSync(out)).toBe(false);
    }
  });
});
