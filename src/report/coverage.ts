import { coveredCells, type GridSpec, type RunState } from '../coevo/index.js';
import type { TerrainFamily, TerrainGenome } from '../terrain/index.js';
import { EASY, HARD, mix } from './palette.js';
import { esc, n } from './scale.js';

/** The coverage grid of a run: its components and bins, and each cell that holds a solved course. */
export interface CoverageGrid {
  readonly components: readonly string[];
  readonly bins: number;
  /** Cells in the grid: bins ^ components. */
  readonly cells: number;
  /** Covered cells in lexicographic order of their bins: the bin per component, the solved courses in it, the hardest of them and its difficulty. */
  readonly covered: readonly CoveredCell[];
}

export interface CoveredCell {
  readonly cell: readonly number[];
  readonly courses: readonly number[];
  readonly hardest: number;
  readonly difficulty: number;
}

const byBins = (a: CoveredCell, b: CoveredCell): number => {
  for (let i = 0; i < a.cell.length; i++) if (a.cell[i] !== b.cell[i]) return a.cell[i] - b.cell[i];
  return 0;
};

/** The run's covered cells, each with its hardest solved course (largest difficulty, ties: the lower id). */
export function coverageGrid(state: RunState, family: TerrainFamily, spec: GridSpec, difficultyOf: (g: TerrainGenome) => number): CoverageGrid {
  const genome = new Map(state.courses.map((c) => [c.id, c.genome]));
  const covered = [...coveredCells(state.courses, family, spec)].map(([key, ids]) => {
    const ranked = ids.map((id) => ({ id, d: difficultyOf(genome.get(id)!) })).sort((a, b) => b.d - a.d || a.id - b.id);
    return { cell: key.split(',').map(Number), courses: [...ids].sort((a, b) => a - b), hardest: ranked[0].id, difficulty: ranked[0].d };
  });
  return { components: spec.components, bins: spec.bins, cells: spec.bins ** spec.components.length, covered: covered.sort(byBins) };
}

/** Most columns or rows the map draws; a finer grid is drawn over its first components only. */
export const MAX_SIDE = 160;

/**
 * Where the map puts each grid component. Components at even positions (1st, 3rd, …) run
 * across, those at odd positions (2nd, 4th, …) up; along each axis the first of them picks the
 * block and the next the cell inside it (a mixed-radix column or row number). With two
 * components that is a plain bins × bins grid; with four, a bins × bins matrix of bins × bins
 * blocks. `shown` is how many components are drawn: all, unless that makes more than
 * MAX_SIDE columns or rows, when trailing components are left out and their cells merged.
 */
export function mapAxes(components: number, bins: number): { across: number[]; up: number[]; shown: number } {
  let shown = components;
  while (shown > 2 && bins ** Math.ceil(shown / 2) > MAX_SIDE) shown--;
  const idx = Array.from({ length: shown }, (_, i) => i);
  return { across: idx.filter((i) => i % 2 === 0), up: idx.filter((i) => i % 2 === 1), shown };
}

/** Column (or row) of a cell along an axis: the axis's bins read as digits in base `bins`, the first most significant. */
export function place(cell: readonly number[], axis: readonly number[], bins: number): number {
  return axis.reduce((acc, i) => acc * bins + cell[i], 0);
}

/** Covered cells merged over the components left out of the map (the hardest course of the merged cells wins). */
function project(grid: CoverageGrid, shown: number): CoveredCell[] {
  const merged = new Map<string, CoveredCell>();
  for (const c of grid.covered) {
    const key = c.cell.slice(0, shown).join(',');
    const had = merged.get(key);
    const harder = !had || c.difficulty > had.difficulty || (c.difficulty === had.difficulty && c.hardest < had.hardest);
    const courses = [...(had?.courses ?? []), ...c.courses].sort((a, b) => a - b);
    merged.set(key, harder ? { ...c, cell: c.cell.slice(0, shown), courses } : { ...had, courses });
  }
  return [...merged.values()];
}

const PAD = { left: 64, right: 150, top: 12, bottom: 62 };

/** Labels of one axis: the first component's bin ranges under (or beside) each block, and the axis title. */
function axisText(grid: CoverageGrid, axis: readonly number[]): { title: string; bins: string[] } {
  const names = axis.map((i) => grid.components[i]);
  const step = 1 / grid.bins;
  const bins = Array.from({ length: grid.bins }, (_, b) => `${n(b * step)}–${n((b + 1) * step)}`);
  const title = names.length === 1 ? `${names[0]} (${grid.bins} bins)` : `${names[0]} (blocks) › ${names.slice(1).join(' › ')} (cells in a block); ${grid.bins} bins each`;
  return { title, bins };
}

