/**
 * The report's small maths: linear scales, round axis ticks and text escaping.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { esc, linearScale, niceTicks } from '../../src/report/index.js';

const finite = (lo: number, hi: number) => fc.double({ min: lo, max: hi, noNaN: true, noDefaultInfinity: true });

describe('linearScale', () => {
  it('maps the domain ends to the range ends and the midpoint to the midpoint, also for a reversed range', () => {
    // Domain ends within 1e5 widths of zero, so rounding in d0 + width stays far below the tolerance.
    fc.assert(fc.property(finite(-1e3, 1e3), finite(1e-2, 1e6), finite(-1e4, 1e4), finite(-1e4, 1e4), (d0, w, r0, r1) => {
      const d1 = d0 + w;
      const width = d1 - d0;
      const s = linearScale([d0, d1], [r0, r1]);
      const tol = 1e-9 * (1 + Math.abs(r0) + Math.abs(r1));
      expect(Math.abs(s(d0) - r0)).toBeLessThanOrEqual(tol);
      expect(Math.abs(s(d1) - r1)).toBeLessThanOrEqual(tol);
      expect(Math.abs(s((d0 + d1) / 2) - (r0 + r1) / 2)).toBeLessThanOrEqual(tol);
      // A quarter of the way along the domain is a quarter of the way along the range.
      expect(Math.abs(s(d0 + width / 4) - (r0 + (r1 - r0) / 4))).toBeLessThanOrEqual(tol);
    }));
  });

  it('maps everything to the middle of the range when the domain has zero width', () => {
    const s = linearScale([3, 3], [10, 50]);
    expect([s(3), s(-100), s(1e9)]).toEqual([30, 30, 30]);
  });

  it('keeps its domain and range', () => {
    const s = linearScale([1, 2], [5, 0]);
    expect([s.domain, s.range]).toEqual([[1, 2], [5, 0]]);
  });
});

/** Whether `step` is 1, 2 or 5 times a power of ten (to float precision). */
function isNiceStep(step: number): boolean {
  const k = Math.floor(Math.log10(step) + 1e-9);
  const m = step / 10 ** k;
  return [1, 2, 5, 10].some((want) => Math.abs(m - want) < 1e-6);
}

describe('niceTicks', () => {
  it('gives round ticks for a few ranges worked out by hand', () => {
    expect(niceTicks(0, 1, 4)).toEqual([0, 0.5, 1]);
    expect(niceTicks(1, 20, 5)).toEqual([5, 10, 15, 20]);
    expect(niceTicks(-7.3, 12.1, 5)).toEqual([-5, 0, 5, 10]);
    expect(niceTicks(0, 100, 5)).toEqual([0, 20, 40, 60, 80, 100]);
  });

  it('returns the single value for an empty or reversed range', () => {
    expect(niceTicks(4, 4)).toEqual([4]);
    expect(niceTicks(5, 2)).toEqual([5]);
  });

  // The "nice numbers" rule for axes is common practice: a step of 1, 2 or 5 × 10^k, here the
  // smallest such step at least (hi - lo) / count, so there are at most count + 1 ticks.
  it('gives sorted, evenly spaced ticks inside [lo, hi], 1-2-5 × 10^k apart, covering the range', () => {
    fc.assert(fc.property(finite(-1e4, 1e4), finite(1e-3, 1e5), fc.integer({ min: 5, max: 12 }), (lo, width, count) => {
      const hi = lo + width;
      const t = niceTicks(lo, hi, count);
      expect(t.length).toBeGreaterThanOrEqual(2);
      expect(t.length).toBeLessThanOrEqual(count + 1);
      const step = t[1] - t[0];
      const tol = step * 1e-6;
      expect(isNiceStep(step)).toBe(true);
      expect(step).toBeGreaterThanOrEqual(width / count - tol);
      for (let i = 1; i < t.length; i++) expect(Math.abs(t[i] - t[i - 1] - step)).toBeLessThanOrEqual(tol);
      expect(t[0]).toBeGreaterThanOrEqual(lo - tol);
      expect(t[t.length - 1]).toBeLessThanOrEqual(hi + tol);
      // Covering: no room for another tick at either end.
      expect(t[0] - step).toBeLessThan(lo + tol);
      expect(t[t.length - 1] + step).toBeGreaterThan(hi - tol);
    }));
  });

  // With count ≥ 3 the step is under 2.5 / 3 of the width, so a multiple of it falls inside
  // (the charts ask for 4 or 5). With count 1 there may be none: [0, 0.001] gets step 0.002.
  it('returns at least one tick, inside the range, for the small counts the charts use', () => {
    fc.assert(fc.property(finite(-1e4, 1e4), finite(1e-3, 1e5), fc.integer({ min: 3, max: 4 }), (lo, width, count) => {
      const t = niceTicks(lo, lo + width, count);
      expect(t.length).toBeGreaterThanOrEqual(1);
      for (const v of t) expect(v >= lo - 1e-9 * width && v <= lo + width + 1e-9 * width).toBe(true);
    }));
  });
});

describe('esc', () => {
  it('escapes the four characters HTML and XML treat as markup in text and quoted attributes', () => {
    // Entity names from the XML 1.0 predefined entities (§4.6) and HTML's named references.
    expect(esc('a & b <c> "d"')).toBe('a &amp; b &lt;c&gt; &quot;d&quot;');
    expect(esc('&lt;')).toBe('&amp;lt;'); // '&' first, so nothing is escaped twice or left half-escaped
    expect(esc("plain 'text'")).toBe("plain 'text'");
  });

  it('leaves no raw markup characters and round-trips through unescaping', () => {
    const unescape = (s: string) => s.replace(/&(lt|gt|quot|amp);/g, (_, e: string) => ({ lt: '<', gt: '>', quot: '"', amp: '&' })[e] as string);
    fc.assert(fc.property(fc.string({ unit: fc.constantFrom('a', '&', '<', '>', '"', ';', 'l', 't', ' ') }), (s) => {
      const e = esc(s);
      expect(e).not.toMatch(/[<>"]|&(?!(amp|lt|gt|quot);)/);
      expect(unescape(e)).toBe(s);
    }));
  });
});
