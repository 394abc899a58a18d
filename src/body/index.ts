export type { ActionMode, SegmentDef, JointDef, RayFanDef, BodyPlan } from './plan.js';
export { parseBodyPlan, loadBodyPlan, footNames, MAX_REACH } from './plan.js';
export { CourseRays } from './rays.js';
export type { Walker } from './walker.js';
export { buildWalker, trackContacts, spawnHeight } from './walker.js';
export { observationSize, observationNames, actionSize, rayDirections, sense, ANGULAR_VELOCITY_SCALE, VELOCITY_SCALE } from './sense.js';
export { applyActions } from './act.js';
