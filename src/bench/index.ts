export { benchScene, benchOptions } from './fixture.js';
export type { BenchScene } from './fixture.js';
export { benchRollouts } from './rollout-bench.js';
export type { RolloutBench } from './rollout-bench.js';
export { benchPool, benchScaling, benchBatch, timeBatch } from './pool-bench.js';
export type { PoolBench, ScalingPoint } from './pool-bench.js';
