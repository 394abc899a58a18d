import { type KindDef, Slot, num } from './kind.js';

/** A hole in the ground `width` metres wide, with a pit of the family's depth under it. */
export const gap: KindDef = {
  kind: 'gap',
  fields: ['width'],
  footprint: (f) => num(f, 'width'),
  build(f, level, b) {
    const w = num(f, 'width');
    b.point(f.x, level - b.pitDepth);
    b.point(f.x + w, level - b.pitDepth);
    b.point(f.x + w, level);
    return level;
  },
  describe(f, d) {
    d[Slot.GapWidth] = Math.max(d[Slot.GapWidth], num(f, 'width'));
  },
};
