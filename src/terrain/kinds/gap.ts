import { type KindDef, num } from './kind.js';

/** A hole in the ground `width` metres wide, with a pit of the family's depth under it. */
export const gap: KindDef = {
  fields: ['width'],
  positive: ['width'],
  descriptor: [{ name: 'gapWidth', meaning: 'widest gap, m', of: (f) => num(f, 'width'), bound: (r) => r.width.max }],
  footprint: (f) => num(f, 'width'),
  build(f, level, b) {
    const w = num(f, 'width');
    b.point(f.x, level - b.gapDepth);
    b.point(f.x + w, level - b.gapDepth);
    b.point(f.x + w, level);
    return level;
  },
};
