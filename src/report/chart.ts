import { esc, linearScale, n, niceTicks } from './scale.js';

export interface Series {
  readonly name: string;
  readonly values: readonly number[];
  readonly colour: string;
  /** Its own x values when they differ from the chart's (a shorter run among several). */
  readonly x?: readonly number[];
  /** Line width, px (default 1.8). */
  readonly width?: number;
}

/** A shaded range between two curves (min and max across runs). */
export interface Band { readonly name: string; readonly lo: readonly number[]; readonly hi: readonly number[]; readonly colour: string }

export interface ChartSpec {
  readonly title: string;
  readonly x: readonly number[];
  readonly series: readonly Series[];
  readonly width?: number;
  readonly height?: number;
  /** Fixed y range, e.g. [0, 1] for progress; otherwise from the data (starting at 0). */
  readonly yDomain?: readonly [number, number];
  /** Shaded ranges drawn under the series, over the chart's x. */
  readonly bands?: readonly Band[];
}

const PAD = { left: 44, right: 12, top: 40, bottom: 28 };

/** A line chart as an SVG string: axes with round ticks, one polyline per series (its values also in `data-values`), a legend. */
export function lineChart(spec: ChartSpec): string {
  const w = spec.width ?? 360;
  const h = spec.height ?? 210;
  const xs = spec.x;
  const all = [...spec.series.flatMap((s) => s.values), ...(spec.bands ?? []).flatMap((b) => b.hi)];
  const yMax = spec.yDomain ? spec.yDomain[1] : Math.max(1, ...all);
  const yMin = spec.yDomain ? spec.yDomain[0] : 0;
  const x = linearScale([xs[0] ?? 0, xs[xs.length - 1] ?? 1], [PAD.left, w - PAD.right]);
  const y = linearScale([yMin, yMax], [h - PAD.bottom, PAD.top]);
  const parts: string[] = [`<svg class="chart" viewBox="0 0 ${w} ${h}" width="${w}" height="${h}" role="img" aria-label="${esc(spec.title)}">`];
  parts.push(`<text class="chart-title" x="${PAD.left}" y="16">${esc(spec.title)}</text>`);
  for (const t of niceTicks(yMin, yMax, 4)) {
    parts.push(`<line class="grid" x1="${PAD.left}" x2="${w - PAD.right}" y1="${n(y(t))}" y2="${n(y(t))}"/>`);
    parts.push(`<text class="tick" x="${PAD.left - 6}" y="${n(y(t) + 4)}" text-anchor="end">${t}</text>`);
  }
  for (const t of niceTicks(xs[0] ?? 0, xs[xs.length - 1] ?? 1, 5)) {
    parts.push(`<text class="tick" x="${n(x(t))}" y="${h - PAD.bottom + 16}" text-anchor="middle">${t}</text>`);
  }
  parts.push(`<line class="axis" x1="${PAD.left}" x2="${w - PAD.right}" y1="${h - PAD.bottom}" y2="${h - PAD.bottom}"/>`);
  for (const b of spec.bands ?? []) {
    const pts = [...b.hi.map((v, k) => `${n(x(xs[k]))},${n(y(v))}`), ...b.lo.map((v, k) => `${n(x(xs[k]))},${n(y(v))}`).reverse()].join(' ');
    parts.push(`<polygon class="band" data-series="${esc(b.name)}" fill="${b.colour}" fill-opacity="0.18" stroke="none" points="${pts}"/>`);
  }
  let lx = PAD.left;
  for (const s of spec.series) {
    const sx = s.x ?? xs;
    const pts = s.values.map((v, k) => `${n(x(sx[k]))},${n(y(v))}`).join(' ');
    const width = s.width !== undefined ? ` style="stroke-width:${s.width}px"` : '';
    parts.push(`<polyline class="series" data-series="${esc(s.name)}" data-values="${s.values.join(',')}" fill="none" stroke="${s.colour}"${width} points="${pts}"/>`);
    // Legend on its own line under the title, so it never sits on the curves.
    parts.push(`<line x1="${lx}" x2="${lx + 14}" y1="27" y2="27" stroke="${s.colour}" stroke-width="2"/>`);
    parts.push(`<text class="legend" x="${lx + 18}" y="31" fill="${s.colour}">${esc(s.name)}</text>`);
    lx += 26 + 7.5 * s.name.length;
  }
  parts.push('</svg>');
  return parts.join('');
}
