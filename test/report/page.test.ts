/**
 * End to end: the smoke run, `cairn report` on it opened in headless chromium (offline, every
 * network request refused), and `cairn render`. Debian's /usr/bin/chromium is required, not
 * skipped: `npm test` installs it first (test/system-packages.mjs). The smoke run takes most of the time.
 * The DOM types are for the callbacks that page.evaluate runs inside the browser.
 */
/// <reference lib="dom" />
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ReportData } from '../../src/report/index.js';
import { openRun, type OpenedRun } from '../../src/store/index.js';
import { cairn, colourStats, decodePng, ensureBuilt, openPage, ROOT, watchPage, xmlProblems, type PageWatch } from './helpers.js';

const tmp = mkdtempSync(join(tmpdir(), 'cairn-report-'));
const runDir = join(tmp, 'run');
const htmlFile = join(tmp, 'report.html');
const svgFile = join(tmp, 'course-0.svg');
let report: ReturnType<typeof cairn>;
let render: ReturnType<typeof cairn>;
let status: { iteration: number; admitted: number };
let run: OpenedRun;

beforeAll(() => {
  ensureBuilt();
  const r = cairn('run', join(ROOT, 'runs/smoke.json'), '--out', runDir, '--quiet', '--workers', '2');
  if (r.code !== 0) throw new Error(`smoke run failed (${r.code}): ${r.stderr}`);
  report = cairn('report', runDir, '--out', htmlFile, '--quiet');
  render = cairn('render', runDir, '--course', '0', '--out', svgFile);
  status = JSON.parse(cairn('status', runDir, '--json').stdout) as typeof status;
  run = openRun(runDir);
}, 240_000);
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

/** The data the page embeds, read back from its script element. */
function embedded(): ReportData & { initialCourse: number } {
  const m = /<script id="report-data" type="application\/json">([\s\S]*?)<\/script>/.exec(readFileSync(htmlFile, 'utf8'));
  return JSON.parse(m![1]) as ReportData & { initialCourse: number };
}

describe('cairn report and render on the smoke run', () => {
  it('writes the report, quietly, and says where', () => {
    expect(report.code).toBe(0);
    expect(report.stderr).toBe('');
    expect(report.stdout).toContain(htmlFile);
    // The starting course plus every admitted one, as status counts them.
    expect(run.state.courses).toHaveLength(status.admitted + 1);
    expect(embedded().courses.map((c) => c.id)).toEqual(run.state.courses.map((c) => c.id));
  });

  it('renders course 0 as a well-formed SVG', () => {
    expect(render.code).toBe(0);
    expect(render.stdout).toMatch(/^course 0: progress \d\.\d{3}; picture written to /);
    expect(xmlProblems(readFileSync(svgFile, 'utf8'))).toEqual([]);
  });

  it('refuses an unknown course with exit 2, naming the ids the run has', () => {
    const ids = run.state.courses.map((c) => c.id);
    const bad = join(tmp, 'bad.svg');
    const r = cairn('render', runDir, '--course', String(Math.max(...ids) + 100), '--out', bad);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(`it has ${ids.join(', ')}`);
    expect(r.stderr).not.toMatch(/^\s+at /m); // one message, no stack trace
    expect(existsSync(bad)).toBe(false);
  });
});

