export type { PhysicsSettings } from './physics.js';
export { defaultPhysics, makeWorld, stepWorld } from './physics.js';
export { addCourse } from './course-world.js';
export type { Control, RolloutOptions, RolloutResult, Trace, EndReason } from './rollout.js';
export { rollout, defaultRolloutOptions } from './rollout.js';
export { assertPolicyFits, policyMisfit } from './fit.js';
