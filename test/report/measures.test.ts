/**
 * The run's measures in `status` and in the report, against the run's own state: the smoke
 * recipe with a low solve threshold (so courses cross and solve within its 20 iterations), its
 * status in text and JSON, and its report opened in Debian's chromium (required, installed by
 * `npm test` first): the crossed / solved, new ground and coverage curves, the coverage map,
 * the lineage tree's marks and kinds, and the direct-baseline table only with a baseline.json.
 * Every expected figure is worked out here from the checkpointed courses, by the definitions in
 * the README (*Crossed, solved and the run's measures*), not by cairn's own functions.
 */
/// <reference lib="dom" />
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openRun, type OpenedRun } from '../../src/store/index.js';
import { cairn, ensureBuilt, openPage, ROOT, type PageWatch } from './helpers.js';
import { baselineFixture, expectations, type Expected } from './measures-expected.js';

const tmp = mkdtempSync(join(tmpdir(), 'cairn-measures-'));
const runDir = join(tmp, 'run');
const html = { plain: join(tmp, 'plain.html'), baseline: join(tmp, 'baseline.html'), bad: join(tmp, 'bad.html') };
let run: OpenedRun;
let want: Expected;
let statusJson: Record<string, unknown>;
let statusText = '';
let badReport: ReturnType<typeof cairn>;
let baseline: ReturnType<typeof baselineFixture>;

beforeAll(() => {
  ensureBuilt();
  const r = cairn('run', join(ROOT, 'runs/smoke.json'), '--out', runDir, '--set', 'solve.threshold=0.2', '--quiet', '--workers', '2');
  if (r.code !== 0) throw new Error(`smoke run failed (${r.code}): ${r.stderr}`);
  run = openRun(runDir);
  want = expectations(run);
  statusJson = JSON.parse(cairn('status', runDir, '--json').stdout) as Record<string, unknown>;
  statusText = cairn('status', runDir).stdout;
  const report = (out: string) => cairn('report', runDir, '--out', out, '--quiet', '--workers', '2');
  if (report(html.plain).code !== 0) throw new Error('report failed');
  baseline = baselineFixture(run);
  writeFileSync(join(runDir, 'baseline.json'), JSON.stringify(baseline));
  if (report(html.baseline).code !== 0) throw new Error('report with a baseline failed');
  writeFileSync(join(runDir, 'baseline.json'), JSON.stringify({ ...baseline, rows: [{ ...baseline.rows[0], verdict: 'maybe' }] }));
  badReport = report(html.bad);
}, 300_000);
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

describe('status on a run whose courses cross and solve', () => {
  it('has something to show: courses crossed and solved beyond the start course', () => {
    expect(want.crossed.at(-1)).toBeGreaterThan(1);
    expect(want.solved.at(-1)).toBeGreaterThan(1);
  });

  it('gives the measures in --json as the state defines them', () => {
    const last = run.state.iteration;
    expect(statusJson).toMatchObject({
      crossed: want.crossed[last], solved: want.solved[last], newGround: want.newGround[last], coverage: want.cells[last].size,
      grid: { components: want.components, bins: want.bins, cells: want.bins ** want.components.length },
      lineages: want.live.length, candidates: run.state.counters.candidates, tooEasy: run.state.counters.tooEasy,
      tooEasyShare: run.state.counters.tooEasy / run.state.counters.candidates,
    });
    expect(statusJson.hardestCrossed).toBeCloseTo(want.hardestCrossed!, 12);
    expect(statusJson.hardestSolved).toBeCloseTo(want.hardestSolved!, 12);
    const live = statusJson.liveLineages as { id: number; kind: string; active: number[] }[];
    expect(live.map((l) => [l.id, l.kind, l.active])).toEqual(want.live.map((l) => [l.id, l.kind, l.active]));
  });

  it('says the same in words', () => {
    const last = run.state.iteration;
    const c = run.state.counters;
    expect(statusText).toContain(`; ${want.crossed[last]} crossed; ${want.solved[last]} solved; `);
    expect(statusText).toContain(`\nhardest crossed course: difficulty ${want.hardestCrossed!.toFixed(3)}\n`);
    expect(statusText).toContain(`\nnew ground ${want.newGround[last]}; coverage ${want.cells[last].size} of ${want.bins ** want.components.length} cells (${want.components.join(', ')}; ${want.bins} bins each)\n`);
    const kinds = want.live.map((l) => `${l.id} ${l.kind} (${l.active.length} active course${l.active.length === 1 ? '' : 's'}, `);
    const line = statusText.split('\n').find((l) => l.includes('alive'))!;
    expect(line.startsWith(`${want.live.length} lineage${want.live.length === 1 ? '' : 's'} alive`)).toBe(true);
    for (const k of kinds) expect(line).toContain(k);
    expect(statusText).toContain(`\n${c.candidates} candidates, ${c.tooEasy} refused as too easy (${((100 * c.tooEasy) / c.candidates).toFixed(1)}% wasted)\n`);
  });
});

