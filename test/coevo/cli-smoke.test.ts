/**
 * End to end: `cairn run runs/smoke.json` in a child process, the run directory it leaves,
 * `cairn status --json` on it, and the refusals of `cairn run` (exit 2, nothing written).
 * The command line runs the compiled dist/, rebuilt first when stale. The smoke run is the
 * slowest part (tens of seconds on a busy machine); nothing here depends on timing.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadBodyPlan } from '../../src/body/index.js';
import { loadRecipe, parseRecipe, type IterationMetrics, type Recipe, type RunEvent } from '../../src/coevo/index.js';
import { loadFamily } from '../../src/terrain/index.js';
import { CLI, ensureBuilt, ROOT } from './helpers.js';

const SMOKE = join(ROOT, 'runs/smoke.json');
const OUTCOMES = ['admitted', 'too-easy', 'too-hard', 'not-novel', 'duplicate'];

function cairn(...args: string[]) {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd: ROOT, encoding: 'utf8', timeout: 600_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

function jsonLines<T>(path: string): T[] {
  return readFileSync(path, 'utf8').split('\n').filter((l) => l !== '').map((l) => JSON.parse(l) as T);
}

describe('cairn run on runs/smoke.json', () => {
  const tmp = mkdtempSync(join(tmpdir(), 'cairn-smoke-'));
  const dir = join(tmp, 'smoke');
  const recipe: Recipe = loadRecipe(SMOKE);
  let run: ReturnType<typeof cairn>;

  beforeAll(() => {
    ensureBuilt();
    run = cairn('run', SMOKE, '--out', dir, '--quiet', '--workers', '2');
  }, 700_000);
  afterAll(() => rmSync(tmp, { recursive: true, force: true }));

  it('exits 0 and prints the fingerprint on stdout', () => {
    expect(run.code).toBe(0);
    expect(run.stderr).not.toMatch(/iteration \d+\/|error/i); // --quiet: no progress lines
    expect(run.stdout).toMatch(/^fingerprint [0-9a-f]{64}$/m);
  });

  it('freezes the recipe with every default filled in, and copies the family and body plan', () => {
    expect(readdirSync(dir).sort()).toEqual(['body.json', 'checkpoints', 'events.jsonl', 'family.json', 'faults.jsonl', 'metrics.jsonl', 'recipe.json', 'sessions.jsonl']);
    const frozen = JSON.parse(readFileSync(join(dir, 'recipe.json'), 'utf8')) as Recipe;
    // Written out in full: sections smoke.json leaves out (novelty, episode.timeStep, ...) are there.
    expect(frozen).toEqual({ ...recipe, terrain: 'family.json', body: 'body.json' });
    expect(parseRecipe(frozen, 'recipe.json')).toEqual(frozen);
    expect(JSON.parse(readFileSync(join(dir, 'family.json'), 'utf8'))).toEqual(loadFamily(recipe.terrain));
    expect(JSON.parse(readFileSync(join(dir, 'body.json'), 'utf8'))).toEqual(loadBodyPlan(recipe.body));
  });

  it('keeps the newest few checkpoints, the last at the final iteration', () => {
    const names = readdirSync(join(dir, 'checkpoints')).sort();
    expect(names.length).toBeGreaterThan(0);
    expect(names.length).toBeLessThanOrEqual(recipe.checkpoint.keep);
    for (const n of names) expect(n).toMatch(/^ckpt-\d{9}\.json$/);
    expect(names.at(-1)).toBe(`ckpt-${String(recipe.budget.iterations).padStart(9, '0')}.json`);
  });

  it('logs one metrics line per iteration', () => {
    const m = jsonLines<IterationMetrics>(join(dir, 'metrics.jsonl'));
    expect(m.map((l) => l.iteration)).toEqual(Array.from({ length: recipe.budget.iterations }, (_, i) => i + 1));
    for (const l of m) expect(l.activePairs).toBeLessThanOrEqual(recipe.population.maxActive);
  });

  it('logs candidate records at admission iterations', () => {
    const events = jsonLines<RunEvent>(join(dir, 'events.jsonl'));
    const cands = events.filter((e): e is Extract<RunEvent, { type: 'candidate' }> => e.type === 'candidate');
    expect(cands.length).toBeGreaterThan(0);
    for (const c of cands) {
      expect(c.iteration % recipe.admission.interval).toBe(0);
      expect(OUTCOMES).toContain(c.outcome);
      expect(c.descriptor).toHaveLength(8);
      expect(typeof c.bestProgress).toBe('number');
      expect(c.courseId === null).toBe(c.outcome !== 'admitted');
    }
    const m = jsonLines<IterationMetrics>(join(dir, 'metrics.jsonl'));
    expect(m.at(-1)!.admitted).toBe(cands.filter((c) => c.outcome === 'admitted').length);
  });

  it('reaches a transfer round with at least two pairs', () => {
    // At a transfer iteration i with P pairs (P_b before admission), the ES phase runs
    // 17·P_b rollouts (the mean and es.population 16 candidates each); admission and solve checks add at most (8 + 2)·P_b ≤ 10·P;
    // a transfer round adds P² zero-shot and 18·P fine-tuning rollouts (fineTuneTop 1). So a
    // count of at least 17·P_b + P² + 18·P proves that the round ran.
    const m = jsonLines<IterationMetrics>(join(dir, 'metrics.jsonl'));
    const perPair = 1 + recipe.es.population;
    const ran = m.filter((l, k) => {
      if (k === 0 || l.iteration % recipe.transfer.interval !== 0 || l.activePairs < 2) return false;
      const [pb, p] = [m[k - 1].activePairs, l.activePairs];
      return l.rollouts - m[k - 1].rollouts >= perPair * pb + p * p + (perPair + 1) * p;
    });
    expect(ran.length).toBeGreaterThan(0);
  });

  it('is summarised by cairn status --json', () => {
    const s = cairn('status', dir, '--json');
    expect(s.code).toBe(0);
    const status = JSON.parse(s.stdout) as Record<string, unknown>;
    const last = jsonLines<IterationMetrics>(join(dir, 'metrics.jsonl')).at(-1)!;
    expect(status).toMatchObject({
      iteration: recipe.budget.iterations, activePairs: last.activePairs, admitted: last.admitted,
      archived: last.archived, solved: last.solved,
    });
    expect(status.fingerprint).toBe(/^fingerprint ([0-9a-f]{64})$/m.exec(run.stdout)![1]);
  });

  it('refuses to start over an existing run directory (exit 2, mentions resume), leaving it alone', () => {
    const before = readFileSync(join(dir, 'metrics.jsonl'), 'utf8');
    const r = cairn('run', SMOKE, '--out', dir, '--quiet', '--workers', '0');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/resume/);
    expect(r.stderr).not.toMatch(/^\s+at /m);
    expect(readFileSync(join(dir, 'metrics.jsonl'), 'utf8')).toBe(before);
  });
});

describe('cairn run refusals', () => {
  const tmp = mkdtempSync(join(tmpdir(), 'cairn-refuse-'));
  beforeAll(() => ensureBuilt(), 400_000);
  afterAll(() => rmSync(tmp, { recursive: true, force: true }));

  it('refuses a bad recipe with exit 2, naming the fields, and writes nothing', () => {
    const path = join(tmp, 'bad.json');
    writeFileSync(path, JSON.stringify({ name: 'bad', es: { population: 0 }, novelty: { kk: 3 } }));
    const out = join(tmp, 'bad-run');
    const r = cairn('run', path, '--out', out, '--quiet', '--workers', '0');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/es\.population/);
    expect(r.stderr).toMatch(/novelty.*"kk"/);
    expect(r.stderr).not.toMatch(/^\s+at /m);
    expect(r.stdout).toBe('');
    expect(existsSync(out)).toBe(false);
  });

  it('refuses a recipe whose terrain family is missing, and writes nothing', () => {
    const path = join(tmp, 'lost.json');
    writeFileSync(path, JSON.stringify({ terrain: 'nowhere/family.json', body: join(ROOT, 'envs/bodies/trestle.json') }));
    const out = join(tmp, 'lost-run');
    const r = cairn('run', path, '--out', out, '--quiet', '--workers', '0');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/nowhere/);
    expect(existsSync(out)).toBe(false);
  });
});
