/**
 * Branching (`cairn run RECIPE --from SOURCE:COURSE`): the new run starts from the source's
 * course and walker exactly, its fingerprint depends on (recipe, seed, sources) only, the
 * lineage names the source, and every mismatch or bad source is refused with exit 2 and
 * nothing written.
 */
import { cpSync, existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Run } from '../../src/run/index.js';
import { cairn, cairnAsync, cleanup, exportRun, readJson, ROOT, SMOKE, smokeRun, tempDir } from '../export/helpers.js';

const SLOW = 600_000;
let tmp = '';
let source = '';
let exported = '';

/** Course 1 of the smoke run has a gap of width 0.3199 m on the starter family. */
const GAP_COURSE = 1;

beforeAll(() => {
  source = smokeRun();
  tmp = tempDir('branch');
  exported = join(tmp, 'exp');
  exportRun(source, exported, '--only', 'all');
}, SLOW);
afterAll(cleanup);

/** Float64 bytes of a weight vector, so equality below is bitwise. */
const bytes = (v: readonly number[]): string => Buffer.from(Float64Array.from(v).buffer).toString('hex');

function branch(out: string, ...extra: string[]): ReturnType<typeof cairn> {
  return cairn(['run', SMOKE, '--out', out, '--quiet', '--workers', '0', '--iterations', '1', ...extra]);
}

describe('a branched run', () => {
  it('starts with the exact genome and weights of its source course, from a run or from its export', () => {
    const src = Run.open(source);
    const { state } = src.latest();
    const want = state.courses.find((c) => c.id === GAP_COURSE)!;
    const wantWalker = want.solvedBy ?? want.best;
    for (const from of [source, exported]) {
      const out = join(tmp, `exact-${from === source ? 'run' : 'export'}`);
      const r = branch(out, '--from', `${from}:${GAP_COURSE}`, '--from', `${from}:0`);
      expect(r.code, r.stderr).toBe(0);
      const start = Run.open(out).initialState();
      expect(start.courses.map((c) => c.genome)).toEqual([want.genome, state.courses[0].genome]);
      expect(bytes(start.courses[0].best.params)).toBe(bytes(wantWalker.params));
      expect(bytes(start.pairs[0].es.mean)).toBe(bytes(wantWalker.params));
      expect(start.courses[0].source).toEqual({ fingerprint: src.fingerprint(state), courseId: GAP_COURSE });
      expect(start.pairs.map((p) => p.courseId)).toEqual([0, 1]);
      // The family's start course is not added: the sources replace it, and neither counts as admitted.
      expect(start.courses).toHaveLength(2);
      expect((JSON.parse(cairn(['status', out, '--json']).stdout) as { admitted: number }).admitted).toBe(0);
    }
  }, SLOW);

  it('has one fingerprint for (recipe, seed, sources), whatever the worker count, and another for other sources', async () => {
    const run = (out: string, workers: string, course: number) =>
      cairnAsync(['run', SMOKE, '--out', join(tmp, out), '--quiet', '--workers', workers, '--iterations', '3', '--from', `${exported}:${course}`]);
    const [a, b, c] = await Promise.all([run('fp-a', '0', GAP_COURSE), run('fp-b', '2', GAP_COURSE), run('fp-c', '0', 2)]);
    for (const r of [a, b, c]) expect(r.code, r.stderr).toBe(0);
    const fp = (s: string) => /fingerprint ([0-9a-f]{64})/.exec(s)![1];
    expect(fp(a.stdout)).toBe(fp(b.stdout));
    expect(fp(c.stdout)).not.toBe(fp(a.stdout));
    const plain = readJson<{ run: { fingerprint: string } }>(join(exported, 'curriculum.json')).run.fingerprint;
    expect(fp(a.stdout)).not.toBe(plain);
  }, SLOW);

  it('resumes from its own directory alone and reaches the fingerprint of an uninterrupted branch', async () => {
    const whole = join(tmp, 'fp-a');
    const part = join(tmp, 'resumed');
    expect(branch(part, '--from', `${exported}:${GAP_COURSE}`).code).toBe(0);
    // The source is not needed any more: resume reads sources.json.
    const r = cairn(['resume', part, '--iterations', '3', '--quiet', '--workers', '0'], tmp);
    expect(r.code, r.stderr).toBe(0);
    const s = (d: string) => JSON.parse(cairn(['status', d, '--json']).stdout) as { fingerprint: string };
    expect(s(part).fingerprint).toBe(s(whole).fingerprint);
  }, SLOW);

  it('shows its source in status, the export and the report', () => {
    const dir = join(tmp, 'fp-a');
    const st = JSON.parse(cairn(['status', dir, '--json']).stdout) as { sources: { courseId: number; sourceCourseId: number; fingerprint: string; path: string }[] };
    const fp = readJson<{ run: { fingerprint: string } }>(join(exported, 'curriculum.json')).run.fingerprint;
    expect(st.sources).toEqual([{ courseId: 0, path: `${exported}:${GAP_COURSE}`, fingerprint: fp, sourceCourseId: GAP_COURSE, clipped: false }]);
    expect(cairn(['status', dir]).stdout).toContain(`course 0 branched from ${exported}:${GAP_COURSE}`);
    const ex = exportRun(dir, join(tmp, 'branch-export'), '--only', 'all');
    const cur = readJson<{ courses: { id: number; source?: unknown }[] }>(join(ex.dir, 'curriculum.json'));
    expect(cur.courses.find((c) => c.id === 0)!.source).toEqual({ fingerprint: fp, courseId: GAP_COURSE });
    const rep = cairn(['report', dir, '--out', join(tmp, 'rep.html'), '--workers', '0', '--quiet']);
    expect(rep.code, rep.stderr).toBe(0);
    expect(readFileSync(join(tmp, 'rep.html'), 'utf8')).toContain(`branched from course ${GAP_COURSE} of run ${fp.slice(0, 12)}`);
  }, SLOW);
});

