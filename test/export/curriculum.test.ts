/**
 * What an exported curriculum says about its courses: the geometry is exactly what the exported
 * genome and family build, the difficulty follows its documented definition, and --order and
 * --only give the order and the subset they promise.
 */
import { cpSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CourseRecord } from '../../src/coevo/index.js';
import { writeExport } from '../../src/export/index.js';
import { openRun, writeCheckpoint } from '../../src/store/index.js';
import { Run } from '../../src/run/index.js';
import { buildCourse, descriptor, loadFamily, validateGenome, type TerrainGenome } from '../../src/terrain/index.js';
import { cleanup, exportRun, readJson, ROOT, smokeRun, solvedVariant, tempDir, type SolvedVariant } from './helpers.js';

interface Entry {
  id: number; difficulty: number; descriptor: number[]; solvedAt: number | null; genome: TerrainGenome;
  geometry: { ground: number[][]; obstacles: number[][][]; friction: number; startX: number; finishX: number; spawnGroundY: number };
}
interface Cur { courses: Entry[]; order: string; only: string; family: { file: string } }

const curriculumIn = (dir: string): Cur => readJson<Cur>(join(dir, 'curriculum.json'));
const ids = (c: Cur): number[] => c.courses.map((e) => e.id);

/** Numbers equal one by one (=== so the −0 that JSON cannot write still equals 0). */
function expectSameNumbers(got: readonly number[], want: readonly number[], what: string): void {
  expect(got.length, what).toBe(want.length);
  got.forEach((v, i) => expect(v === want[i], `${what}[${i}]: ${v} vs ${want[i]}`).toBe(true));
}

/** Twice the signed area of a polygon by the shoelace formula: positive when counter-clockwise (y up). */
function signedArea2(p: number[][]): number {
  return p.reduce((s, [x, y], i) => { const [x1, y1] = p[(i + 1) % p.length]; return s + x * y1 - x1 * y; }, 0);
}

/** Every course's geometry against buildCourse(exported genome, exported family.json), plus the shape rules the schema states. */
function checkGeometry(dir: string): number {
  const cur = curriculumIn(dir);
  const family = loadFamily(join(dir, cur.family.file));
  let obstacles = 0;
  for (const e of cur.courses) {
    const built = buildCourse(e.genome, family);
    const g = e.geometry;
    expect(g.ground.every((p) => p.length === 2)).toBe(true);
    expectSameNumbers(g.ground.flat(), built.ground, `course ${e.id} ground`);
    expect(g.obstacles).toHaveLength(built.obstacles.length);
    g.obstacles.forEach((o, k) => expectSameNumbers(o.flat(), built.obstacles[k], `course ${e.id} obstacle ${k}`));
    expectSameNumbers([g.friction, g.startX, g.finishX, g.spawnGroundY], [built.friction, built.startX, built.finishX, built.spawnGroundY], `course ${e.id} scalars`);
    // "x never decreases" along the ground; obstacles "convex polygons, counter-clockwise" (schema descriptions).
    g.ground.slice(1).forEach(([x], i) => expect(x).toBeGreaterThanOrEqual(g.ground[i][0]));
    for (const o of g.obstacles) {
      expect(signedArea2(o)).toBeGreaterThan(0);
      o.forEach(([x0, y0], i) => {
        const [x1, y1] = o[(i + 1) % o.length];
        const [x2, y2] = o[(i + 2) % o.length];
        expect((x1 - x0) * (y2 - y1) - (y1 - y0) * (x2 - x1)).toBeGreaterThanOrEqual(0); // every turn left: convex
      });
      obstacles++;
    }
  }
  return obstacles;
}

