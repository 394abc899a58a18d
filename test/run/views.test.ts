/**
 * What `status` reports about solved courses: `hardestSolved` is null (and the text says
 * "none") until a course beyond the start course is solved, since the flat start course has
 * difficulty 0 and a 0 would not tell "nothing solved" from "flat ground solved".
 */
import { rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { RunState } from '../../src/coevo/index.js';
import { Run, runStatus } from '../../src/run/index.js';
import { writeCheckpoint } from '../../src/store/index.js';
import { difficulty } from '../../src/terrain/index.js';
import { advance, cliOk, ensureBuilt, makeRun, SLOW, tempDir } from '../store/helpers.js';

let root = '';
let run: Run;
/** A real state with the start course and at least one admitted course, none solved. */
let base: RunState;

beforeAll(async () => {
  ensureBuilt();
  root = tempDir('views');
  const made = makeRun(root);
  run = Run.of(made.inputs);
  base = (await advance(made.inputs, made.state, 2)).state;
}, SLOW);
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** `base` with the given courses marked solved at its iteration. */
function solving(ids: number[]): RunState {
  return { ...base, courses: base.courses.map((c) => (ids.includes(c.id) ? { ...c, solvedAt: base.iteration, solvedBy: c.best } : c)) };
}

describe('status: the hardest solved course', () => {
  it('is null while nothing is solved, and while only the start course is', () => {
    expect(base.courses.length).toBeGreaterThan(1);
    expect(base.courses.every((c) => c.solvedAt === null)).toBe(true);
    expect(runStatus(run, base, []).status.hardestSolved).toBeNull();
    const start = base.courses.find((c) => c.parent === null)!;
    expect(runStatus(run, solving([start.id]), []).status.hardestSolved).toBeNull();
  });

  it('is the difficulty of the hardest solved course once one beyond the start is solved', () => {
    const [, a] = base.courses;
    const state = solving([0, a.id]);
    const want = difficulty(a.genome, run.inputs.family);
    expect(want).toBeGreaterThan(0);
    expect(runStatus(run, state, []).status.hardestSolved).toBe(want);
  });

  it('reads "none" in the text and null in --json, then the figure', async () => {
    writeCheckpoint(run.dir, solving([0]), run.recipeHash, 3);
    const none = await cliOk(['status', run.dir]);
    expect(none.stdout).toMatch(/^hardest solved course: none; rollouts /m);
    expect((JSON.parse((await cliOk(['status', run.dir, '--json'])).stdout) as { hardestSolved: unknown }).hardestSolved).toBeNull();
    const [, a] = base.courses;
    writeCheckpoint(run.dir, { ...solving([0, a.id]), iteration: base.iteration + 1 }, run.recipeHash, 3);
    const some = await cliOk(['status', run.dir]);
    expect(some.stdout).toContain(`hardest solved course: difficulty ${difficulty(a.genome, run.inputs.family).toFixed(3)}; rollouts `);
  });
});

describe('counts in words', () => {
  it('says "1 active pair", "1 course" and "1 walker" for a run at iteration 0', async () => {
    const fresh = makeRun(root, {}, 'fresh');
    const text = (await cliOk(['status', fresh.inputs.dir])).stdout;
    expect(text).toContain('iteration 0 of 6; 1 active pair; 0 courses admitted; 0 archived; 0 crossed; 0 solved; 0 takeovers\n');
    const exported = (await cliOk(['export', fresh.inputs.dir, '--out', join(root, 'fresh-export')])).stdout;
    expect(exported).toBe(`exported 1 course and 1 walker (iteration 0) to ${join(root, 'fresh-export')}\n`);
  });
});
