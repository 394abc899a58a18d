export { planEsStep, finishEsStep, esStepTaskCount } from './es-batch.js';
export type { EsSlots, PlannedEsStep, EsStepOutcome } from './es-batch.js';
export { trainWalker, freshEsState } from './train.js';
export type { TrainSettings, TrainLogLine, TrainOutcome } from './train.js';
