import type { IterationMetrics } from '../coevo/index.js';
import { median } from '../core/index.js';
import { lineChart, type Series } from './chart.js';
import { esc } from './scale.js';

/** One run of a comparison: who it is and its metrics log. */
export interface CompareRun {
  readonly name: string;
  readonly dir: string;
  readonly seed: number;
  readonly fingerprint: string;
  readonly recipeHash: string;
  readonly metrics: readonly IterationMetrics[];
  /** Wall-clock seconds all invocations spent on the run (sessions.jsonl). */
  readonly seconds: number;
}

/** Distinct colours for up to eight runs, then repeating (the median is drawn in ink). */
const RUN_COLOURS = ['#2f6f8f', '#b2472b', '#5b7f4a', '#c98a2b', '#7a4f8f', '#3d8f84', '#8f3d5e', '#6b6b2f'];
const INK = '#2b2823';

type Figure = { readonly title: string; readonly get: (m: IterationMetrics) => number; readonly yDomain?: readonly [number, number] };
const FIGURES: readonly Figure[] = [
  { title: 'courses admitted', get: (m) => m.admitted },
  { title: 'courses crossed', get: (m) => m.crossed },
  { title: 'courses solved', get: (m) => m.solved },
  { title: 'new ground', get: (m) => m.newGround },
  { title: 'coverage (cells holding a solved course)', get: (m) => m.coverage },
  { title: 'best walker progress', get: (m) => m.bestProgress, yDomain: [0, 1] },
  { title: 'median walker progress', get: (m) => m.medianProgress, yDomain: [0, 1] },
  { title: 'hardest solved course (difficulty)', get: (m) => m.hardestSolved },
  { title: 'takeovers by transfer (total)', get: (m) => m.takeovers },
];

/**
 * One chart per figure: each run's curve (thin), and across the runs that reached each
 * iteration their median (thick) and their range (shaded, min to max).
 */
function chart(runs: readonly CompareRun[], f: Figure): string {
  const last = Math.max(...runs.map((r) => r.metrics[r.metrics.length - 1]?.iteration ?? 0));
  const xs = Array.from({ length: last + 1 }, (_, i) => i).filter((i) => runs.some((r) => r.metrics.some((m) => m.iteration === i)));
  const at = xs.map((i) => runs.flatMap((r) => r.metrics.filter((m) => m.iteration === i).map(f.get)));
  const series: Series[] = runs.map((r, k) => ({ name: r.name, colour: RUN_COLOURS[k % RUN_COLOURS.length], width: 1, x: r.metrics.map((m) => m.iteration), values: r.metrics.map(f.get) }));
  series.push({ name: 'median', colour: INK, width: 2.6, values: at.map((v) => median(v)) });
  const bands = [{ name: 'range', colour: INK, lo: at.map((v) => Math.min(...v)), hi: at.map((v) => Math.max(...v)) }];
  return lineChart({ title: f.title, x: xs, series, bands, yDomain: f.yDomain, width: 520, height: 260 });
}

type Column = { readonly title: string; readonly get: (m: IterationMetrics) => number; readonly digits: number; readonly median: boolean };
const COLUMNS: readonly Column[] = [
  { title: 'iteration', get: (m) => m.iteration, digits: 0, median: false },
  { title: 'admitted', get: (m) => m.admitted, digits: 0, median: true },
  { title: 'crossed', get: (m) => m.crossed, digits: 0, median: true },
  { title: 'solved', get: (m) => m.solved, digits: 0, median: true },
  { title: 'new ground', get: (m) => m.newGround, digits: 0, median: true },
  { title: 'coverage', get: (m) => m.coverage, digits: 0, median: true },
  { title: 'takeovers', get: (m) => m.takeovers, digits: 0, median: true },
  { title: 'best progress', get: (m) => m.bestProgress, digits: 3, median: true },
  { title: 'hardest solved', get: (m) => m.hardestSolved, digits: 3, median: true },
  { title: 'rollouts', get: (m) => m.rollouts, digits: 0, median: true },
  { title: 'physics steps', get: (m) => m.steps, digits: 0, median: true },
];

const fmt = (v: number, digits: number): string => (digits === 0 && Number.isInteger(v) ? v.toLocaleString('en-US') : v.toFixed(Math.max(digits, 1)));

function table(runs: readonly CompareRun[]): string {
  const finals = runs.map((r) => r.metrics[r.metrics.length - 1]);
  const head = `<tr><th>run</th><th>seed</th>${COLUMNS.map((c) => `<th>${c.title}</th>`).join('')}<th>wall time (min)</th><th>fingerprint</th></tr>`;
  const rows = runs.map((r, k) => {
    const m = finals[k];
    const cells = COLUMNS.map((c) => `<td>${m ? fmt(c.get(m), c.digits) : '—'}</td>`).join('');
    return `<tr data-run="${esc(r.name)}"><td style="color:${RUN_COLOURS[k % RUN_COLOURS.length]}">${esc(r.name)}</td><td>${r.seed}</td>${cells}<td>${(r.seconds / 60).toFixed(1)}</td><td class="fp">${r.fingerprint.slice(0, 16)}…</td></tr>`;
  });
  const have = finals.filter((m): m is IterationMetrics => m !== undefined);
  const medians = COLUMNS.map((c) => `<td>${c.median && have.length > 0 ? fmt(median(have.map(c.get)), c.digits) : ''}</td>`).join('');
  return `<table id="finals">${head}${rows.join('')}<tr class="median"><td>median</td><td></td>${medians}<td>${(median(runs.map((r) => r.seconds)) / 60).toFixed(1)}</td><td></td></tr></table>`;
}

/** A page comparing several runs: their curves together (each run, median and range) and a table of final figures. */
export function compareHtml(runs: readonly CompareRun[]): string {
  const sameSettings = new Set(runs.map((r) => r.recipeHash)).size;
  const note = sameSettings === 1 ? 'All runs share one recipe hash.' : `${sameSettings} different recipe hashes (seeds differ, or settings do).`;
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>cairn comparison: ${esc(runs.map((r) => r.name).join(', '))}</title>
<style>body{margin:0;background:#f4efe4;color:${INK};font:15px/1.5 Georgia,serif}header,section{max-width:1120px;margin:0 auto;padding:18px 24px}
h1{font-weight:normal}h2{font-weight:normal;font-size:20px;border-bottom:1px solid #d8cdb8}.charts{display:flex;flex-wrap:wrap;gap:10px}
.chart{background:#fbf8f1;border:1px solid #e2d8c4}.grid{stroke:#e6dccb}.axis{stroke:#8b7f6b}.series{stroke-width:1.8}
.tick,.legend,.chart-title,table{font-family:ui-monospace,'DejaVu Sans Mono',monospace;font-size:12px}.fp{color:#7a7060}
table{border-collapse:collapse}td,th{padding:3px 10px;text-align:right;border-bottom:1px solid #e2d8c4}tr.median{font-weight:bold}</style></head><body>
<header><h1>${runs.length} runs compared</h1><p>${esc(runs.map((r) => r.dir).join(', '))}</p><p>${note} Thin lines: each run; thick: the median across runs at each iteration; shaded: their range.</p></header>
<section id="curves"><h2>Curves</h2><div class="charts">${FIGURES.map((f) => chart(runs, f)).join('')}</div></section>
<section id="table"><h2>Final figures</h2>${table(runs)}</section>
</body></html>
`;
}
