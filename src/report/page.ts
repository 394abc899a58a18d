import type { IterationMetrics } from '../coevo/index.js';
import { plural } from '../core/index.js';
import { baselineSection } from './baseline.js';
import { lineChart } from './chart.js';
import { CLIENT_SCRIPT } from './client.js';
import { coverageMap } from './coverage.js';
import type { ReportData } from './data.js';
import { lineageLegend, lineageSvg } from './lineage-svg.js';
import { C } from './palette.js';
import { esc } from './scale.js';

const STYLE = `
:root{color-scheme:light}
body{margin:0;background:${C.paper};color:${C.ink};font:15px/1.5 Georgia,'Iowan Old Style',serif}
header,section{max-width:1120px;margin:0 auto;padding:18px 24px}
h1{font-weight:normal;font-size:30px;margin:8px 0 4px;letter-spacing:.5px}
h2{font-weight:normal;font-size:20px;border-bottom:1px solid #d8cdb8;padding-bottom:4px}
.facts,.tick,.legend,.chart-title,#course-facts,select,button,#frame-label{font-family:ui-monospace,'DejaVu Sans Mono',monospace;font-size:12px}
.facts span{margin-right:18px}.fp{color:#7a7060;word-break:break-all}
.charts{display:flex;flex-wrap:wrap;gap:10px}
.chart{background:#fbf8f1;border:1px solid #e2d8c4}
.grid{stroke:#e6dccb;stroke-width:1}.axis{stroke:#8b7f6b;stroke-width:1}
.series{stroke-width:1.8}.chart-title{font-size:12px;fill:${C.ink}}.tick{fill:#6d6354}
.scroll{overflow-x:auto;background:#fbf8f1;border:1px solid #e2d8c4}
.edge{stroke:#b5a88f;stroke-width:1.2;fill:none}
.node .mark{stroke:${C.ink};stroke-width:1;cursor:pointer}
.node.archived .mark{fill-opacity:.45;stroke-dasharray:3 2}.node.archived text{fill:${C.ink}}
.map-point.active{fill:${C.moss}}.map-point.archived{fill:${C.slate}}.map-point.solved{fill:${C.clay}}
.node text{font:10px ui-monospace,monospace;fill:${C.paper};pointer-events:none}
.node.selected .mark,.map-point.selected,.cell.selected{stroke:${C.ochre};stroke-width:3}
.icon{vertical-align:middle;margin:0 2px 0 10px}.lineage-key{white-space:nowrap;margin-right:12px}.lineage-key i{display:inline-block;width:10px;height:10px;border-radius:50%;margin:0 4px;vertical-align:middle}
.map-area{fill:#fbf8f1}.cell{stroke:${C.ink};stroke-width:.4;cursor:pointer}.swatch{stroke:${C.ink};stroke-width:.4}.swatch.empty{fill:#fbf8f1}
.cell-line{stroke:#e6dccb;stroke-width:.5}.block-line{stroke:#8b7f6b;stroke-width:1.2}
#coverage-svg{background:#fbf8f1;border:1px solid #e2d8c4}
table{border-collapse:collapse;font-family:ui-monospace,'DejaVu Sans Mono',monospace;font-size:12px}td,th{padding:3px 10px;text-align:right;border-bottom:1px solid #e2d8c4}
.map-point{stroke:${C.ink};stroke-width:.8;cursor:pointer;opacity:.9}
.key span{display:inline-block;width:10px;height:10px;border-radius:50%;margin:0 4px 0 14px;vertical-align:middle}
#map-svg,#course-svg{background:#fbf8f1;border:1px solid #e2d8c4;display:block}
#course-svg{width:100%;height:auto;max-height:360px}
.ground{fill:#cdbfa3;stroke:#6b5b45;stroke-width:.03}.obstacle{fill:#9c8b73;stroke:#5a4a36;stroke-width:.03}
.start-line{stroke:${C.moss};stroke-width:.04;stroke-dasharray:.15 .1}.finish-line{stroke:${C.clay};stroke-width:.04;stroke-dasharray:.15 .1}
.torso{fill:#2f4b5c}.limb{fill:#557a8c}.foot{fill:${C.ochre}}
.controls{margin-top:8px;display:flex;gap:12px;align-items:center}
#scrub{flex:1}button{background:${C.ink};color:${C.paper};border:0;padding:5px 14px;cursor:pointer}
footer{max-width:1120px;margin:0 auto;padding:12px 24px 40px;color:#7a7060;font-size:12px}
`;