describe('the report in chromium', () => {
  let browser: Browser;
  let page: Page;
  let watch: PageWatch;
  const frameOf = () => page.locator('#course-svg').getAttribute('data-frame').then(Number);
  const nodeOf = (id: number) => page.locator(`#lineage .node[data-course="${id}"]`);

  beforeAll(async () => {
    ({ browser, page, watch } = await openPage(htmlFile));
  }, 60_000);
  afterAll(async () => { await browser?.close(); });

  it('has a watch that would notice a network request and a console error', async () => {
    const probe = join(tmp, 'probe.html');
    writeFileSync(probe, '<!doctype html><img src="http://example.invalid/x.png"><script>console.error("probe")</script>');
    const p = await browser.newPage();
    const w = await watchPage(p);
    await p.goto(pathToFileURL(probe).href, { waitUntil: 'load' });
    await p.close();
    expect(w.network).toEqual(['http://example.invalid/x.png']);
    expect(w.errors.some((e) => e.includes('probe'))).toBe(true);
  });

  it('loads offline with no errors', () => {
    expect(watch.network).toEqual([]);
    expect(watch.errors).toEqual([]);
  });

  it('draws nine charts with a point per logged iteration', async () => {
    expect(await page.locator('#curves svg.chart').count()).toBe(9);
    const counts = await page.locator('#curves svg.chart').evaluateAll((svgs) =>
      svgs.map((s) => Array.from(s.querySelectorAll('polyline'), (p) => p.points.numberOfItems)));
    for (const c of counts) {
      expect(c.length).toBeGreaterThan(0);
      for (const k of c) expect(k).toBe(status.iteration);
    }
  });

  it('draws a lineage node per course and an edge per course with a parent', async () => {
    const courses = run.state.courses;
    expect(await page.locator('#lineage .node').count()).toBe(status.admitted + 1);
    expect(await page.locator('#lineage .edge').count()).toBe(courses.filter((c) => c.parent !== null).length);
    const ids = await page.locator('#lineage .node').evaluateAll((g) => g.map((e) => Number(e.getAttribute('data-course'))));
    expect(ids.sort((a, b) => a - b)).toEqual(courses.map((c) => c.id).sort((a, b) => a - b));
  });

  it('places a map point per course and moves them when the axes change', async () => {
    const points = () => page.locator('#map-svg .map-point').evaluateAll((ps) =>
      ps.map((p) => ({ id: Number(p.getAttribute('data-course')), cx: Number(p.getAttribute('cx')), cy: Number(p.getAttribute('cy')) })));
    const before = await points();
    expect(before).toHaveLength(run.state.courses.length);
    await page.selectOption('#map-x', { label: 'admitted at' });
    const after = await points();
    expect(after).toHaveLength(before.length);
    expect(after.map((p) => p.cx)).not.toEqual(before.map((p) => p.cx));
    // Along "admitted at", a later course lies further right (SVG x grows rightwards).
    const at = new Map(run.state.courses.map((c) => [c.id, c.admittedAt]));
    for (const p of after) for (const q of after) if (at.get(p.id)! < at.get(q.id)!) expect(p.cx).toBeLessThan(q.cx);
    await page.selectOption('#map-y', { label: 'admitted at' });
    expect((await points()).map((p) => p.cy)).not.toEqual(after.map((p) => p.cy));
  });

  it('shows the course with its ground and every walker part', async () => {
    const segs = run.inputs.plan.segments;
    expect(await page.locator('#course-svg polygon.ground').count()).toBe(1);
    expect(await page.locator('#course-svg .torso').count()).toBe(1);
    expect(await page.locator('#course-svg .foot').count()).toBe(segs.filter((s) => s.foot).length);
    expect(await page.locator('#course-svg .limb, #course-svg .foot').count()).toBe(segs.length - 1);
    expect(await page.locator('#course-id').textContent()).toBe(String(embedded().initialCourse));
  });

  it('switches to a course clicked in the lineage', async () => {
    const shown = Number(await page.locator('#course-id').textContent());
    for (const c of run.state.courses.filter((c) => c.id !== shown)) {
      await nodeOf(c.id).click();
      expect(await page.locator('#course-id').textContent()).toBe(String(c.id));
      expect(await nodeOf(c.id).getAttribute('class')).toMatch(/\bselected\b/);
      expect(await page.locator('#lineage .node.selected').count()).toBe(1);
      expect(await frameOf()).toBe(0);
      const box = (await page.locator('#course-svg').getAttribute('viewBox'))!.split(' ').map(Number);
      expect(box.every((v) => Number.isFinite(v)) && box[2] > 0 && box[3] > 0).toBe(true);
    }
  });

  it('plays the replay with the play button and pauses it with a second press', async () => {
    // The course with the longest replay, so playing cannot reach its end during the test.
    const longest = [...embedded().courses].sort((a, b) => b.replay.frames.length - a.replay.frames.length)[0];
    expect(longest.replay.frames.length).toBeGreaterThan(20);
    await nodeOf(longest.id).click();
    const start = await frameOf();
    await page.click('#play');
    await page.waitForFunction((f) => Number(document.getElementById('course-svg')!.getAttribute('data-frame')) >= f + 3, start, { timeout: 10_000 });
    expect(await page.locator('#play').textContent()).toBe('Pause');
    await page.click('#play');
    expect(await page.locator('#play').textContent()).toBe('Play');
    const paused = await frameOf();
    await page.waitForTimeout(600); // six ticks of the replay's 100 ms timer
    expect(await frameOf()).toBe(paused);
  });

  it('sets the frame from the scrubber and poses the walker from that frame', async () => {
    const shown = Number(await page.locator('#course-id').textContent());
    const frames = embedded().courses.find((c) => c.id === shown)!.replay.frames;
    await page.locator('#scrub').fill('7');
    expect(await frameOf()).toBe(7);
    const t = await page.locator('#course-svg .torso').getAttribute('transform');
    const [, x, y] = /translate\(([-\d.e]+) ([-\d.e]+)\)/.exec(t!)!.map(Number);
    expect([x, y]).toEqual([frames[7][0], frames[7][1]]);
    // Dragging: a click three quarters along the slider moves the frame there.
    const box = (await page.locator('#scrub').boundingBox())!;
    await page.mouse.click(box.x + box.width * 0.75, box.y + box.height / 2);
    const f = await frameOf();
    expect(f).toBe(Number(await page.locator('#scrub').inputValue()));
    expect(Math.abs(f - 0.75 * (frames.length - 1))).toBeLessThan(0.1 * frames.length);
  });

  it('paints a picture, not a blank page', async () => {
    const shot = decodePng(await page.screenshot({ fullPage: true }));
    const size = await page.evaluate(() => [document.documentElement.scrollWidth, document.documentElement.scrollHeight]);
    expect([shot.width, shot.height]).toEqual(size);
    const { distinct, commonest } = colourStats(shot.pixels);
    expect(distinct).toBeGreaterThanOrEqual(20);
    // The page's background colour covers the most pixels: also a check on the PNG decoding.
    const bg = await page.evaluate(() => getComputedStyle(document.body).backgroundColor);
    expect(bg).toBe(`rgb(${commonest >> 16}, ${(commonest >> 8) & 0xff}, ${commonest & 0xff})`);
  });

  it('made no network request and logged no error through all of that', () => {
    expect(watch.network).toEqual([]);
    expect(watch.errors).toEqual([]);
  });

  it('opens the rendered SVG with the ground and a group of walker parts per pose', async () => {
    const svgPage = await browser.newPage();
    const w = await watchPage(svgPage);
    await svgPage.goto(pathToFileURL(svgFile).href, { waitUntil: 'load' });
    const seen = await svgPage.evaluate(() => ({
      root: `${document.documentElement.namespaceURI} ${document.documentElement.localName}`,
      parseErrors: document.getElementsByTagName('parsererror').length,
      ground: document.querySelectorAll('polygon.ground').length,
      poses: Array.from(document.querySelectorAll('g[opacity]'), (g) => g.querySelectorAll('rect, circle').length),
    }));
    expect(seen.root).toBe('http://www.w3.org/2000/svg svg');
    expect(seen.parseErrors).toBe(0);
    expect(seen.ground).toBe(1);
    expect(seen.poses.length).toBeGreaterThanOrEqual(3);
    for (const k of seen.poses) expect(k).toBe(run.inputs.plan.segments.length);
    expect(w.errors).toEqual([]);
    expect(w.network).toEqual([]);
    await svgPage.close();
  });
});