describe('the report of that run in chromium', () => {
  let browser: Browser;
  let page: Page;
  let watch: PageWatch;

  beforeAll(async () => {
    ({ browser, page, watch } = await openPage(html.plain));
  }, 60_000);
  afterAll(async () => { await browser?.close(); });

  /** The values a chart's series plots, by series name. */
  const series = (title: string) => page.locator(`svg.chart[aria-label="${title}"] polyline.series`).evaluateAll((ps) =>
    Object.fromEntries(ps.map((p) => [p.getAttribute('data-series'), p.getAttribute('data-values')!.split(',').map(Number)])));
  /** Expected values at each logged iteration (1 … last). */
  const perIteration = (f: (i: number) => number) => Array.from({ length: run.state.iteration }, (_, k) => f(k + 1));

  it('charts crossed against solved, new ground and coverage at every iteration', async () => {
    expect(await series('courses crossed and solved')).toEqual({ crossed: perIteration((i) => want.crossed[i]), solved: perIteration((i) => want.solved[i]) });
    expect(await series('new ground')).toEqual({ 'new ground': perIteration((i) => want.newGround[i]) });
    expect(await series(`coverage (cells of ${want.bins ** want.components.length})`)).toEqual({ coverage: perIteration((i) => want.cells[i].size) });
    // The curves do move: crossing comes first, solving after.
    expect(want.crossed.findIndex((v) => v > 0)).toBeLessThanOrEqual(want.solved.findIndex((v) => v > 0));
  });

  it('charts the candidates tried and those refused as too easy, counted from the event log, and no screened curve without a screen', async () => {
    // Every candidate's outcome is an event; "tried" counts all but those screened before rollouts (README, *How a run works*).
    const events = readFileSync(join(runDir, 'events.jsonl'), 'utf8').trim().split('\n').map((l) => JSON.parse(l) as { type: string; iteration: number; outcome?: string })
      .filter((e) => e.type === 'candidate');
    const upTo = (i: number, keep: (o: string) => boolean) => events.filter((e) => e.iteration <= i && keep(e.outcome!)).length;
    const got = await series('candidates (total)');
    expect(got).toEqual({ tried: perIteration((i) => upTo(i, (o) => o !== 'screened')), 'too easy': perIteration((i) => upTo(i, (o) => o === 'too-easy')) });
    expect(got.tried.at(-1)).toBe(run.state.counters.candidates);
    expect(got.tried.at(-1)).toBeGreaterThan(0);
  });

  it('states the final counts at the top', async () => {
    const last = run.state.iteration;
    const facts = await page.locator('#run-facts').textContent();
    expect(facts).toContain(`${want.crossed[last]} crossed`);
    expect(facts).toContain(`${want.solved[last]} solved`);
    expect(facts).toContain(`new ground ${want.newGround[last]}`);
    expect(facts).toContain(`coverage ${want.cells[last].size} of ${want.bins ** want.components.length} cells`);
  });

  it('draws each covered cell of the coverage map where the documented layout puts it, coloured by its hardest course', async () => {
    const last = run.state.iteration;
    const area = (await page.locator('#coverage-svg .map-area').evaluate((r) => ['x', 'y', 'width', 'height'].map((a) => Number(r.getAttribute(a)))))!;
    const cells = await page.locator('#coverage-svg .cell').evaluateAll((rs) => rs.map((r) => ({
      cell: r.getAttribute('data-cell')!, course: Number(r.getAttribute('data-course')), x: Number(r.getAttribute('x')), y: Number(r.getAttribute('y')),
      size: Number(r.getAttribute('width')), fill: getComputedStyle(r).fill,
    })));
    expect(cells.map((c) => c.cell).sort()).toEqual([...want.cells[last].keys()].sort());
    const b = want.bins;
    for (const c of cells) {
      const [g0, g1, g2, g3] = c.cell.split(',').map(Number);
      // Four components: the 1st and 3rd run across (block, cell in block), the 2nd and 4th up.
      expect((c.x - area[0]) / c.size).toBe(g0 * b + g2);
      expect((area[1] + area[3] - c.y) / c.size - 1).toBe(g1 * b + g3);
      expect(c.course).toBe(want.cells[last].get(c.cell)!.hardest);
    }
    // A harder cell is darker (sum of its RGB channels lower).
    const shade = (fill: string) => fill.match(/\d+/g)!.slice(0, 3).map(Number).reduce((a, v) => a + v, 0);
    const ranked = [...cells].sort((p, q) => want.cells[last].get(p.cell)!.difficulty - want.cells[last].get(q.cell)!.difficulty);
    for (let k = 1; k < ranked.length; k++) {
      if (want.cells[last].get(ranked[k].cell)!.difficulty > want.cells[last].get(ranked[k - 1].cell)!.difficulty) expect(shade(ranked[k].fill)).toBeLessThan(shade(ranked[k - 1].fill));
    }
    const axes = await page.locator('#coverage-svg .axis-title').allTextContents();
    expect(axes).toEqual([`across: ${want.components[0]} (blocks) › ${want.components[2]} (cells in a block); ${b} bins each`, `up: ${want.components[1]} (blocks) › ${want.components[3]} (cells in a block); ${b} bins each`]);
    expect(await page.locator('#coverage-svg .axis-bin').allTextContents()).toEqual(['0–0.25', '0.25–0.5', '0.5–0.75', '0.75–1', '0–0.25', '0.25–0.5', '0.5–0.75', '0.75–1']);
    await page.locator('#coverage-svg .cell').first().click();
    expect(await page.locator('#course-id').textContent()).toBe(String(cells[0].course));
  });

  it('marks each lineage node crossed, solved or neither by shape, and colours it by its lineage\'s dominant kind', async () => {
    const nodes = await page.locator('#lineage .node').evaluateAll((gs) => gs.map((g) => ({
      id: Number(g.getAttribute('data-course')), cls: g.getAttribute('class')!.split(' '), kind: g.getAttribute('data-kind'),
      lineage: Number(g.getAttribute('data-lineage')), shape: g.querySelector('.mark')!.localName, fill: g.querySelector('.mark')!.getAttribute('fill'),
    })));
    const shapeOf = { solved: 'polygon', crossed: 'rect', neither: 'circle' };
    for (const n of nodes) {
      const c = run.state.courses.find((x) => x.id === n.id)!;
      const mark = c.solvedAt !== null ? 'solved' : c.crossedAt !== null ? 'crossed' : 'neither';
      expect(n.cls).toContain(mark);
      expect(n.shape).toBe(shapeOf[mark]);
      expect(n.lineage).toBe(want.lineageOf.get(n.id));
      expect(n.kind).toBe(want.kindOf.get(n.lineage));
    }
    expect(new Set(nodes.map((n) => n.cls.find((k) => k in shapeOf))).size).toBeGreaterThanOrEqual(2);
    // The legend gives each lineage with its kind, in the colour its nodes have.
    const keys = await page.locator('#lineage-kinds .lineage-key').evaluateAll((ks) => ks.map((k) => ({ id: Number(k.getAttribute('data-lineage')), kind: k.getAttribute('data-kind'), colour: getComputedStyle(k.querySelector('i')!).backgroundColor })));
    expect(keys.map((k) => [k.id, k.kind])).toEqual([...want.kindOf.entries()].sort((a, b) => a[0] - b[0]));
    const hexToRgb = (h: string) => `rgb(${[1, 3, 5].map((i) => parseInt(h.slice(i, i + 2), 16)).join(', ')})`;
    for (const n of nodes) expect(hexToRgb(n.fill!)).toBe(keys.find((k) => k.id === n.lineage)!.colour);
    expect(await page.locator('#lineage-marks svg.icon').count()).toBe(3);
  });

  it('has no baseline section without a baseline.json, and no errors', async () => {
    expect(await page.locator('#baseline').count()).toBe(0);
    expect(watch.errors).toEqual([]);
    expect(watch.network).toEqual([]);
  });

  it('tabulates the direct baseline from a valid baseline.json', async () => {
    await page.goto(pathToFileURL(html.baseline).href, { waitUntil: 'load' });
    const rows = await page.$$eval('#baseline-table tr', (trs) => trs.slice(1).map((tr) => Array.from(tr.querySelectorAll('td'), (td) => td.textContent)));
    expect(rows).toEqual(baseline.rows.map((r) => [
      String(r.course), r.difficulty.toFixed(3), r.coevolved.progress.toFixed(3), r.coevolved.confirmed ? 'yes' : 'no', r.direct.median.toFixed(3),
      `${r.direct.min.toFixed(3)}–${r.direct.max.toFixed(3)}`, `${r.direct.confirmed} of ${r.direct.seeds.length}`, r.budget.toLocaleString('en-US'), r.verdict,
    ]));
    expect(await page.locator('#baseline-summary').textContent()).toBe(`Direct training was ahead on 1 of ${baseline.rows.length} courses; co-evolution was ahead on 1; even on ${baseline.rows.length - 2}.`);
    expect(watch.errors).toEqual([]);
  });

  it('writes the report without the section, with one warning naming the file and field, when baseline.json is not valid', async () => {
    expect(badReport.code).toBe(0);
    expect(badReport.stderr).toContain(`warning: Baseline ${join(runDir, 'baseline.json')} is not valid:`);
    expect(badReport.stderr).toContain('rows[0].verdict');
    expect(badReport.stderr).not.toMatch(/^\s+at /m);
    expect(readFileSync(html.bad, 'utf8')).not.toContain('id="baseline"');
    await page.goto(pathToFileURL(html.bad).href, { waitUntil: 'load' });
    expect(await page.locator('#coverage-svg').count()).toBe(1);
  });
});
