import { type KindDef, Slot, num } from './kind.js';

/** An incline `length` metres long (horizontally) with rise over run `grade`: positive uphill, negative downhill. */
export const slope: KindDef = {
  kind: 'slope',
  fields: ['length', 'grade'],
  footprint: (f) => num(f, 'length'),
  build(f, level, b) {
    const next = level + num(f, 'grade') * num(f, 'length');
    b.stretch(f.x + num(f, 'length'), next);
    return next;
  },
  describe(f, d) {
    const g = num(f, 'grade');
    if (g > 0) d[Slot.Uphill] = Math.max(d[Slot.Uphill], g);
    else d[Slot.Downhill] = Math.max(d[Slot.Downhill], -g);
  },
};
