/**
 * The coverage map's layout on made-up grids: with two components a plain grid, with three the
 * third picks the cell inside the first's block, and a grid too fine to draw is drawn over its
 * first components with merged cells keeping their hardest course. Markup is well-formed XML.
 */
import { describe, expect, it } from 'vitest';
import { coverageMap, mapAxes, MAX_SIDE, type CoverageGrid } from '../../src/report/index.js';
import { xmlProblems } from './helpers.js';

function grid(components: string[], bins: number, covered: [number[], number, number][]): CoverageGrid {
  return { components, bins, cells: bins ** components.length, covered: covered.map(([cell, hardest, difficulty]) => ({ cell, courses: [hardest], hardest, difficulty })) };
}

/** Each drawn cell: its bins, course, position and size, and the plot area's top-left corner and height. */
function drawn(svg: string) {
  const area = /<rect class="map-area" x="([\d.]+)" y="([\d.]+)" width="([\d.]+)" height="([\d.]+)"/.exec(svg)!.slice(1).map(Number);
  const cells = [...svg.matchAll(/<rect class="cell" data-cell="([\d,]*)" data-course="(\d+)" data-difficulty="[^"]*" x="([\d.]+)" y="([\d.]+)" width="([\d.]+)"/g)]
    .map((m) => ({ cell: m[1], course: Number(m[2]), col: (Number(m[3]) - area[0]) / Number(m[5]), row: (area[1] + area[3] - Number(m[4])) / Number(m[5]) - 1 }));
  return { area, cells };
}

describe('coverageMap', () => {
  it('lays two components out as a bins × bins grid, the first across and the second up', () => {
    const svg = coverageMap(grid(['gapWidth', 'stepUp'], 3, [[[0, 0], 0, 0], [[2, 1], 4, 0.3]]));
    expect(xmlProblems(svg)).toEqual([]);
    const { area, cells } = drawn(svg);
    expect(area[2]).toBe(area[3]);
    expect(cells).toEqual([{ cell: '0,0', course: 0, col: 0, row: 0 }, { cell: '2,1', course: 4, col: 2, row: 1 }]);
    expect(svg).toContain('across: gapWidth (3 bins)');
    expect(svg).toContain('up: stepUp (3 bins)');
  });

  it('puts a third component inside the first one\'s blocks', () => {
    const { cells } = drawn(coverageMap(grid(['gapWidth', 'stepUp', 'uphill'], 4, [[[1, 3, 2], 7, 0.2]])));
    expect(cells).toEqual([{ cell: '1,3,2', course: 7, col: 1 * 4 + 2, row: 3 }]);
  });

  it('draws a grid too fine for the page over its first components, each merged cell showing its hardest course', () => {
    const axes = mapAxes(4, 20);
    expect(axes).toEqual({ across: [0], up: [1], shown: 2 });
    expect(20 ** 2).toBeGreaterThan(MAX_SIDE);
    const svg = coverageMap(grid(['gapWidth', 'stepUp', 'blockHeight', 'uphill'], 20, [[[0, 0, 0, 0], 0, 0], [[5, 6, 0, 1], 3, 0.1], [[5, 6, 9, 9], 8, 0.4]]));
    expect(drawn(svg).cells).toEqual([{ cell: '0,0', course: 0, col: 0, row: 0 }, { cell: '5,6', course: 8, col: 5, row: 6 }]);
    expect(svg).toContain('data-shown="2"');
    expect(svg).toMatch(/<title>gapWidth bin 5, stepUp bin 6: 2 solved \(3, 8\); hardest course 8, difficulty 0\.400<\/title>/);
  });

  it('leaves empty cells blank: one filled rectangle per covered cell', () => {
    const svg = coverageMap(grid(['gapWidth', 'stepUp', 'blockHeight', 'uphill'], 4, []));
    expect(xmlProblems(svg)).toEqual([]);
    expect(drawn(svg).cells).toEqual([]);
  });
});
