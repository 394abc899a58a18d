import type { RolloutResult } from '../sim/index.js';

/** Results of one evaluator batch. */
export type Pool = readonly RolloutResult[];
