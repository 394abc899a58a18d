import { type KindDef, Slot, num } from './kind.js';

/** A vertical change of ground level by `height` metres: positive up, negative down. */
export const step: KindDef = {
  kind: 'step',
  fields: ['height'],
  footprint: () => 0,
  build(f, level, b) {
    const next = level + num(f, 'height');
    b.point(f.x, next);
    return next;
  },
  describe(f, d) {
    const h = num(f, 'height');
    if (h > 0) d[Slot.StepUp] = Math.max(d[Slot.StepUp], h);
    else d[Slot.StepDown] = Math.max(d[Slot.StepDown], -h);
  },
};
