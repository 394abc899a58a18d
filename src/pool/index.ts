export type { PolicyRef, RolloutTask, FaultTask, Task, BatchTables, Batch, MutableBatch, PoolEvent, Evaluator } from './task.js';
export { emptyBatch, sceneBatch } from './task.js';
export { InlineEvaluator } from './inline.js';
export { ThreadEvaluator } from './threads.js';
export type { ThreadOptions } from './threads.js';
export { makeEvaluator, defaultWorkerCount } from './make.js';