describe('a branched run whose frozen sources were edited', () => {
  it('is refused by status and resume with exit 2, naming sources.json and the field', () => {
    const dir = join(tmp, 'edited');
    cpSync(join(tmp, 'fp-a'), dir, { recursive: true });
    const file = join(dir, 'sources.json');
    const json = readJson<{ sources: { params: unknown }[] }>(file);
    json.sources[0].params = 'none';
    writeFileSync(file, JSON.stringify(json));
    for (const args of [['status', dir], ['resume', dir, '--iterations', '4', '--quiet']]) {
      const r = cairn(args);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(/sources\.json.*sources\[0\]\.params/);
      expect(r.stderr).not.toMatch(/^\s+at /m);
    }
  });
});

describe('branching refuses what does not fit, writing nothing', () => {
  const refused = (name: string, pattern: RegExp, ...args: string[]) => {
    const out = join(tmp, `refused-${name}`);
    const r = branch(out, ...args);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(pattern);
    expect(r.stderr.trim().split('\n')[0]).toMatch(/^cairn: /);
    expect(r.stderr).not.toMatch(/^\s+at /m);
    expect(existsSync(out)).toBe(false);
  };

  it('refuses another body plan, naming it', () => {
    refused('body', /body plan "trestle" differs from the recipe's "stilt"/, '--from', `${exported}:0`, '--set', `body=${join(ROOT, 'envs/bodies/stilt.json')}`);
  });

  it('refuses another network shape, naming both', () => {
    refused('net', /network \(32 inputs, hidden \[\], 8 outputs, tanh\) differs from the recipe's \(32 inputs, hidden \[6\]/, '--from', `${exported}:0`, '--set', 'policy.hidden=[6]');
  });

  it('refuses an unknown source, a course id not in the source and a file that is not an export', () => {
    refused('missing', /Source .*nowhere not found/, '--from', `${join(tmp, 'nowhere')}:0`);
    refused('course', /has no course 99; it has 0, 1, 2/, '--from', `${exported}:99`);
    refused('notexport', /is not a curriculum export/, '--from', `${SMOKE}:0`);
    refused('spec', /expected RUN_OR_EXPORT:COURSE_ID/, '--from', exported);
  });

  describe('a genome outside the recipe family', () => {
    let narrow = '';
    let noGaps = '';
    beforeAll(() => {
      const family = readJson<{ name: string; kinds: Record<string, unknown> }>(join(ROOT, 'envs/terrain/starter.json'));
      const gap = { width: { min: 0.1, max: 0.2, mutation: 0.05 } };
      narrow = join(tmp, 'narrow.json');
      writeFileSync(narrow, JSON.stringify({ ...family, name: 'narrow', kinds: { ...family.kinds, gap } }));
      const { gap: _g, ...rest } = family.kinds;
      noGaps = join(tmp, 'no-gaps.json');
      writeFileSync(noGaps, JSON.stringify({ ...family, name: 'no-gaps', kinds: rest }));
    });

    it('is refused, naming the field, unless --clip is given', () => {
      refused('bounds', /course 1 \(family "starter"\) does not fit the recipe's family "narrow" \(pass --clip[^\n]*\n\s+- features\[0\]\.width: expected a number in \[0\.1, 0\.2\], found 0\.31/,
        '--from', `${exported}:${GAP_COURSE}`, '--set', `terrain=${narrow}`);
    });

    it('is clamped into the bounds with --clip, and the lineage says so', () => {
      const out = join(tmp, 'clipped');
      const r = branch(out, '--from', `${exported}:${GAP_COURSE}`, '--set', `terrain=${narrow}`, '--clip');
      expect(r.code, r.stderr).toBe(0);
      const start = Run.open(out).initialState();
      expect(start.courses[0].genome.features[0].width).toBe(0.2);
      expect(JSON.parse(cairn(['status', out, '--json']).stdout).sources[0].clipped).toBe(true);
    });

    it('is refused even with --clip when the family does not allow a feature kind', () => {
      refused('kind', /does not allow gap/, '--from', `${exported}:${GAP_COURSE}`, '--set', `terrain=${noGaps}`, '--clip');
    });
  });
});
