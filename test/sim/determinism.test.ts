/**
 * A rollout is a pure function of its inputs, bit for bit: the same result (progress, fitness,
 * steps, and every number of the trace) in one process twice, in worker threads, and in a
 * child process. Results are compared as canonical JSON, which writes every double in its
 * shortest round-trip form, so equal strings mean equal bits.
 *
 * Worker threads and child processes cannot run TypeScript, so they run the compiled code in
 * dist/ (what `tsc -p .` emits) through test/fixtures/rollout-task.mjs. When dist/ is missing
 * or older than the sources it is rebuilt first.
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { beforeAll, describe, expect, it } from 'vitest';
import { actionSize, loadBodyPlan, observationSize } from '../../src/body/index.js';
import { canonicalJson, stream } from '../../src/core/index.js';
import { initParams, type PolicyShape } from '../../src/policy/index.js';
import { defaultRolloutOptions, rollout, type RolloutOptions } from '../../src/sim/index.js';
import { buildCourse, loadFamily, mutate, type TerrainGenome } from '../../src/terrain/index.js';
import { ensureBuilt } from '../build.js';

const root = fileURLToPath(new URL('../../', import.meta.url));
const fixture = new URL('../fixtures/rollout-task.mjs', import.meta.url);
const familyPath = join(root, 'envs/terrain/mixed.json');
const planPath = join(root, 'envs/bodies/trestle.json');
interface Task {
  familyPath: string;
  genome: TerrainGenome;
  planPath: string;
  shape: PolicyShape;
  params: number[];
  options: RolloutOptions;
}

/** A 300-step episode of a randomly initialised trestle policy on a mutated mixed course. */
function makeTask(seed: number): Task {
  const family = loadFamily(familyPath);
  let genome = family.start;
  for (let i = 0; i < 20; i++) genome = mutate(genome, family, stream(seed, `test/determinism/terrain/${i}`));
  const plan = loadBodyPlan(planPath);
  const shape: PolicyShape = { inputs: observationSize(plan), hidden: [16], outputs: actionSize(plan), activation: 'tanh' };
  const params = [...initParams(shape, stream(seed, 'test/determinism/policy'), { outputScale: 1 })];
  const options: RolloutOptions = { ...defaultRolloutOptions(), maxSteps: 300, stallSeconds: 100, traceEvery: 5 };
  return { familyPath, genome, planPath, shape, params, options };
}

/** The task run here, on the TypeScript sources. */
function inProcess(task: Task): string {
  const course = buildCourse(task.genome, loadFamily(task.familyPath));
  return canonicalJson(rollout(course, loadBodyPlan(task.planPath), task.shape, Float64Array.from(task.params), task.options));
}

function inWorker(task: Task): Promise<string> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(fixture, { workerData: task });
    worker.once('message', (m: string) => resolve(m));
    worker.once('error', reject);
    worker.once('exit', (code) => reject(new Error(`worker exited with ${code} before answering`)));
  });
}

function inChildProcess(task: Task): string {
  const r = spawnSync(process.execPath, [fileURLToPath(fixture)], { input: JSON.stringify(task), encoding: 'utf8', timeout: 30_000 });
  if (r.status !== 0) throw new Error(`child process failed (${r.status}): ${r.stderr}`);
  return r.stdout;
}

describe('rollout determinism', () => {
  const task = makeTask(3);
  let expected = '';

  beforeAll(() => {
    // The worker and the child process run dist/, rebuilt here when a source is newer.
    ensureBuilt();
    expected = inProcess(task);
  });

  it('runs an episode long enough to mean something', () => {
    const r = JSON.parse(expected) as { steps: number; trace: { frames: number[][] } };
    expect(r.steps).toBeGreaterThanOrEqual(100);
    expect(r.trace.frames.length).toBeGreaterThan(20);
  });

  it('gives identical results twice in one process, with another rollout in between', () => {
    const other = inProcess(makeTask(4));
    expect(other).not.toBe(expected); // a different course and policy do change the result
    expect(inProcess(task)).toBe(expected);
  });

  it('gives identical results in two worker threads running at once', async () => {
    const [a, b] = await Promise.all([inWorker(task), inWorker(task)]);
    expect(a).toBe(expected);
    expect(b).toBe(expected);
  });

  it('gives identical results in a child process', () => {
    expect(inChildProcess(task)).toBe(expected);
  });
});
