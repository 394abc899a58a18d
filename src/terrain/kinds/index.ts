import type { FeatureKind } from '../types.js';
import { block } from './block.js';
import { gap } from './gap.js';
import type { KindDef } from './kind.js';
import { slope } from './slope.js';
import { step } from './step.js';

/** Every registered feature kind. Adding a kind: write its file, add it here and to `FeatureKind`. */
export const KINDS: Readonly<Record<FeatureKind, KindDef>> = { gap, step, block, slope };

export const KIND_NAMES: readonly FeatureKind[] = ['gap', 'step', 'block', 'slope'];

export type { KindDef, CourseBuilder } from './kind.js';
export { Slot } from './kind.js';
