import { type KindDef, num } from './kind.js';

/** An incline `length` metres long (horizontally) with rise over run `grade`: positive uphill, negative downhill. */
export const slope: KindDef = {
  fields: ['length', 'grade'],
  positive: ['length'],
  descriptor: [
    { name: 'uphill', meaning: 'steepest uphill grade, rise/run', of: (f) => Math.max(0, num(f, 'grade')), bound: (r) => Math.max(0, r.grade.max) },
    { name: 'downhill', meaning: 'steepest downhill grade, fall/run', of: (f) => Math.max(0, -num(f, 'grade')), bound: (r) => Math.max(0, -r.grade.min) },
  ],
  footprint: (f) => num(f, 'length'),
  build(f, level, b) {
    const next = level + num(f, 'grade') * num(f, 'length');
    b.stretch(f.x + num(f, 'length'), next);
    return next;
  },
};
