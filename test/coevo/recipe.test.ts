import { existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { loadBodyPlan } from '../../src/body/index.js';
import { UserError } from '../../src/core/index.js';
import { loadRecipe, parseRecipe, type Recipe } from '../../src/coevo/index.js';
import { defaultEsConfig } from '../../src/evolve/index.js';
import { loadFamily } from '../../src/terrain/index.js';
import { ROOT } from './helpers.js';

/** The problems a recipe is refused with (fails the test if it is accepted). */
function problemsOf(json: unknown): readonly string[] {
  try {
    parseRecipe(json, 'r.json');
  } catch (e) {
    expect(e).toBeInstanceOf(UserError);
    return (e as UserError).problems;
  }
  throw new Error(`recipe ${JSON.stringify(json)} was accepted`);
}

const SECTIONS = ['policy', 'es', 'episode', 'population', 'admission', 'novelty', 'transfer', 'solve', 'checkpoint', 'budget'] as const;

describe('parseRecipe defaults', () => {
  it('fills every section of an empty recipe', () => {
    const r = parseRecipe({}, 'r.json');
    for (const s of SECTIONS) expect(r[s], s).toBeTypeOf('object');
    expect(r.name).toBeTypeOf('string');
    expect(Number.isInteger(r.seed)).toBe(true);
    expect(r.admission.low).toBeLessThan(r.admission.high);
  });

  it('keeps given fields and fills the rest of their section', () => {
    const r = parseRecipe({ es: { population: 6 }, admission: { low: 0.2 } }, 'r.json');
    expect(r.es.population).toBe(6);
    // The ES defaults are those of the evolve layer, whose Adam settings follow Kingma & Ba
    // (2015), "Adam: A Method for Stochastic Optimization": β₁ 0.9, β₂ 0.999, ε 1e-8.
    const { population: _p, ...esRest } = defaultEsConfig();
    expect(r.es).toEqual({ population: 6, ...esRest });
    expect([r.es.beta1, r.es.beta2, r.es.epsilon]).toEqual([0.9, 0.999, 1e-8]);
    expect(r.admission.low).toBe(0.2);
    expect(r.admission.high).toBe(parseRecipe({}, 'r.json').admission.high);
  });

  it('re-reads a frozen recipe (defaults written out) as the same recipe', () => {
    const r = parseRecipe({ seed: 9, episode: { maxSteps: 50 }, novelty: { measure: 'profile' } }, 'r.json');
    expect(parseRecipe(JSON.parse(JSON.stringify(r)), 'frozen.json')).toEqual(r);
  });
});

describe('parseRecipe refusals', () => {
  it('refuses unknown keys, naming the field path and the key', () => {
    expect(problemsOf({ speed: 1 })).toEqual([expect.stringMatching(/^r\.json: \(top level\): .*"speed"/)]);
    expect(problemsOf({ es: { sigmaa: 0.1 } })).toEqual([expect.stringMatching(/^r\.json: es: .*"sigmaa"/)]);
    expect(problemsOf({ admission: { low: 0.1, hgh: 0.5 } })).toEqual([expect.stringMatching(/^r\.json: admission: .*"hgh"/)]);
  });

  it('refuses wrong types with the path, what was expected and what was found', () => {
    const [p] = problemsOf({ es: { population: 'four' } });
    expect(p).toMatch(/^r\.json: es\.population: .*expected number.*found "four"/);
    expect(problemsOf({ seed: 1.5 })[0]).toMatch(/^r\.json: seed: .*int.*found 1\.5/);
    expect(problemsOf({ novelty: { measure: 'euclid' } })[0]).toMatch(/novelty\.measure: .*"descriptor".*"profile".*found "euclid"/);
    expect(problemsOf([])[0]).toMatch(/\(top level\): .*expected object/);
  });

  it('refuses values out of range with the bound', () => {
    expect(problemsOf({ es: { population: 0 } })[0]).toMatch(/^r\.json: es\.population: .*>=2.*found 0/);
    expect(problemsOf({ es: { population: 31 } })).toEqual(['r.json: es.population: expected an even number (candidates come in mirrored pairs) (found 31)']);
    expect(problemsOf({ admission: { high: 1.5 } })[0]).toMatch(/^r\.json: admission\.high: .*<=1.*found 1\.5/);
    expect(problemsOf({ policy: { hidden: [8, 0] } })[0]).toMatch(/^r\.json: policy\.hidden\[1\]: .*>=1.*found 0/);
    expect(problemsOf({ es: { beta1: 1 } })[0]).toMatch(/^r\.json: es\.beta1: .*<1/);
  });

  it('lists every problem at once', () => {
    const ps = problemsOf({ es: { population: 0, sigma: -1 }, solve: { checks: 'x' }, extra: true });
    expect(ps).toHaveLength(4);
    for (const where of ['es.population', 'es.sigma', 'solve.checks', '"extra"']) expect(ps.some((p) => p.includes(where)), where).toBe(true);
  });

  it('refuses admission.low at or above admission.high, and accepts it just below', () => {
    expect(problemsOf({ admission: { low: 0.5, high: 0.5 } })).toEqual([expect.stringMatching(/^r\.json: admission\.low: expected below admission\.high \(0\.5\), found 0\.5$/)]);
    expect(problemsOf({ admission: { low: 0.7, high: 0.5 } })[0]).toMatch(/admission\.low/);
    expect(parseRecipe({ admission: { low: 0.49, high: 0.5 } }, 'r.json').admission.low).toBe(0.49);
  });
});

describe('loadRecipe', () => {
  const dir = mkdtempSync(join(tmpdir(), 'cairn-recipe-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('resolves terrain and body relative to the recipe file, and keeps absolute paths', () => {
    mkdirSync(join(dir, 'runs'));
    const path = join(dir, 'runs', 'r.json');
    writeFileSync(path, JSON.stringify({ terrain: '../envs/t.json', body: '/abs/body.json' }));
    const r = loadRecipe(path);
    expect(r.terrain).toBe(join(dir, 'envs', 't.json'));
    expect(r.body).toBe(resolve('/abs/body.json'));
  });

  it('resolves the default terrain and body relative to the recipe file too', () => {
    const path = join(dir, 'runs', 'empty.json');
    writeFileSync(path, '{}');
    const r = loadRecipe(path);
    expect(r.terrain).toBe(resolve(dir, 'runs', parseRecipe({}, 'x').terrain));
    expect(r.body).toBe(resolve(dir, 'runs', parseRecipe({}, 'x').body));
  });

  it('refuses a missing file and a file that is not JSON with a UserError naming it', () => {
    expect(() => loadRecipe(join(dir, 'nope.json'))).toThrow(UserError);
    expect(() => loadRecipe(join(dir, 'nope.json'))).toThrow(/nope\.json/);
    writeFileSync(join(dir, 'bad.json'), '{ "seed": ');
    expect(() => loadRecipe(join(dir, 'bad.json'))).toThrow(UserError);
  });

  it.each(['demo', 'smoke'])('parses runs/%s.json, whose terrain family and body plan load', (name) => {
    const r: Recipe = loadRecipe(join(ROOT, 'runs', `${name}.json`));
    expect(r.name).toBe(name);
    expect(existsSync(r.terrain) && existsSync(r.body)).toBe(true);
    expect(() => loadFamily(r.terrain)).not.toThrow();
    expect(() => loadBodyPlan(r.body)).not.toThrow();
  });
});
