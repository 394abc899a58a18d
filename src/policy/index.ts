export { ACTIVATIONS, MAX_HIDDEN_SIZE, layerSizes, paramCount, validateShape, parseShape } from './shape.js';
export type { Activation, PolicyShape } from './shape.js';
export { initParams } from './init.js';
export type { InitOptions } from './init.js';
export { makeForward } from './forward.js';
export type { Forward } from './forward.js';
export { parseParams } from './params.js';
