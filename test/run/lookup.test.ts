/**
 * `cairn lookup`: every walker of a run or export on one course, ranked by progress, then not
 * falling, then steps. The ranking must agree with `cairn eval` of each walker on its own, work
 * on the shipped changed body plans (same joints and sensors), skip walkers whose network does
 * not fit with a reason, confirm every walker by the run's own rule with --confirm, and refuse bad
 * sources with exit 2.
 */
import { cpSync, existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { actionSize, loadBodyPlan, observationNames } from '../../src/body/index.js';
import { cairn, cairnAsync, cleanup, exportRun, ROOT, SMOKE, smokeRun, tempDir } from '../export/helpers.js';

const SLOW = 600_000;
const CHANGED = ['trestle-short-front', 'trestle-weak'];
let tmp = '';
let run = '';
let exported = '';
let genome = '';

interface Row { walkerId: number; iteration: number; courses: number[]; progress: number; fell: boolean; steps: number; end: string; confirmed?: boolean; checks?: number[]; pushes?: number[] }
interface Lookup { body: string; walkers: number; confirm?: { threshold: number; checks: number; push: number; seed: number }; ranked: Row[]; skipped: { walkerId: number; reason: string }[] }

function lookup(...args: string[]): Lookup {
  const r = cairn(['lookup', ...args, '--json', '--workers', '2']);
  expect(r.code, r.stderr).toBe(0);
  return JSON.parse(r.stdout) as Lookup;
}

beforeAll(() => {
  run = smokeRun();
  tmp = tempDir('lookup');
  exported = join(tmp, 'exp');
  exportRun(run, exported, '--only', 'all');
  // A hand-built course on the smoke run's family: a step up and a narrow gap.
  genome = join(tmp, 'course.json');
  writeFileSync(genome, JSON.stringify({
    family: join(ROOT, 'envs/terrain/starter.json'),
    genome: { roughness: { amplitude: 0.01, seed: 7 }, features: [{ kind: 'step', x: 6, height: 0.08 }, { kind: 'gap', x: 10, width: 0.25 }] },
  }));
}, SLOW);
afterAll(cleanup);

describe('cairn lookup', () => {
  it('ranks as eval of each walker on its own does, figure for figure', async () => {
    const got = lookup(exported, '--course', genome);
    expect(got.skipped).toEqual([]);
    expect(got.ranked.length).toBeGreaterThanOrEqual(3);
    expect(new Set(got.ranked.map((r) => r.progress)).size).toBeGreaterThan(1);
    // The smoke recipe's episode settings are the defaults except its 600-step budget, so a bare eval with --steps 600 is the same rollout.
    const evals = await Promise.all(got.ranked.map((r) => cairnAsync(['eval', '--terrain', genome, '--walker', join(exported, 'walkers', `walker-${r.walkerId}-it${r.iteration}.safetensors`), '--steps', '600', '--json'])));
    const alone = evals.map((e, i) => {
      expect(e.code, e.stderr).toBe(0);
      const x = JSON.parse(e.stdout) as { progress: number; fell: boolean; steps: number };
      return { walkerId: got.ranked[i].walkerId, ...x };
    });
    alone.forEach((a, i) => expect([a.progress, a.fell, a.steps]).toEqual([got.ranked[i].progress, got.ranked[i].fell, got.ranked[i].steps]));
    const order = [...alone].sort((a, b) => b.progress - a.progress || Number(a.fell) - Number(b.fell) || a.steps - b.steps);
    expect(got.ranked.map((r) => r.walkerId)).toEqual(order.map((a) => a.walkerId));
  }, SLOW);

  it('gives the same ranking from the run directory as from its export, and --top cuts it', () => {
    const fromRun = lookup(run, '--course', genome);
    const fromExport = lookup(exported, '--course', genome);
    expect(fromRun.ranked).toEqual(fromExport.ranked);
    const top = lookup(run, '--course', genome, '--top', '2');
    expect(top.ranked).toEqual(fromRun.ranked.slice(0, 2));
    expect(top.walkers).toBe(fromRun.walkers);
  }, SLOW);

  it('reproduces a course\'s recorded progress when its own walker runs on an exported course', () => {
    const got = lookup(exported, '--course', `${exported}:2`);
    const own = got.ranked.find((r) => r.courses.includes(2))!;
    const rec = JSON.parse(cairn(['eval', '--curriculum', join(exported, 'curriculum.json'), '--course', '2', '--json']).stdout) as { progress: number };
    expect(own.progress).toBe(rec.progress);
  }, SLOW);

  it.each(CHANGED)('runs the repertoire on the changed body %s, which has the same joints and sensors', (name) => {
    const plan = loadBodyPlan(join(ROOT, 'envs/bodies', `${name}.json`));
    const base = loadBodyPlan(join(ROOT, 'envs/bodies/trestle.json'));
    expect(observationNames(plan)).toEqual(observationNames(base));
    expect(actionSize(plan)).toBe(actionSize(base));
    const changed = lookup(exported, '--course', genome, '--body', join(ROOT, 'envs/bodies', `${name}.json`));
    const same = lookup(exported, '--course', genome);
    expect(changed.body).toBe(name);
    expect(changed.skipped).toEqual([]);
    expect(changed.ranked).toHaveLength(same.ranked.length);
    // The change matters: some walker's figure moves.
    const before = new Map(same.ranked.map((r) => [r.walkerId, r.progress]));
    expect(changed.ranked.some((r) => r.progress !== before.get(r.walkerId))).toBe(true);
  }, SLOW);

  it('skips walkers whose network does not fit the body, saying why', () => {
    const got = lookup(exported, '--course', genome, '--body', join(ROOT, 'envs/bodies/stilt.json'));
    expect(got.ranked).toEqual([]);
    expect(got.skipped.length).toBe(got.walkers);
    expect(got.skipped[0].reason).toBe('its network takes 32 inputs and gives 8 outputs; body plan "stilt" has 26 sensors and 6 motors');
  }, SLOW);

  it('with --confirm, confirms every walker by the run\'s rule, keeps the plain figures, and ranks confirmed walkers first', () => {
    const plain = lookup(exported, '--course', genome);
    const got = lookup(exported, '--course', genome, '--confirm');
    // runs/smoke.json: solve.threshold 0.9, solve.checks 2, push left at its default 0.3 N·s.
    expect(got.confirm).toEqual({ threshold: 0.9, checks: 2, push: 0.3, seed: 1 });
    expect(got.ranked).toHaveLength(plain.ranked.length);
    const before = new Map(plain.ranked.map((r) => [`${r.walkerId}/${r.iteration}`, r]));
    for (const r of got.ranked) {
      const p = before.get(`${r.walkerId}/${r.iteration}`)!;
      expect([r.progress, r.fell, r.steps, r.end]).toEqual([p.progress, p.fell, p.steps, p.end]);
      expect(r.checks).toHaveLength(2);
      expect(r.pushes![0]).toBe(0);
      expect(Math.abs(r.pushes![1])).toBeGreaterThan(0);
      expect(Math.abs(r.pushes![1])).toBeLessThanOrEqual(0.3);
      expect(r.confirmed).toBe(r.checks!.every((x) => x >= 0.9));
    }
    got.ranked.slice(1).forEach((b, i) => {
      const a = got.ranked[i];
      expect(Number(a.confirmed)).toBeGreaterThanOrEqual(Number(b.confirmed));
      if (a.confirmed === b.confirmed) expect(Math.min(...a.checks!)).toBeGreaterThanOrEqual(Math.min(...b.checks!));
    });
    // The pushes come from the seed: the same seed gives the same figures, another seed other pushes.
    expect(lookup(exported, '--course', genome, '--confirm').ranked).toEqual(got.ranked);
    const other = lookup(exported, '--course', genome, '--confirm', '--seed', '2');
    const pushOf = (l: Lookup) => new Map(l.ranked.map((r) => [r.walkerId, r.pushes![1]]));
    expect([...pushOf(other)].some(([id, push]) => push !== pushOf(got).get(id))).toBe(true);
  }, SLOW);

  it('refuses --confirm with exit 2 when an export does not record its run\'s solve settings', () => {
    const old = join(tmp, 'old-export');
    cpSync(exported, old, { recursive: true });
    const file = join(old, 'curriculum.json');
    const cur = JSON.parse(readFileSync(file, 'utf8')) as Record<string, unknown>;
    delete cur.training;
    writeFileSync(file, JSON.stringify(cur));
    expect(lookup(old, '--course', genome).ranked.length).toBeGreaterThan(0);
    const r = cairn(['lookup', old, '--course', genome, '--confirm', '--json']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--confirm: .*does not record its run's solve settings/);
    expect(r.stderr).not.toMatch(/^\s+at /m);
    expect(r.stdout).toBe('');
  }, SLOW);

  it.each([
    ['an unknown source', () => [join(tmp, 'nowhere'), '--course', genome], /Source .*nowhere not found/],
    ['a file that is not an export', () => [SMOKE, '--course', genome], /is not a curriculum export/],
    ['a course id not in the source', () => [exported, '--course', `${exported}:99`], /has no course 99/],
    ['a missing course file', () => [exported, '--course', join(tmp, 'none.json')], /none\.json/],
  ])('refuses %s with exit 2 and one message', (_what, args, pattern) => {
    const r = cairn(['lookup', ...(args as () => string[])(), '--json']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(pattern as RegExp);
    expect(r.stderr).not.toMatch(/^\s+at /m);
    expect(r.stdout).toBe('');
    expect(existsSync(join(tmp, 'nowhere'))).toBe(false);
  });
});
