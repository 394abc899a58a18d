import { mkdirSync, mkdtempSync, readdirSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { median } from '../core/index.js';
import { initialState, makeContext, step, type RunState } from '../coevo/index.js';
import type { Evaluator } from '../pool/index.js';
import { createRunDir, openRun, openRunDir, writeCheckpoint, type RunInputs } from '../store/index.js';
import { gcFunction } from './rollout-bench.js';

export interface CheckpointBench {
  readonly iteration: number;
  readonly checkpointBytes: number;
  readonly writeMs: number;
  readonly iterationMs: number;
  /** Write time per iteration (one write every `interval` iterations) over iteration time (target < 2%). */
  readonly share: number;
}

/** Checkpoint write cost against iteration time, on a real run's newest state. */
export async function benchCheckpoint(runDir: string, evaluator: Evaluator, iterations: number): Promise<CheckpointBench> {
  const { inputs, state } = openRun(runDir);
  const scratch = mkdtempSync(join(tmpdir(), 'cairn-bench-'));
  mkdirSync(join(scratch, 'checkpoints'));
  try {
    const writes: number[] = [];
    for (let i = 0; i < 7; i++) {
      const t0 = performance.now();
      writeCheckpoint(scratch, state, inputs.recipeHash, 1);
      writes.push(performance.now() - t0);
    }
    const ctx = makeContext(inputs.recipe, inputs.family, inputs.plan);
    let s: RunState = state;
    const t0 = performance.now();
    for (let i = 0; i < iterations; i++) s = (await step(s, ctx, evaluator)).state;
    const iterationMs = (performance.now() - t0) / iterations;
    const file = readdirSync(join(scratch, 'checkpoints'))[0];
    const bytes = statSync(join(scratch, 'checkpoints', file)).size;
    const writeMs = median(writes);
    return { iteration: state.iteration, checkpointBytes: bytes, writeMs, iterationMs, share: writeMs / inputs.recipe.checkpoint.interval / iterationMs };
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
}

export interface SoakBench {
  readonly iterations: number;
  /** Resident set size after each iteration, MiB. */
  readonly rssMiB: readonly number[];
  /** RSS growth from the end of warm-up (a quarter of the run) to the end, MiB. */
  readonly growthAfterWarmupMiB: number;
}

/** Resident memory over a long run of a recipe in this process (the pool's threads included). */
export async function benchSoak(recipePath: string, evaluator: Evaluator, iterations: number): Promise<SoakBench> {
  const scratch = mkdtempSync(join(tmpdir(), 'cairn-soak-'));
  try {
    const made: RunInputs = createRunDir(recipePath, join(scratch, 'run'), { iterations });
    const inputs = openRunDir(made.dir);
    const ctx = makeContext(inputs.recipe, inputs.family, inputs.plan);
    let s = initialState(ctx);
    const rss: number[] = [];
    const gc = gcFunction();
    for (let i = 0; i < iterations; i++) {
      s = (await step(s, ctx, evaluator)).state;
      // Collect first, so the figure is what the process holds, not garbage awaiting collection.
      gc();
      rss.push(process.memoryUsage().rss / 2 ** 20);
    }
    const warm = Math.floor(iterations / 4);
    return { iterations, rssMiB: rss, growthAfterWarmupMiB: rss[rss.length - 1] - rss[warm] };
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
}

