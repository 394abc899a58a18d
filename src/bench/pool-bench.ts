import { median } from '../core/index.js';
import { emptyBatch, makeEvaluator, threads, type Batch, type Evaluator } from '../pool/index.js';
import { benchOptions, type BenchScene } from './fixture.js';

/** A batch of `n` closed-loop rollouts of mirrored perturbations of the scene's walker. */
export function benchBatch(scene: BenchScene, n: number, steps: number): Batch {
  const b = emptyBatch();
  b.courses.push(scene.course);
  b.plans.push(scene.plan);
  b.shapes.push(scene.shape);
  b.options.push(benchOptions('policy', steps));
  b.bases.push(Array.from(scene.params));
  for (let i = 0; i < n; i++) {
    b.tasks.push({ kind: 'rollout', course: 0, plan: 0, shape: 0, options: 0, policy: { kind: 'perturbed', base: 0, seed: i >> 1, sign: i % 2 === 0 ? 1 : -1, sigma: 0.05 } });
  }
  return b;
}

/** Median wall time of `repeats` warm batches on `workers` workers (0 = calling thread), ms. */
export async function timeBatch(batch: Batch, workers: number, warmups: number, repeats: number): Promise<number> {
  const ev = makeEvaluator(threads(workers));
  try {
    for (let i = 0; i < warmups; i++) await ev.evaluate(batch);
    const times: number[] = [];
    for (let i = 0; i < repeats; i++) {
      const t0 = performance.now();
      await ev.evaluate(batch);
      times.push(performance.now() - t0);
    }
    return median(times);
  } finally {
    await ev.close();
  }
}

export interface PoolBench {
  /** Batch of 64 rollouts: time with 1 worker over time with 2 (target ≥ 1.8 on 2 cores). */
  readonly speedup2: number;
  /** Cost of shipping one task to a thread and back, ms: (1-worker − in-thread time) / tasks on 256 one-step rollouts. */
  readonly perTaskOverheadMs: number;
  readonly batchMs: { readonly inline: number; readonly workers1: number; readonly workers2: number };
}

/** Median times of the same batch on each evaluator, ms, run in turns so drifts of a shared machine hit all alike. */
export async function timeInTurns(batch: Batch, evs: readonly Evaluator[], warmups: number, rounds: number): Promise<number[]> {
  for (const ev of evs) for (let i = 0; i < warmups; i++) await ev.evaluate(batch);
  const times: number[][] = evs.map(() => []);
  for (let r = 0; r < rounds; r++) {
    for (const [k, ev] of evs.entries()) {
      const t0 = performance.now();
      await ev.evaluate(batch);
      times[k].push(performance.now() - t0);
    }
  }
  return times.map(median);
}

/** {@link timeInTurns} on fresh evaluators of the given worker counts. */
async function interleaved(batch: Batch, workerCounts: readonly number[], warmups: number, rounds: number): Promise<number[]> {
  const evs = workerCounts.map((w) => makeEvaluator(threads(w)));
  try {
    return await timeInTurns(batch, evs, warmups, rounds);
  } finally {
    await Promise.all(evs.map((e) => e.close()));
  }
}

export async function benchPool(scene: BenchScene, repeats: number, steps: number): Promise<PoolBench> {
  const batch = benchBatch(scene, 64, steps);
  const [inline, workers1, workers2] = await interleaved(batch, [0, 1, 2], 3, repeats);
  // Overhead on rollouts of a single step, where shipping dominates and JIT differences between
  // the main thread and a worker do not.
  const [t0, t1] = await interleaved(benchBatch(scene, 256, 1), [0, 1], 3, repeats);
  return { speedup2: workers1 / workers2, perTaskOverheadMs: (t1 - t0) / 256, batchMs: { inline, workers1, workers2 } };
}

export interface ScalingPoint { readonly workers: number; readonly ms: number; readonly speedup: number; readonly efficiency: number }

/**
 * Wall time of one batch of `tasks` rollouts for each worker count. Speed-up is relative to the
 * first count (normally 1 worker); efficiency is speed-up per worker, relative to that count.
 */
export async function benchScaling(scene: BenchScene, counts: readonly number[], tasks: number, steps: number, repeats: number): Promise<ScalingPoint[]> {
  const batch = benchBatch(scene, tasks, steps);
  const times: number[] = [];
  for (const w of counts) times.push(await timeBatch(batch, w, 2, repeats));
  return counts.map((w, i) => {
    const speedup = (times[0] / times[i]) * counts[0];
    return { workers: w, ms: times[i], speedup, efficiency: speedup / w };
  });
}