/**
 * The coverage map as SVG: the grid laid out as mapAxes says, each covered cell filled by the
 * difficulty of the hardest solved course in it (pale to deep red over [0, the hardest]),
 * empty cells blank, block boundaries drawn heavier, axes labelled with the components and bins.
 */
export function coverageMap(grid: CoverageGrid): string {
  const { across, up, shown } = mapAxes(grid.components.length, grid.bins);
  const cols = grid.bins ** across.length;
  const rows = grid.bins ** up.length;
  const s = Math.max(3, Math.min(28, Math.floor(460 / Math.max(cols, rows))));
  const [w, h] = [cols * s, rows * s];
  const W = PAD.left + w + PAD.right;
  const H = PAD.top + h + PAD.bottom;
  const top = Math.max(0, ...grid.covered.map((c) => c.difficulty));
  const colour = (d: number): string => mix(EASY, HARD, top > 0 ? d / top : 0);
  const parts = [`<svg id="coverage-svg" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" data-columns="${cols}" data-rows="${rows}" data-shown="${shown}">`];
  parts.push(`<rect class="map-area" x="${PAD.left}" y="${PAD.top}" width="${w}" height="${h}"/>`);
  for (const c of project(grid, shown)) {
    const x = PAD.left + place(c.cell, across, grid.bins) * s;
    const y = PAD.top + (rows - 1 - place(c.cell, up, grid.bins)) * s;
    const where = c.cell.map((b, i) => `${grid.components[i]} bin ${b}`).join(', ');
    const tip = `${where}: ${c.courses.length} solved (${c.courses.join(', ')}); hardest course ${c.hardest}, difficulty ${c.difficulty.toFixed(3)}`;
    parts.push(`<rect class="cell" data-cell="${c.cell.join(',')}" data-course="${c.hardest}" data-difficulty="${c.difficulty}" x="${x}" y="${y}" width="${s}" height="${s}" fill="${colour(c.difficulty)}"><title>${esc(tip)}</title></rect>`);
  }
  const blockCols = grid.bins ** (across.length - 1);
  const blockRows = grid.bins ** (up.length - 1);
  for (let i = 0; i <= cols; i++) if (s >= 6 || i % blockCols === 0) parts.push(`<line class="${i % blockCols === 0 ? 'block-line' : 'cell-line'}" x1="${PAD.left + i * s}" x2="${PAD.left + i * s}" y1="${PAD.top}" y2="${PAD.top + h}"/>`);
  for (let j = 0; j <= rows; j++) if (s >= 6 || j % blockRows === 0) parts.push(`<line class="${j % blockRows === 0 ? 'block-line' : 'cell-line'}" x1="${PAD.left}" x2="${PAD.left + w}" y1="${PAD.top + j * s}" y2="${PAD.top + j * s}"/>`);
  const ax = axisText(grid, across);
  const ay = axisText(grid, up);
  const bw = blockCols * s;
  const bh = blockRows * s;
  ax.bins.forEach((t, b) => parts.push(`<text class="tick axis-bin" x="${n(PAD.left + (b + 0.5) * bw)}" y="${PAD.top + h + 14}" text-anchor="middle">${t}</text>`));
  ay.bins.forEach((t, b) => parts.push(`<text class="tick axis-bin" x="${PAD.left - 6}" y="${n(PAD.top + h - (b + 0.5) * bh + 4)}" text-anchor="end">${t}</text>`));
  parts.push(`<text class="tick axis-title" id="coverage-x" x="${PAD.left}" y="${PAD.top + h + 34}">across: ${esc(ax.title)}</text>`);
  parts.push(`<text class="tick axis-title" id="coverage-y" x="${PAD.left}" y="${PAD.top + h + 50}">up: ${esc(ay.title)}</text>`);
  parts.push(legend(PAD.left + w + 16, PAD.top, top, colour));
  parts.push('</svg>');
  return parts.join('');
}

/** Swatches of the difficulty scale from 0 to the hardest covered cell's difficulty. */
function legend(x: number, y: number, top: number, colour: (d: number) => string): string {
  const out = [`<text class="tick" x="${x}" y="${y + 10}">hardest solved</text>`, `<text class="tick" x="${x}" y="${y + 24}">difficulty</text>`];
  for (let k = 0; k <= 4; k++) {
    const d = (top * k) / 4;
    out.push(`<rect class="swatch" x="${x}" y="${y + 34 + k * 18}" width="14" height="14" fill="${colour(d)}"/>`);
    out.push(`<text class="tick" x="${x + 20}" y="${y + 45 + k * 18}">${d.toFixed(3)}</text>`);
  }
  out.push(`<rect class="swatch empty" x="${x}" y="${y + 34 + 5 * 18}" width="14" height="14"/><text class="tick" x="${x + 20}" y="${y + 45 + 5 * 18}">none solved</text>`);
  return out.join('');
}
