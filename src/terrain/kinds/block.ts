import { type KindDef, num } from './kind.js';

/** Depth a block is sunk into the ground, m, so roughness never opens a slit under it. */
const EMBED = 0.5;

/** A rectangular obstacle `width` × `height` metres standing on flat ground; the walker must climb over it. */
export const block: KindDef = {
  fields: ['width', 'height'],
  positive: ['width', 'height'],
  descriptor: [{ name: 'blockHeight', meaning: 'tallest block, m', of: (f) => num(f, 'height'), bound: (r) => r.height.max }],
  footprint: (f) => num(f, 'width'),
  build(f, level, b) {
    const x0 = f.x;
    const x1 = f.x + num(f, 'width');
    const top = level + num(f, 'height');
    b.point(x1, level);
    b.obstacle([x0, level - EMBED, x1, level - EMBED, x1, top, x0, top]);
    return level;
  },
};
