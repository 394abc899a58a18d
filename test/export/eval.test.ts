/**
 * `cairn eval --curriculum FILE --course ID`: the exported walker on the exported course under
 * the run's exported settings reproduces the exported progress exactly (the simulation is
 * deterministic), and the command refuses walker files whose bytes no longer match the SHA-256
 * (FIPS 180-4) the curriculum records, unknown course ids and edited curricula.
 */
import { cpSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cairn, cairnAsync, cleanup, exportRun, readJson, smokeRun, solvedVariant, tempDir, type SolvedVariant } from './helpers.js';

interface Ref { progress: number; walker: { file: string; sha256: string } }
interface Entry { id: number; best: Ref; solvedBy: Ref | null }
interface EvalJson { course: number; progress: number; exportedProgress: number | null; matchesExport: boolean | null }

describe('cairn eval --curriculum', () => {
  let tmp: string;
  let file: string;
  let courses: Entry[];
  let variant: SolvedVariant;
  let variantFile: string;

  beforeAll(() => {
    const run = smokeRun();
    tmp = tempDir('eval');
    exportRun(run, join(tmp, 'exp'));
    file = join(tmp, 'exp', 'curriculum.json');
    courses = readJson<{ courses: Entry[] }>(file).courses;
    variant = solvedVariant(run, join(tmp, 'solved-run'));
    exportRun(variant.dir, join(tmp, 'vexp'));
    variantFile = join(tmp, 'vexp', 'curriculum.json');
  }, 600_000);
  afterAll(cleanup);

  it('reports for every exported course exactly the exported progress, and says it matches', async () => {
    const runs = await Promise.all(courses.map((c) => cairnAsync(['eval', '--curriculum', file, '--course', String(c.id), '--json'])));
    runs.forEach((r, i) => {
      expect(r.code, r.stderr).toBe(0);
      const got = JSON.parse(r.stdout) as EvalJson;
      const want = (courses[i].solvedBy ?? courses[i].best).progress;
      expect(got.course).toBe(courses[i].id);
      expect(got.progress).toBe(want);
      expect(got.exportedProgress).toBe(want);
      expect(got.matchesExport).toBe(true);
    });
    // Distinct figures, so a mix-up between courses or walkers would show.
    expect(new Set(courses.map((c) => c.best.progress)).size).toBe(courses.length);
  });

  it('runs a solved course with the walker that solved it, not its best walker', () => {
    const entry = readJson<{ courses: Entry[] }>(variantFile).courses.find((c) => c.id === variant.mixed)!;
    expect(entry.solvedBy).not.toBeNull();
    expect(entry.solvedBy!.walker.sha256).not.toBe(entry.best.walker.sha256);
    expect(entry.solvedBy!.progress).not.toBe(entry.best.progress);
    const r = cairn(['eval', '--curriculum', variantFile, '--course', String(variant.mixed), '--json']);
    expect(r.code, r.stderr).toBe(0);
    const got = JSON.parse(r.stdout) as EvalJson;
    expect(got.progress).toBe(entry.solvedBy!.progress);
    expect(got.matchesExport).toBe(true);
  });

  it('refuses a walker file whose bytes changed: SHA-256 mismatch, exit 2', () => {
    const copy = join(tmp, 'tampered');
    cpSync(join(tmp, 'exp'), copy, { recursive: true });
    const c = courses[0];
    const path = join(copy, c.best.walker.file);
    const bytes = readFileSync(path);
    bytes[bytes.length - 1] ^= 0x01; // one bit of the last weight: still a well-formed file
    writeFileSync(path, bytes);
    const r = cairn(['eval', '--curriculum', join(copy, 'curriculum.json'), '--course', String(c.id), '--json']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/SHA-256 mismatch/);
    expect(r.stderr).toContain(c.best.walker.sha256);
    expect(r.stderr).not.toMatch(/\n\s+at /); // no stack trace
    expect(r.stdout).toBe('');
  });

  it('refuses an unknown course id with exit 2, naming the ids there are', () => {
    const missing = Math.max(...courses.map((c) => c.id)) + 17;
    const r = cairn(['eval', '--curriculum', file, '--course', String(missing), '--json']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(`no course ${missing}`);
    expect(r.stderr).toContain(courses.map((c) => c.id).join(', '));
    expect(r.stdout).toBe('');
  });

  it('refuses a curriculum edited out of its schema, naming the field, and --curriculum without --course', () => {
    const edited = readJson<any>(file);
    edited.courses[0].best.progress = 1.5;
    const path = join(tmp, 'edited.json');
    writeFileSync(path, JSON.stringify(edited));
    const r = cairn(['eval', '--curriculum', path, '--course', '0']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('/courses/0/best/progress');
    const n = cairn(['eval', '--curriculum', file]);
    expect(n.code).toBe(2);
    expect(n.stderr).toMatch(/--course/);
  });
});
