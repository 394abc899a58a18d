export type { Feature, FeatureKind, Roughness, TerrainGenome, FieldRange, MutationSettings, TerrainFamily, Polygon, Course } from './types.js';
export { KINDS, KIND_NAMES } from './kinds/index.js';
export { parseFamily, loadFamily } from './family.js';
export { validateGenome } from './validate.js';
export { parseGenome, loadGenome } from './genome.js';
export { buildCourse, groundHeightAt } from './build.js';
export { mutate } from './mutate.js';
export { descriptor, descriptorBounds, normalisedDescriptor, DESCRIPTOR_NAMES, DESCRIPTOR_LENGTH } from './descriptor.js';
