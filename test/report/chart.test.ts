/**
 * Line charts: one polyline per series with a point per value, every point inside the plot
 * area, and a chart that is well-formed markup.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { lineChart, type ChartSpec } from '../../src/report/index.js';
import { xmlProblems } from './helpers.js';

/** The plot area the chart leaves inside its padding (the padding lineChart documents in its source). */
const PAD = { left: 44, right: 12, top: 40, bottom: 28 };

function polylines(svg: string): { stroke: string; points: [number, number][] }[] {
  return [...svg.matchAll(/<polyline\b[^>]*\bstroke="([^"]*)"[^>]*\bpoints="([^"]*)"/g)].map((m) => ({
    stroke: m[1],
    points: m[2].trim() === '' ? [] : m[2].trim().split(/\s+/).map((p) => p.split(',').map(Number) as [number, number]),
  }));
}

const spec = fc.integer({ min: 1, max: 40 }).chain((len) => fc.record({
  start: fc.integer({ min: 0, max: 1000 }),
  series: fc.array(fc.array(fc.double({ min: 0, max: 1e4, noNaN: true }), { minLength: len, maxLength: len }), { minLength: 1, maxLength: 4 }),
  width: fc.integer({ min: 200, max: 800 }),
  height: fc.integer({ min: 120, max: 400 }),
}));

describe('lineChart', () => {
  it('draws one polyline per series, a point per value, all inside the plot area', () => {
    fc.assert(fc.property(spec, ({ start, series, width, height }) => {
      const x = series[0].map((_, k) => start + k);
      const colours = ['#111111', '#222222', '#333333', '#444444'];
      const svg = lineChart({ title: 't', x, width, height, series: series.map((values, i) => ({ name: `s${i}`, colour: colours[i], values })) });
      const lines = polylines(svg);
      expect(lines.map((l) => l.stroke)).toEqual(colours.slice(0, series.length));
      lines.forEach((l, i) => {
        expect(l.points).toHaveLength(series[i].length);
        for (const [px, py] of l.points) {
          expect(px).toBeGreaterThanOrEqual(PAD.left);
          expect(px).toBeLessThanOrEqual(width - PAD.right);
          expect(py).toBeGreaterThanOrEqual(PAD.top);
          expect(py).toBeLessThanOrEqual(height - PAD.bottom);
        }
        // x follows the iteration order; larger values sit higher (smaller SVG y).
        for (let k = 1; k < l.points.length; k++) expect(l.points[k][0]).toBeGreaterThan(l.points[k - 1][0]);
        for (let k = 1; k < l.points.length; k++) {
          if (series[i][k] > series[i][k - 1] + 1e-6 * (1 + series[i][k])) expect(l.points[k][1]).toBeLessThanOrEqual(l.points[k - 1][1]);
        }
      });
    }), { numRuns: 60 });
  });

  it('spans the plot area: first and last iterations at its edges, a fixed y range at top and bottom', () => {
    const c: ChartSpec = { title: 'progress', x: [1, 2, 3], yDomain: [0, 1], width: 300, height: 200, series: [{ name: 'p', colour: '#000', values: [0, 0.5, 1] }] };
    const [line] = polylines(lineChart(c));
    expect(line.points).toEqual([[PAD.left, 200 - PAD.bottom], [(PAD.left + 300 - PAD.right) / 2, (PAD.top + 200 - PAD.bottom) / 2], [300 - PAD.right, PAD.top]]);
  });

  it('writes well-formed markup and escapes the title and series names', () => {
    const svg = lineChart({ title: 'a < b & "c"', x: [1, 2], series: [{ name: 'x&y', colour: '#000', values: [1, 2] }] });
    expect(xmlProblems(svg)).toEqual([]);
    expect(svg).toContain('a &lt; b &amp; &quot;c&quot;');
    expect(svg).toContain('x&amp;y');
  });
});
