import { block } from './block.js';
import { gap } from './gap.js';
import type { KindDef } from './kind.js';
import { slope } from './slope.js';
import { step } from './step.js';

/**
 * Every registered feature kind, in descriptor order. Adding a kind: write its file, add it
 * here (at the end, so existing descriptors keep their layout), and allow it in a family.
 */
export const KINDS = { gap, step, block, slope } as const satisfies Record<string, KindDef>;

/** Names of the feature kinds cairn knows. */
export type FeatureKind = keyof typeof KINDS;

export const KIND_NAMES = Object.keys(KINDS) as FeatureKind[];

export type { KindDef, CourseBuilder, DescriptorComponent, KindRanges } from './kind.js';