describe('an export of the smoke run', () => {
  let run: string;
  let tmp: string;
  let byAdmission: Cur;
  let byDifficulty: Cur;
  let variant: SolvedVariant;

  beforeAll(() => {
    run = smokeRun();
    tmp = tempDir('curriculum');
    exportRun(run, join(tmp, 'admission'));
    exportRun(run, join(tmp, 'difficulty'), '--order', 'difficulty');
    byAdmission = curriculumIn(join(tmp, 'admission'));
    byDifficulty = curriculumIn(join(tmp, 'difficulty'));
    variant = solvedVariant(run, join(tmp, 'solved-run'));
  }, 600_000);
  afterAll(cleanup);

  it('has geometry equal to buildCourse of each exported genome and the exported family', () => {
    expect(byAdmission.courses.length).toBeGreaterThan(1);
    expect(byAdmission.courses.some((e) => e.genome.features.length > 0)).toBe(true);
    checkGeometry(join(tmp, 'admission'));
  });

  it('gives each course the documented difficulty: the mean of descriptor components over their family bounds', () => {
    const f = readJson<any>(join(tmp, 'admission', 'family.json')); // the family as exported
    const bounds = [
      f.kinds.gap?.width.max ?? 0, Math.max(0, f.kinds.step?.height.max ?? 0), Math.max(0, -(f.kinds.step?.height.min ?? 0)),
      f.kinds.block?.height.max ?? 0, Math.max(0, f.kinds.slope?.grade.max ?? 0), Math.max(0, -(f.kinds.slope?.grade.min ?? 0)),
      f.roughness.max, f.maxFeatures,
    ];
    for (const e of byAdmission.courses) {
      expect(e.descriptor).toEqual(descriptor(e.genome));
      const mean = e.descriptor.reduce((s, v, i) => s + (bounds[i] > 0 ? v / bounds[i] : 0), 0) / bounds.length;
      expect(e.difficulty).toBeCloseTo(mean, 12);
    }
    expect(byAdmission.courses.find((e) => e.genome.features.length === 0 && e.genome.roughness.amplitude === 0)?.difficulty).toBe(0);
  });

  it('--order admission lists courses as the run admitted them', () => {
    const { state } = openRun(run);
    expect(byAdmission.order).toBe('admission');
    expect(ids(byAdmission)).toEqual(state.courses.map((c) => c.id));
  });

  it('--order difficulty lists the same courses by non-decreasing difficulty, ties by id', () => {
    // The smoke run happens to admit its courses in order of difficulty; a copy whose first
    // and last admitted courses trade genomes is not, so the check below can fail.
    const dir = join(tmp, 'unsorted-run');
    cpSync(run, dir, { recursive: true });
    const { inputs, state } = openRun(dir);
    const [a, z] = [state.courses[1], state.courses[state.courses.length - 1]];
    const swap = (c: CourseRecord): CourseRecord => (c.id === a.id ? { ...c, genome: z.genome, descriptor: z.descriptor } : c.id === z.id ? { ...c, genome: a.genome, descriptor: a.descriptor } : c);
    writeCheckpoint(inputs.dir, { ...state, courses: state.courses.map(swap) }, inputs.recipeHash, inputs.recipe.checkpoint.keep);
    exportRun(dir, join(tmp, 'u-admission'));
    exportRun(dir, join(tmp, 'u-difficulty'), '--order', 'difficulty');
    const admission = curriculumIn(join(tmp, 'u-admission'));
    const sorted = curriculumIn(join(tmp, 'u-difficulty'));
    const d = admission.courses.map((e) => e.difficulty);
    expect(d.some((v, i) => i > 0 && v < d[i - 1]), 'admission order is already sorted: the check could not fail').toBe(true);
    for (const cur of [byDifficulty, sorted]) {
      expect(cur.order).toBe('difficulty');
      expect([...ids(cur)].sort((x, y) => x - y)).toEqual(state.courses.map((c) => c.id));
      cur.courses.slice(1).forEach((e, i) => {
        const prev = cur.courses[i];
        expect(e.difficulty > prev.difficulty || (e.difficulty === prev.difficulty && e.id > prev.id)).toBe(true);
      });
    }
    expect(ids(sorted)).not.toEqual(ids(admission));
  });

  it('--only solved keeps exactly the courses with solvedAt set, in either order', () => {
    exportRun(variant.dir, join(tmp, 'v-solved'), '--only', 'solved');
    exportRun(variant.dir, join(tmp, 'v-solved-d'), '--only', 'solved', '--order', 'difficulty');
    const solved = curriculumIn(join(tmp, 'v-solved'));
    expect(openRun(variant.dir).state.courses.length).toBeGreaterThan(variant.solved.length);
    expect(solved.only).toBe('solved');
    expect(ids(solved)).toEqual(variant.solved);
    expect(solved.courses.every((e) => e.solvedAt !== null)).toBe(true);
    const sd = curriculumIn(join(tmp, 'v-solved-d'));
    expect([...ids(sd)].sort((a, b) => a - b)).toEqual(variant.solved);
    sd.courses.slice(1).forEach((e, i) => expect(e.difficulty).toBeGreaterThanOrEqual(sd.courses[i].difficulty));
    // The smoke run itself solves nothing: its solved-only export is empty, not an error.
    expect(exportRun(run, join(tmp, 'none'), '--only', 'solved').courses).toBe(0);
  });

  it('gives every course its crossedAt and rollouts from the state, and lineageRollouts summed up its parent chain', () => {
    const { state } = openRun(run);
    const byId = new Map(state.courses.map((c) => [c.id, c]));
    // Walked here by hand, parent by parent, rather than with cairn's own helper.
    const chainSum = (id: number): number => {
      let sum = 0;
      for (let c = byId.get(id); c; c = c.parent === null ? undefined : byId.get(c.parent)) sum += c.rollouts;
      return sum;
    };
    const entries = byAdmission.courses as unknown as (Entry & { crossedAt: number | null; rollouts: number; lineageRollouts: number; parent: number | null })[];
    expect(entries.some((e) => e.parent !== null && byId.get(e.parent)!.rollouts > 0), 'no course has a parent with rollouts: the sum could not be told from the course alone').toBe(true);
    for (const e of entries) {
      const rec = byId.get(e.id)!;
      expect([e.crossedAt, e.rollouts]).toEqual([rec.crossedAt, rec.rollouts]);
      expect(e.lineageRollouts).toBe(chainSum(e.id));
    }
    expect(entries.reduce((s, e) => s + e.rollouts, 0)).toBeGreaterThan(0);
  });

  it('--only crossed keeps the courses crossed or solved, in either order', () => {
    // The variant has courses 1 and 3 solved (crossedAt unset on them); mark course 2 crossed only.
    const dir = join(tmp, 'crossed-run');
    cpSync(variant.dir, dir, { recursive: true });
    const { inputs, state } = openRun(dir);
    const courses = state.courses.map((c): CourseRecord => (c.id === 2 ? { ...c, crossedAt: state.iteration } : c));
    writeCheckpoint(inputs.dir, { ...state, courses }, inputs.recipeHash, inputs.recipe.checkpoint.keep);
    const want = courses.filter((c) => c.crossedAt !== null || c.solvedAt !== null).map((c) => c.id);
    expect(want).toEqual([1, 2, 3]);
    expect(courses.length).toBeGreaterThan(want.length);
    exportRun(dir, join(tmp, 'v-crossed'), '--only', 'crossed');
    exportRun(dir, join(tmp, 'v-crossed-d'), '--only', 'crossed', '--order', 'difficulty');
    const crossed = curriculumIn(join(tmp, 'v-crossed'));
    expect(crossed.only).toBe('crossed');
    expect(ids(crossed)).toEqual(want);
    expect((crossed.courses as unknown as { crossedAt: number | null }[]).map((e) => e.crossedAt)).toEqual([null, state.iteration, null]);
    expect([...ids(curriculumIn(join(tmp, 'v-crossed-d')))].sort((a, b) => a - b)).toEqual(want);
    expect(exportRun(run, join(tmp, 'none-crossed'), '--only', 'crossed').courses).toBe(0);
  });
});

