import { runInNewContext } from 'node:vm';
import { setFlagsFromString } from 'node:v8';
import { median } from '../core/index.js';
import { rollout } from '../sim/index.js';
import { benchOptions, type BenchScene } from './fixture.js';

export interface RolloutBench {
  /** Physics alone, scripted motors: steps per second on one core. */
  readonly rawStepsPerSec: number;
  /** Same trajectory with sensors and policy computed every step. */
  readonly fullStepsPerSec: number;
  /** Median over rounds of full time / raw time, timed back to back (target ≤ 1.2). */
  readonly rolloutOverRaw: number;
  /** Policy-driven rollouts, steps per second. */
  readonly closedLoopStepsPerSec: number;
  /** World build (course, walker, sensors), ms per rollout. */
  readonly buildMs: number;
  /** buildMs over the time of a 1,500-step rollout (target < 2%). */
  readonly buildShare: number;
  /** Heap growth per 100 rollouts after garbage collection (least-squares slope after warm-up), KiB (target: about 0). */
  readonly heapGrowthPer100KiB: number;
  readonly courseSegments: number;
}

function time(fn: () => void): number {
  const t0 = performance.now();
  fn();
  return performance.now() - t0;
}

/** The collector, callable from this process (benchmarks measure memory after a collection). */
export function gcFunction(): () => void {
  setFlagsFromString('--expose-gc');
  return runInNewContext('gc') as () => void;
}

/** Single-thread rollout figures. Runs are interleaved and medians reported, since these machines are noisy. */
export function benchRollouts(scene: BenchScene, rounds: number, steps: number): RolloutBench {
  const { course, plan, shape, params } = scene;
  const raw = benchOptions('scripted', steps);
  const full = benchOptions('scripted-with-sensing', steps);
  const closed = benchOptions('policy', steps);
  for (let i = 0; i < 3; i++) [raw, full, closed].forEach((o) => rollout(course, plan, shape, params, o));
  const tr: number[] = [];
  const tf: number[] = [];
  const tc: number[] = [];
  let rawSteps = 0;
  let closedSteps = 0;
  for (let r = 0; r < rounds; r++) {
    tr.push(time(() => (rawSteps = rollout(course, plan, shape, params, raw).steps)));
    tf.push(time(() => rollout(course, plan, shape, params, full)));
    tc.push(time(() => (closedSteps = rollout(course, plan, shape, params, closed).steps)));
  }
  const one = benchOptions('policy', 1);
  const tb: number[] = [];
  for (let r = 0; r < 5 * rounds; r++) tb.push(time(() => rollout(course, plan, shape, params, one)));
  const perStep = median(tc) / closedSteps;
  const buildMs = Math.max(0, median(tb) - perStep);
  return {
    rawStepsPerSec: (rawSteps / median(tr)) * 1000,
    fullStepsPerSec: (rawSteps / median(tf)) * 1000,
    // Each round times raw and full back to back: the median of those paired ratios is steadier
    // than a ratio of medians when the machine's speed drifts.
    rolloutOverRaw: median(tf.map((t, i) => t / tr[i])),
    closedLoopStepsPerSec: (closedSteps / median(tc)) * 1000,
    buildMs,
    buildShare: buildMs / (perStep * 1500),
    heapGrowthPer100KiB: heapGrowth(scene),
    courseSegments: scene.segments,
  };
}

/**
 * Heap after GC, sampled after each of 10 blocks of 100 short rollouts; the least-squares slope
 * over blocks 3–10 (after warm-up), KiB per 100 rollouts. A single difference of two samples
 * is dominated by the collector's own noise (±200 KiB here); the slope is not.
 */
function heapGrowth(scene: BenchScene): number {
  const gc = gcFunction();
  const opts = benchOptions('policy', 100);
  const samples: number[] = [];
  for (let block = 0; block < 10; block++) {
    for (let i = 0; i < 100; i++) rollout(scene.course, scene.plan, scene.shape, scene.params, opts);
    gc();
    gc();
    samples.push(process.memoryUsage().heapUsed / 1024);
  }
  const ys = samples.slice(2);
  const mx = (ys.length - 1) / 2;
  const my = ys.reduce((a, b) => a + b, 0) / ys.length;
  let num = 0;
  let den = 0;
  ys.forEach((y, i) => {
    num += (i - mx) * (y - my);
    den += (i - mx) ** 2;
  });
  return num / den;
}
