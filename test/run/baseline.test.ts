/**
 * `cairn baseline`: fresh walkers trained directly on a run's hardest crossed courses. The smoke
 * recipe crosses nothing in its budget, so the run here lowers the solve threshold to 0.1 (and
 * the reproduction bar) and stops at 12 iterations: three courses are crossed. The figures must
 * agree with trainWalker run on its own, a stopped baseline must continue to the same output,
 * another source or budget and bad input must be refused with exit 2 and nothing written; more or
 * fewer courses and seeds over the same results reuse them.
 */
import { cpSync, existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { freshEsState, trainWalker, type CourseRecord } from '../../src/coevo/index.js';
import { stream } from '../../src/core/index.js';
import { InlineEvaluator, sceneBatch, threads } from '../../src/pool/index.js';
import { openSource, pickCourses, Run, runBaseline, BASELINE_RESULTS, type BaselineReport } from '../../src/run/index.js';
import { buildCourse, difficulty } from '../../src/terrain/index.js';
import { openRun, writeCheckpoint } from '../../src/store/index.js';
import { cairn, cleanup, exportRun, readJson, SMOKE, tempDir } from '../export/helpers.js';

const SLOW = 600_000;
const POP = 16; // runs/smoke.json's es.population
const CHECKS = 2; // runs/smoke.json's solve.checks
let tmp = '';
let run = '';
let first: BaselineReport;
const common = ['--top', '2', '--seeds', '1-2', '--rollouts', '40', '--workers', '2', '--quiet'];

beforeAll(() => {
  tmp = tempDir('baseline');
  run = join(tmp, 'run');
  const r = cairn(['run', SMOKE, '--out', run, '--set', 'solve.threshold=0.1', '--set', 'admission.reproduceAbove=0.05', '--iterations', '12', '--quiet', '--workers', '2']);
  expect(r.code, r.stderr).toBe(0);
  const b = cairn(['baseline', run, ...common, '--out', join(tmp, 'a'), '--json']);
  expect(b.code, b.stderr).toBe(0);
  first = JSON.parse(b.stdout) as BaselineReport;
}, SLOW);
afterAll(cleanup);

describe('cairn baseline', () => {
  it('picks the hardest crossed courses and states their budget, seeds and verdicts', () => {
    const { state, inputs } = openRun(run);
    const crossed = state.courses.filter((c) => c.crossedAt !== null || c.solvedAt !== null);
    expect(crossed.length).toBeGreaterThan(2);
    const want = [...crossed].sort((a, b) => difficulty(b.genome, inputs.family) - difficulty(a.genome, inputs.family) || a.id - b.id).slice(0, 2);
    expect(first.format).toBe('cairn-baseline');
    expect(first.source).toEqual({ path: run, kind: 'run', fingerprint: Run.open(run).fingerprint(state), iteration: 12 });
    expect(first.settings).toEqual({ top: 2, seeds: [1, 2], budget: 40 });
    expect(first.rows.map((r) => r.course)).toEqual(want.map((c) => c.id));
    for (const [i, row] of first.rows.entries()) {
      const rec = want[i];
      expect(row.coevolved).toEqual({ progress: rec.best.progress, crossedAt: rec.crossedAt, solvedAt: rec.solvedAt, confirmed: rec.solvedAt !== null });
      expect(row.budget).toBe(40);
      // Whole ES iterations within the budget: 2 × (16 candidates + the mean) + the final evaluation + 2 confirmation checks = 37.
      for (const s of row.direct.seeds) expect([s.iterations, s.rollouts]).toEqual([2, 2 * (POP + 1) + 1 + CHECKS]);
      const p = row.direct.seeds.map((s) => s.progress);
      expect([row.direct.min, row.direct.max, row.direct.median]).toEqual([Math.min(...p), Math.max(...p), (p[0] + p[1]) / 2]);
      expect(row.direct.confirmed).toBe(row.direct.seeds.filter((s) => s.confirmed).length);
      // The verdict as README defines it.
      const co = row.coevolved;
      const directAhead = row.direct.median >= co.progress || (!co.confirmed && row.direct.confirmed > 1);
      const coAhead = co.progress > row.direct.max || (co.confirmed && row.direct.confirmed === 0);
      expect(row.verdict).toBe(directAhead ? 'direct ahead' : coAhead ? 'co-evolved ahead' : 'even');
    }
    const csv = readFileSync(join(tmp, 'a', 'baseline.csv'), 'utf8').split('\r\n');
    expect(csv[0]).toBe('course,difficulty,coevolved_progress,confirmed,crossed_at,solved_at,budget_rollouts,direct_median,direct_min,direct_max,direct_confirmed,seeds,verdict');
    expect(csv.slice(1, 3).map((l) => l.split(',')).map((f) => [Number(f[0]), Number(f[7]), f[12]])).toEqual(first.rows.map((r) => [r.course, r.direct.median, r.verdict]));
    expect(readJson(join(tmp, 'a', 'baseline.json'))).toEqual(first);
  });

  it('agrees with trainWalker run on its own, and with the strict pushed rollouts of the confirmation done by hand', async () => {
    const r = Run.open(run);
    const { state } = r.latest();
    const row = first.rows[0];
    const rec = state.courses.find((c) => c.id === row.course)!;
    const course = buildCourse(rec.genome, r.inputs.family);
    const settings = { iterations: 2, es: r.inputs.recipe.es, rollout: r.ctx.rollout, seed: 1, candidatePush: r.inputs.recipe.episode.trainingPush };
    const ev = new InlineEvaluator();
    const out = await trainWalker(course, r.inputs.plan, r.ctx.shape, freshEsState(r.ctx.shape, 1), settings, ev);
    const seed1 = row.direct.seeds[0];
    expect([seed1.progress, seed1.finalProgress, seed1.iterations]).toEqual([Math.max(...out.log.map((l) => l.progress), out.finalProgress), out.finalProgress, out.log.length]);
    // Confirmation by the README's rule: recipe solve.checks rollouts under twice the solver iterations, the first unpushed, the others pushed by a draw in [−push, push]; all must reach the threshold.
    const { checks, push, threshold } = r.inputs.recipe.solve;
    const s = stream(1, `baseline/course/${row.course}/confirm`);
    const physics = { ...r.ctx.rollout.physics, velocityIterations: 2 * r.ctx.rollout.physics.velocityIterations, positionIterations: 2 * r.ctx.rollout.physics.positionIterations };
    const progress: number[] = [];
    for (let i = 0; i < checks; i++) {
      const p = i === 0 ? 0 : s.uniform(-push, push);
      const [x] = await ev.evaluate(sceneBatch(course, r.inputs.plan, r.ctx.shape, { ...r.ctx.rollout, physics, ...(p === 0 ? {} : { push: p }) }, out.best.params));
      progress.push(x.progress);
    }
    expect(seed1.confirmed).toBe(progress.every((x) => x >= threshold));
    await ev.close();
  }, SLOW);

  it('prints a table naming the winner of each course', () => {
    const t = cairn(['baseline', run, ...common, '--out', join(tmp, 'a')]);
    expect(t.code, t.stderr).toBe(0);
    expect(t.stdout).toContain('budget per course and seed: 40 rollouts');
    for (const row of first.rows) expect(t.stdout).toMatch(new RegExp(`^${row.course}\\s.*${row.verdict}$`, 'm'));
  });

  it('stopped after one course and seed, continues from there to the same output', async () => {
    const out = join(tmp, 'b');
    const stopped = await runBaseline(run, { top: 2, seeds: [1, 2], rollouts: 40, out }, threads(2), { stopRequested: () => existsSync(join(out, BASELINE_RESULTS)) });
    expect([stopped.report, stopped.trained]).toEqual([null, 1]);
    expect(existsSync(join(out, 'baseline.json'))).toBe(false);
    const again = cairn(['baseline', run, ...common.filter((a) => a !== '--quiet'), '--out', out, '--json']);
    expect(again.code, again.stderr).toBe(0);
    expect(again.stderr).toContain(`course ${first.rows[0].course}, seed 1: finished earlier, skipped`);
    expect(JSON.parse(again.stdout)).toEqual(first);
    expect(readFileSync(join(out, 'baseline.csv'), 'utf8')).toBe(readFileSync(join(tmp, 'a', 'baseline.csv'), 'utf8'));
  }, SLOW);

  it('refuses to continue results made with another budget (exit 2), leaving them as they were', () => {
    const results = readFileSync(join(tmp, 'a', BASELINE_RESULTS), 'utf8');
    for (const change of [['--rollouts', '60']]) {
      const args = [...common];
      args[args.indexOf(change[0]) + 1] = change[1];
      const r = cairn(['baseline', run, ...args, '--out', join(tmp, 'a')]);
      expect(r.code, change.join(' ')).toBe(2);
      expect(r.stderr).toContain('holds results for another source or budget');
      expect(r.stderr).not.toMatch(/\n\s+at /);
    }
    expect(readFileSync(join(tmp, 'a', BASELINE_RESULTS), 'utf8')).toBe(results);
  });

  it('reuses finished courses and seeds when --top or --seeds grow, and keeps them when they shrink', () => {
    const out = join(tmp, 'grow');
    const small = cairn(['baseline', run, '--top', '1', '--seeds', '1', '--rollouts', '40', '--workers', '2', '--out', out, '--json']);
    expect(small.code, small.stderr).toBe(0);
    const row = (JSON.parse(small.stdout) as BaselineReport).rows[0];
    expect(row.course).toBe(first.rows[0].course);
    expect(row.direct.seeds).toEqual([first.rows[0].direct.seeds[0]]);
    // Grown to the common settings: only the missing (course, seed) pairs are trained, and the
    // report is the one an uninterrupted run with those settings gives.
    const grown = cairn(['baseline', run, ...common.filter((a) => a !== '--quiet'), '--out', out, '--json']);
    expect(grown.code, grown.stderr).toBe(0);
    expect(grown.stderr).toContain(`course ${first.rows[0].course}, seed 1: finished earlier, skipped`);
    expect(grown.stderr).not.toContain(`course ${first.rows[0].course}, seed 2: finished earlier`);
    expect(JSON.parse(grown.stdout)).toEqual(first);
    // Shrunk again: nothing is trained, the report shows what was asked, and the file keeps all four.
    const shrunk = cairn(['baseline', run, '--top', '1', '--seeds', '2', '--rollouts', '40', '--workers', '2', '--out', out, '--json']);
    expect(shrunk.code, shrunk.stderr).toBe(0);
    const again = JSON.parse(shrunk.stdout) as BaselineReport;
    expect(again.rows.map((r) => [r.course, r.direct.seeds])).toEqual([[first.rows[0].course, [first.rows[0].direct.seeds[1]]]]);
    const file = readJson(join(out, BASELINE_RESULTS)) as { done: unknown[] };
    expect(file.done).toHaveLength(4);
  }, SLOW);

  it('reads the same courses and lineage budgets from an export as from the run', () => {
    const exp = join(tmp, 'exp');
    exportRun(run, exp, '--only', 'crossed');
    const { state } = openRun(run);
    const byId = new Map(state.courses.map((c) => [c.id, c]));
    const chain = (c: CourseRecord | undefined): number => (c ? c.rollouts + chain(c.parent === null ? undefined : byId.get(c.parent)) : 0);
    const fromRun = pickCourses(openSource(run), 3, 'lineage');
    const fromExport = pickCourses(openSource(exp), 3, 'lineage');
    expect(fromExport.map((p) => [p.course.id, p.budget])).toEqual(fromRun.map((p) => [p.course.id, p.budget]));
    expect(fromRun.map((p) => p.budget)).toEqual(fromRun.map((p) => chain(byId.get(p.course.id))));
    expect(fromRun.every((p) => p.iterations === Math.floor((p.budget - 1 - CHECKS) / (POP + 1)))).toBe(true);
  });

  it('gives the same figures on an export of the run', () => {
    const exp = join(tmp, 'exp2');
    exportRun(run, exp, '--only', 'crossed');
    const r = cairn(['baseline', exp, '--top', '1', '--seeds', '1', '--rollouts', '40', '--workers', '2', '--quiet', '--json']);
    expect(r.code, r.stderr).toBe(0);
    const rep = JSON.parse(r.stdout) as BaselineReport;
    expect(rep.source.kind).toBe('export');
    expect(rep.rows[0].course).toBe(first.rows[0].course);
    expect(rep.rows[0].direct.seeds[0]).toEqual(first.rows[0].direct.seeds[0]);
    expect(existsSync(join(exp, 'baseline.json'))).toBe(true);
  }, SLOW);

  it('refuses bad input with one message, exit 2, and writes nothing', () => {
    const uncrossed = join(tmp, 'uncrossed');
    cpSync(run, uncrossed, { recursive: true });
    const { inputs, state } = openRun(uncrossed);
    writeCheckpoint(inputs.dir, { ...state, courses: state.courses.map((c) => ({ ...c, crossedAt: null, solvedAt: null })) }, inputs.recipeHash, inputs.recipe.checkpoint.keep);
    const out = join(tmp, 'never');
    const cases: [string[], RegExp][] = [
      [[join(tmp, 'missing')], /not found/],
      [[uncrossed], /no crossed or solved course/],
      [[run, '--top', '0'], /--top/],
      [[run, '--seeds', '3-1'], /--seeds/],
      [[run, '--rollouts', 'many'], /--rollouts/],
      [[run, '--rollouts', '10'], /do not fit one ES iteration; at least 20/],
      [[run, '--bogus'], /unknown option/],
    ];
    for (const [args, message] of cases) {
      const r = cairn(['baseline', ...args, '--out', out, '--quiet', '--workers', '0']);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stderr).not.toMatch(/\n\s+at /);
      expect(existsSync(out), args.join(' ')).toBe(false);
    }
    expect(existsSync(join(uncrossed, BASELINE_RESULTS))).toBe(false);
  });
});
