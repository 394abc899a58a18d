import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/index.js';
import { loadFamily, parseFamily } from '../../src/terrain/index.js';
import { familyPath, rawFamily } from './helpers.js';

/** The UserError `fn` throws (fails the test when it throws nothing or something else). */
function userError(fn: () => unknown): UserError {
  let err: unknown;
  try {
    fn();
  } catch (e) {
    err = e;
  }
  expect(err).toBeInstanceOf(UserError);
  return err as UserError;
}

/** Asserts parsing `json` fails with a problem at `path` (after the `where` prefix) mentioning every `words`. */
function expectProblemAt(json: unknown, path: string, ...words: string[]): void {
  const err = userError(() => parseFamily(json, 'fam.json'));
  const hit = err.problems.find((p) => p.startsWith(`fam.json: ${path}: `));
  expect(hit, `no problem at ${path} in:\n${err.message}`).toBeDefined();
  for (const w of words) expect(hit).toContain(w);
  expect(err.message).toContain(hit);
}

const tmp = mkdtempSync(join(tmpdir(), 'cairn-family-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

describe('loadFamily / parseFamily accept', () => {
  it.each(['starter', 'mixed'])('the shipped %s family, unchanged', (name) => {
    const f = loadFamily(familyPath(name));
    expect(f).toEqual(rawFamily(name));
    expect(f.name).toBe(name);
    expect(parseFamily(rawFamily(name), name)).toEqual(f);
  });

  it('a family with a start genome that holds features', () => {
    const j = rawFamily('starter');
    j.start.features = [{ kind: 'gap', x: 6, width: 0.4 }];
    expect(parseFamily(j, 'fam.json').start.features).toHaveLength(1);
  });

  it('a family that allows no feature kinds (roughness only)', () => {
    const j = rawFamily('starter');
    j.kinds = {};
    expect(parseFamily(j, 'fam.json').kinds).toEqual({});
  });
});

describe('parseFamily rejects with a UserError naming the field path', () => {
  it('a range with min above max', () => {
    const j = rawFamily('mixed');
    j.kinds.block.height = { min: 0.5, max: 0.1, mutation: 0.01 };
    expectProblemAt(j, 'kinds.block.height', '0.5', '0.1');
    const k = rawFamily('starter');
    k.roughness.min = 0.1;
    expectProblemAt(k, 'roughness', '0.1', '0.06');
  });

  it('spawnX at or beyond startZone', () => {
    for (const spawnX of [4, 5]) {
      const j = rawFamily('starter');
      j.spawnX = spawnX;
      expectProblemAt(j, 'spawnX', 'startZone');
    }
  });

  it('a length that leaves no room between the start and finish zones', () => {
    const j = rawFamily('starter');
    j.length = 6;
    expectProblemAt(j, 'length', '6');
  });

  it('an unknown key at the top level, in a nested object and in a range', () => {
    const a = rawFamily('starter');
    a.colour = 'red';
    expectProblemAt(a, '(top level)', 'colour');
    const b = rawFamily('starter');
    b.mutation.rate = 0.1;
    expectProblemAt(b, 'mutation', 'rate');
    const c = rawFamily('starter');
    c.kinds.gap.width.step = 0.1;
    expectProblemAt(c, 'kinds.gap.width', 'step');
  });

  it('an unknown kind, and an unknown field of a known kind', () => {
    const a = rawFamily('starter');
    a.kinds.hole = { width: { min: 0.1, max: 1, mutation: 0.1 } };
    expectProblemAt(a, 'kinds', 'hole');
    const b = rawFamily('starter');
    b.kinds.gap.depth = { min: 0.1, max: 1, mutation: 0.1 };
    expectProblemAt(b, 'kinds.gap.depth', 'unknown');
  });

  it('a missing field range, and a missing top-level field', () => {
    const a = rawFamily('mixed');
    delete a.kinds.slope.grade;
    expectProblemAt(a, 'kinds.slope', 'grade');
    const b = rawFamily('starter');
    delete b.gapDepth;
    expectProblemAt(b, 'gapDepth');
  });

  it('a non-positive gap width, a negative roughness and a fractional maxFeatures', () => {
    const a = rawFamily('starter');
    a.kinds.gap.width.min = 0;
    expectProblemAt(a, 'kinds.gap.width.min', '0');
    const b = rawFamily('starter');
    b.roughness.min = -0.01;
    expectProblemAt(b, 'roughness.min', '-0.01');
    const c = rawFamily('starter');
    c.maxFeatures = 2.5;
    expectProblemAt(c, 'maxFeatures', '2.5');
  });

  it('an invalid start genome, with the path inside start', () => {
    const a = rawFamily('starter');
    a.start.features = [{ kind: 'gap', x: 6, width: 3 }];
    expectProblemAt(a, 'start.features[0].width', '3');
    const b = rawFamily('starter');
    b.start.features = [{ kind: 'gap', x: 2, width: 0.5 }];
    expectProblemAt(b, 'start.features[0].x', 'startZone');
    const c = rawFamily('starter');
    c.start.roughness.seed = 0.5;
    expectProblemAt(c, 'start.roughness.seed');
  });

  it('a value that is not an object', () => {
    for (const bad of [null, 3, 'family', []]) {
      const err = userError(() => parseFamily(bad, 'fam.json'));
      expect(err.message).toContain('fam.json');
    }
  });

  it('lists every problem, each starting with the location', () => {
    const j = rawFamily('starter');
    j.spawnX = 9;
    j.kinds.step.height = { min: 1, max: -1, mutation: 0.1 };
    const err = userError(() => parseFamily(j, 'fam.json'));
    expect(err.problems.length).toBe(2);
    for (const p of err.problems) expect(p.startsWith('fam.json: ')).toBe(true);
  });
});

describe('loadFamily file errors', () => {
  it('names a missing file', () => {
    const path = join(tmp, 'nowhere.json');
    expect(userError(() => loadFamily(path)).message).toContain(path);
  });

  it('names a file holding bad JSON', () => {
    const path = join(tmp, 'broken.json');
    writeFileSync(path, '{ "name": "broken", ');
    const err = userError(() => loadFamily(path));
    expect(err.message).toContain(path);
    expect(err.message).toMatch(/JSON/);
  });

  it('names the file in every problem of an invalid family', () => {
    const path = join(tmp, 'bad.json');
    const j = rawFamily('starter');
    j.spawnX = 10;
    writeFileSync(path, JSON.stringify(j));
    const err = userError(() => loadFamily(path));
    expect(err.problems.some((p) => p.startsWith(`${path}: spawnX: `))).toBe(true);
  });
});
