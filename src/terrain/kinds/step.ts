import { type KindDef, num } from './kind.js';

/** A vertical change of ground level by `height` metres: positive up, negative down. */
export const step: KindDef = {
  fields: ['height'],
  positive: [],
  descriptor: [
    { name: 'stepUp', meaning: 'tallest upward step, m', of: (f) => Math.max(0, num(f, 'height')), bound: (r) => Math.max(0, r.height.max) },
    { name: 'stepDown', meaning: 'deepest downward step, m', of: (f) => Math.max(0, -num(f, 'height')), bound: (r) => Math.max(0, -r.height.min) },
  ],
  footprint: () => 0,
  build(f, level, b) {
    const next = level + num(f, 'height');
    b.point(f.x, next);
    return next;
  },
};
