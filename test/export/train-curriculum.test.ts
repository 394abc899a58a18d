/**
 * `cairn train --curriculum`: a fresh walker trained course by course through an exported
 * curriculum, and with --compare the direct path on the final course within the same rollout
 * budget. Kept small: three courses of the smoke export, taken out of admission order, with a
 * 150-step episode, two ES iterations per stage and a population of four.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { courseOf, loadCurriculum, rolloutOptionsOf, type Curriculum } from '../../src/export/index.js';
import { paramCount } from '../../src/policy/index.js';
import { rollout } from '../../src/sim/index.js';
import { loadBodyPlan } from '../../src/body/index.js';
import { loadWalker } from '../../src/store/index.js';
import { cairn, cleanup, exportRun, readJson, smokeRun, tempDir } from './helpers.js';

interface Stage { courseId: number; iterations: number; progress: number; rollouts: number; advanced: boolean }
interface PathJson { stages: Stage[]; finalProgress: number; rollouts: number }
interface Report { curriculum: PathJson; direct: PathJson | null; finalCourse: number }

const POPULATION = 4;
const STAGE_ITERATIONS = 2;

describe('cairn train --curriculum', () => {
  let tmp: string;
  let small: string;
  let order: number[];
  let cur: Curriculum;

  beforeAll(() => {
    tmp = tempDir('train');
    const exp = join(tmp, 'exp');
    exportRun(smokeRun(), exp);
    const full = readJson<any>(join(exp, 'curriculum.json'));
    // Three courses, last first, so the stages must follow the file's order, not the ids.
    full.courses = [full.courses[3], full.courses[1], full.courses[4]];
    full.episode.maxSteps = 150;
    small = join(exp, 'small.json');
    writeFileSync(small, JSON.stringify(full));
    order = full.courses.map((c: { id: number }) => c.id);
    cur = loadCurriculum(small);
  }, 600_000);
  afterAll(cleanup);

  function train(out: string, ...extra: string[]): Report {
    const args = ['train', '--curriculum', small, '--stage-iterations', String(STAGE_ITERATIONS), '--population', String(POPULATION), '--workers', '2', '--quiet', '--json', '--out', out, ...extra];
    const r = cairn(args);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toBe('');
    const report = JSON.parse(r.stdout) as Report;
    expect(readJson(join(out, 'report.json'))).toEqual(report);
    return report;
  }

  /** Progress of a saved walker on the final course under the curriculum's settings: must equal the reported figure. */
  function replay(path: string): number {
    const w = loadWalker(path);
    const plan = loadBodyPlan(join(cur.dir, cur.body.file));
    const last = cur.courses[cur.courses.length - 1];
    return rollout(courseOf(last), plan, w.shape, Float64Array.from(w.params), rolloutOptionsOf(cur)).progress;
  }

  function expectStagesCounted(p: PathJson): void {
    for (const s of p.stages) {
      expect(s.iterations).toBeGreaterThanOrEqual(1);
      // Each ES iteration runs the mean and the population's candidates; one more rollout measures the final weights.
      expect(s.rollouts).toBe(s.iterations * (POPULATION + 1) + 1);
      expect(s.advanced).toBe(s.progress >= 0.9);
      expect(s.progress).toBeGreaterThanOrEqual(0);
      expect(s.progress).toBeLessThanOrEqual(1);
    }
    expect(p.rollouts).toBe(p.stages.reduce((a, s) => a + s.rollouts, 0));
  }

  it('reports one stage per course in curriculum order, counts rollouts, and keeps the direct path within the budget', () => {
    const out = join(tmp, 'compare');
    const report = train(out, '--compare');
    expect(report.curriculum.stages.map((s) => s.courseId)).toEqual(order);
    report.curriculum.stages.forEach((s) => expect(s.iterations).toBeLessThanOrEqual(STAGE_ITERATIONS));
    expectStagesCounted(report.curriculum);
    expect(report.finalCourse).toBe(order[order.length - 1]);
    expect(report.direct).not.toBeNull();
    expect(report.direct!.stages.map((s) => s.courseId)).toEqual([report.finalCourse]);
    expectStagesCounted(report.direct!);
    expect(report.direct!.rollouts).toBeLessThanOrEqual(report.curriculum.rollouts);
    expect(replay(join(out, 'walker.json'))).toBe(report.curriculum.finalProgress);
    expect(replay(join(out, 'direct-walker.json'))).toBe(report.direct!.finalProgress);
  });

  it('trains a network of another size with --hidden 8', () => {
    const out = join(tmp, 'policy8');
    const report = train(out, '--hidden', '8');
    expect(report.direct).toBeNull();
    expect(report.curriculum.stages.map((s) => s.courseId)).toEqual(order);
    expectStagesCounted(report.curriculum);
    const w = loadWalker(join(out, 'walker.json'));
    expect(w.shape.hidden).toEqual([8]);
    expect(w.params).toHaveLength(paramCount(w.shape));
    expect(w.shape.inputs).toBe((readJson<any>(small)).policy.inputs);
    expect(replay(join(out, 'walker.json'))).toBe(report.curriculum.finalProgress);
  });
});
