/**
 * A seed sweep (`cairn run RECIPE --seeds 1-3`) and the comparison page (`cairn report RUN...`)
 * opened in headless chromium (Debian's, which npm test checks for first): every run's curves,
 * the median and range across runs, and a table of final figures matching each run's status.
 */
/// <reference lib="dom" />
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { median } from '../../src/core/index.js';
import { cairn, ensureBuilt, openPage, ROOT, xmlProblems, type PageWatch } from './helpers.js';

const tmp = mkdtempSync(join(tmpdir(), 'cairn-compare-'));
const base = join(tmp, 'smoke');
const runs = [1, 2, 3].map((s) => `${base}-s${s}`);
const html = join(tmp, 'compare.html');
interface Status { iteration: number; admitted: number; crossed: number; solved: number; newGround: number; coverage: number; fingerprint: string }
let statuses: Status[] = [];
const SMOKE = join(ROOT, 'runs/smoke.json');

beforeAll(() => {
  ensureBuilt();
  const sweep = cairn('run', SMOKE, '--seeds', '1-3', '--out', base, '--iterations', '3', '--quiet', '--workers', '2');
  if (sweep.code !== 0) throw new Error(`sweep failed (${sweep.code}): ${sweep.stderr}`);
  // Given again with a higher target, the sweep resumes its existing members: the runs end at different lengths.
  const more = cairn('run', SMOKE, '--seeds', '1', '--out', base, '--iterations', '5', '--quiet', '--workers', '2');
  if (more.code !== 0) throw new Error(`resumed sweep failed (${more.code}): ${more.stderr}`);
  statuses = runs.map((d) => JSON.parse(cairn('status', d, '--json').stdout) as Status);
  const r = cairn('report', ...runs, '--out', html);
  if (r.code !== 0) throw new Error(`report failed (${r.code}): ${r.stderr}`);
}, 300_000);
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

describe('a seed sweep', () => {
  it('runs each seed into its own sibling directory, each an ordinary run that reaches a plain run\'s fingerprint', () => {
    expect(statuses.map((s) => s.iteration)).toEqual([5, 3, 3]);
    expect(new Set(statuses.map((s) => s.fingerprint)).size).toBe(3);
    const plain = join(tmp, 'plain-s2');
    expect(cairn('run', SMOKE, '--seed', '2', '--out', plain, '--iterations', '3', '--quiet', '--workers', '0').code).toBe(0);
    expect((JSON.parse(cairn('status', plain, '--json').stdout) as Status).fingerprint).toBe(statuses[1].fingerprint);
  }, 120_000);

  it('refuses --seed with --seeds and a malformed list, writing nothing', () => {
    for (const args of [['--seeds', '1-3', '--seed', '4'], ['--seeds', '3-1'], ['--seeds', '1,1']]) {
      const out = join(tmp, 'refused');
      const r = cairn('run', SMOKE, '--out', out, ...args);
      expect(r.code).toBe(2);
      expect(r.stderr).not.toMatch(/^\s+at /m);
      expect(existsSync(`${out}-s1`) || existsSync(`${out}-s3`) || existsSync(out)).toBe(false);
    }
  });
});

