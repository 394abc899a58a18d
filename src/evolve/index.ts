export { defaultEsConfig, validateEsConfig, parseEsConfig, mirroredCount } from './config.js';
export type { EsConfig } from './config.js';
export { centredRanks } from './ranks.js';
export { NOISE_LABEL, perturbation, candidate } from './noise.js';
export { adamAscent } from './adam.js';
export type { AdamSettings, AdamResult } from './adam.js';
export { initEsState, ask, tell, estimateGradient, esStep } from './es.js';
export type { EsState, EsStepResult } from './es.js';