describe('geometry of blocks, slopes and rough ground (mixed family)', () => {
  let run: string;
  beforeAll(() => { run = smokeRun(); }, 600_000);
  afterAll(cleanup);

  it('exports obstacles as counter-clockwise convex polygons equal to buildCourse', () => {
    const { inputs, state } = openRun(run);
    const family = loadFamily(join(ROOT, 'envs/terrain/mixed.json'));
    const genomes: TerrainGenome[] = [
      { roughness: { amplitude: 0.05, seed: 7 }, features: [{ kind: 'block', x: 6, width: 1, height: 0.3 }, { kind: 'slope', x: 10, length: 3, grade: 0.2 }, { kind: 'block', x: 16, width: 0.5, height: 0.1 }] },
      { roughness: { amplitude: 0, seed: 0 }, features: [{ kind: 'gap', x: 6, width: 0.6 }, { kind: 'step', x: 10, height: -0.3 }, { kind: 'slope', x: 14, length: 2, grade: -0.4 }, { kind: 'block', x: 19, width: 1.2, height: 0.45 }] },
    ];
    for (const g of genomes) expect(validateGenome(g, family)).toEqual([]);
    const courses = state.courses.slice(0, genomes.length).map((c, i): CourseRecord => ({ ...c, genome: genomes[i], descriptor: descriptor(genomes[i]) }));
    const out = join(tempDir('mixed'), 'exp');
    writeExport(Run.of({ ...inputs, family }).ctx, { ...state, courses, pairs: [] }, out, 'admission', 'all');
    expect(checkGeometry(out)).toBe(3);
  });
});