describe('the comparison page in chromium', () => {
  let browser: Browser;
  let page: Page;
  let watch: PageWatch;

  beforeAll(async () => {
    ({ browser, page, watch } = await openPage(html));
  }, 60_000);
  afterAll(async () => { await browser?.close(); });

  it('is well-formed and self-contained', () => {
    expect(watch.errors).toEqual([]);
    expect(watch.network).toEqual([]);
    const svgs = readFileSync(html, 'utf8').match(/<svg[\s\S]*?<\/svg>/g)!;
    for (const s of svgs) expect(xmlProblems(s)).toEqual([]);
  });

  it('draws every run\'s curve, with one point per logged iteration, in every chart', async () => {
    const charts = await page.$$eval('svg.chart', (els) => els.map((svg) => ({
      title: svg.getAttribute('aria-label'),
      lines: Array.from(svg.querySelectorAll('polyline.series')).map((p) => ({ name: p.getAttribute('data-series'), points: p.getAttribute('points')!.trim().split(/\s+/).length, width: (p as SVGPolylineElement).getBoundingClientRect().width })),
      bands: svg.querySelectorAll('polygon.band').length,
    })));
    expect(charts.map((c) => c.title)).toEqual(expect.arrayContaining(['courses crossed', 'new ground', 'coverage (cells holding a solved course)']));
    for (const c of charts) {
      expect(c.lines.map((l) => l.name)).toEqual(['smoke-s1', 'smoke-s2', 'smoke-s3', 'median']);
      // metrics.jsonl has one line per iteration from 1 to the run's last.
      expect(c.lines.map((l) => l.points)).toEqual([5, 3, 3, 5]);
      expect(c.bands).toBe(1);
      // Visible: every curve spans some width on screen.
      for (const l of c.lines) expect(l.width).toBeGreaterThan(10);
    }
  });

  it('plots each run\'s crossed, new ground and coverage figures from its metrics log', async () => {
    const values = await page.$$eval('svg.chart', (els) => Object.fromEntries(els.map((svg) => [svg.getAttribute('aria-label'),
      Object.fromEntries(Array.from(svg.querySelectorAll('polyline.series'), (p) => [p.getAttribute('data-series'), p.getAttribute('data-values')!.split(',').map(Number)]))])));
    runs.forEach((dir, k) => {
      const log = readFileSync(join(dir, 'metrics.jsonl'), 'utf8').trim().split('\n').map((l) => JSON.parse(l) as Status);
      expect(values['courses crossed'][`smoke-s${k + 1}`]).toEqual(log.map((m) => m.crossed));
      expect(values['new ground'][`smoke-s${k + 1}`]).toEqual(log.map((m) => m.newGround));
      expect(values['coverage (cells holding a solved course)'][`smoke-s${k + 1}`]).toEqual(log.map((m) => m.coverage));
      expect(log.at(-1)!.crossed).toBe(statuses[k].crossed);
    });
  });

  it('tabulates each run\'s final figures as its status gives them, and their median', async () => {
    const rows = await page.$$eval('#finals tr', (trs) => trs.map((tr) => Array.from(tr.querySelectorAll('td,th')).map((c) => c.textContent ?? '')));
    const head = rows[0];
    const col = (name: string) => head.indexOf(name);
    expect(rows.slice(1, 4).map((r) => r[0])).toEqual(['smoke-s1', 'smoke-s2', 'smoke-s3']);
    rows.slice(1, 4).forEach((r, k) => {
      expect(Number(r[col('iteration')])).toBe(statuses[k].iteration);
      expect(Number(r[col('admitted')])).toBe(statuses[k].admitted);
      expect(Number(r[col('crossed')])).toBe(statuses[k].crossed);
      expect(Number(r[col('solved')])).toBe(statuses[k].solved);
      expect(Number(r[col('new ground')])).toBe(statuses[k].newGround);
      expect(Number(r[col('coverage')])).toBe(statuses[k].coverage);
      expect(r[col('fingerprint')]).toBe(`${statuses[k].fingerprint.slice(0, 16)}…`);
      // Wall time: every invocation's seconds from sessions.jsonl (s1 was run twice: the sweep, then to 5).
      const sessions = readFileSync(join(runs[k], 'sessions.jsonl'), 'utf8').trim().split('\n').map((l) => JSON.parse(l) as { seconds: number; from: number; to: number });
      expect(sessions.length).toBe(k === 0 ? 2 : 1);
      expect(sessions[sessions.length - 1].to).toBe(statuses[k].iteration);
      expect(r[col('wall time (min)')]).toBe((sessions.reduce((a, x) => a + x.seconds, 0) / 60).toFixed(1));
    });
    expect(rows[4][0]).toBe('median');
    expect(Number(rows[4][col('admitted')])).toBe(median(statuses.map((s) => s.admitted)));
  });
});