function curves(d: ReportData): string {
  const x = d.metrics.map((m) => m.iteration);
  const s = (name: string, colour: string, f: (m: ReportData['metrics'][number]) => number) => ({ name, colour, values: d.metrics.map(f) });
  if (x.length === 0) return '<p>No iterations logged yet.</p>';
  return [
    lineChart({ title: 'active pairs', x, series: [s('active', C.moss, (m) => m.activePairs)] }),
    lineChart({ title: 'courses admitted and solved', x, series: [s('admitted', C.blue, (m) => m.admitted), s('solved', C.clay, (m) => m.solved)] }),
    lineChart({ title: 'courses crossed and solved', x, series: [s('crossed', C.ochre, (m) => m.crossed), s('solved', C.clay, (m) => m.solved)] }),
    lineChart({ title: 'new ground', x, series: [s('new ground', C.teal, (m) => m.newGround)] }),
    lineChart({ title: `coverage (cells of ${d.grid.cells.toLocaleString('en-US')})`, x, series: [s('coverage', C.plum, (m) => m.coverage)] }),
    lineChart({ title: 'walker progress', x, yDomain: [0, 1], series: [s('best', C.clay, (m) => m.bestProgress), s('median', C.blue, (m) => m.medianProgress)] }),
    lineChart({ title: 'takeovers by transfer (total)', x, series: [s('takeovers', C.ochre, (m) => m.takeovers)] }),
    lineChart({ title: 'hardest course (difficulty)', x, series: [s('crossed', C.ochre, (m) => m.hardestCrossed), s('solved', C.ink, (m) => m.hardestSolved)] }),
    lineChart({ title: 'candidates (total)', x, series: candidateSeries(d.metrics) }),
  ].join('');
}

/**
 * The candidates chart's series from the metrics log: candidates tried (given rollouts), those
 * refused as too easy, and, only when the run has an admission screen (its log lines carry
 * `screened`), proposals screened out before rollouts. Cumulative, one value per logged iteration.
 */
export function candidateSeries(metrics: readonly IterationMetrics[]): { name: string; colour: string; values: number[] }[] {
  const s = (name: string, colour: string, f: (m: IterationMetrics) => number) => ({ name, colour, values: metrics.map(f) });
  const screened = metrics.some((m) => m.screened !== undefined);
  return [s('tried', C.blue, (m) => m.candidates), s('too easy', C.clay, (m) => m.tooEasy), ...(screened ? [s('screened', C.slate, (m) => m.screened ?? 0)] : [])];
}

function coverageSection(d: ReportData): string {
  const g = d.grid;
  return `<section id="coverage"><h2>Coverage</h2>
<p id="coverage-summary" class="facts">${g.covered.length} of ${g.cells.toLocaleString('en-US')} cells hold a solved course (components ${esc(g.components.join(', '))}, each normalised to 0–1 in ${g.bins} bins).</p>
<p>Components at odd places in that list run across, those at even places up; along each axis the first picks the block and the next the cell inside it. A cell is coloured by the hardest solved course in it (click it to open that course); blank cells hold none.</p>
<div class="scroll">${coverageMap(g)}</div></section>`;
}

/** The whole report as one self-contained HTML page (inline style, SVG and script; no network). */
export function reportHtml(d: ReportData & { initialCourse: number }): string {
  const solved = d.courses.filter((c) => c.solvedAt !== null).length;
  const crossed = d.courses.filter((c) => c.crossedAt !== null).length;
  const last = d.metrics[d.metrics.length - 1];
  const json = JSON.stringify(d).replace(/</g, '\\u003c');
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>cairn report: ${esc(d.run.name)}</title><style>${STYLE}</style></head><body>
<header><h1>${esc(d.run.name)}</h1>
<p class="facts" id="run-facts"><span>iteration ${d.run.iteration} of ${d.run.target}</span><span>seed ${d.run.seed}</span><span>${plural(d.courses.filter((c) => c.parent !== null).length, 'course')} admitted</span><span>${crossed} crossed</span><span>${solved} solved</span><span>new ground ${last ? last.newGround : 0}</span><span>coverage ${d.grid.covered.length} of ${d.grid.cells} cells</span><span>${plural(last ? last.takeovers : 0, 'takeover')}</span></p>
<p class="facts fp">fingerprint ${esc(d.run.fingerprint)}</p>
<p class="key facts">course map<span style="background:${C.moss}"></span>active<span style="background:${C.slate}"></span>archived<span style="background:${C.clay}"></span>solved</p></header>
<section id="curves"><h2>The population over time</h2><div class="charts">${curves(d)}</div></section>
<section id="lineage"><h2>Lineage of courses</h2><p>Each course hangs under the course it was mutated from. Click one to see it below.</p>${lineageLegend(d)}<div class="scroll">${lineageSvg(d)}</div></section>
${coverageSection(d)}
${d.baseline ? baselineSection(d.baseline) : ''}
<section id="map"><h2>Course map</h2><p>Courses placed by two descriptor components: how much of the terrain space the run has covered.</p>
<p class="facts"><label>x <select id="map-x"></select></label> <label>y <select id="map-y"></select></label></p>
<svg id="map-svg" viewBox="0 0 520 340" width="520" height="340"></svg></section>
<section id="course"><h2>Course <span id="course-id"></span></h2><p id="course-facts"></p>
<svg id="course-svg" viewBox="0 0 100 100"></svg>
<div class="controls"><button id="play" type="button">Play</button><input id="scrub" type="range" min="0" max="0" value="0"><span id="frame-label"></span></div></section>
<footer>Made by cairn from the run's newest checkpoint. Replays re-run each course's walker under the run's own settings.</footer>
<script id="report-data" type="application/json">${json}</script>
<script>${CLIENT_SCRIPT}</script>
</body></html>
`;
}

/** The course shown first: the hardest solved one, else the newest. */
export function initialCourse(d: ReportData): number {
  const solved = d.courses.filter((c) => c.solvedAt !== null).sort((a, b) => b.difficulty - a.difficulty || a.id - b.id);
  return solved[0]?.id ?? d.courses[d.courses.length - 1].id;
}
