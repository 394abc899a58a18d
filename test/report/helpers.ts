/**
 * Shared pieces of the report tests: the command line in a child process, a small XML
 * well-formedness check, a PNG decoder for counting a screenshot's colours, and launching
 * Debian's chromium through playwright-core with every network request refused.
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { inflateSync } from 'node:zlib';
import { chromium, type Browser, type Page } from 'playwright-core';
import { ROOT } from '../pool/helpers.js';

export { ensureBuilt, ROOT } from '../pool/helpers.js';

export const CLI = join(ROOT, 'dist/cli/main.js');
export const CHROMIUM = '/usr/bin/chromium';

/** Runs the compiled command line; never throws on a non-zero exit. */
export function cairn(...args: string[]): { code: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd: ROOT, encoding: 'utf8', timeout: 300_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

// Character data and attribute values may hold '&' only as the start of an entity or
// character reference (XML 1.0, W3C Recommendation 5th ed., §2.4 and §4.1).
const BAD_AMP = /&(?!(?:amp|lt|gt|quot|apos|#\d+|#x[0-9a-fA-F]+);)/;
const NAME = /^[A-Za-z_:][\w.:-]*/;
const ATTR = /^\s+([A-Za-z_:][\w.:-]*)\s*=\s*(?:"([^"]*)"|'([^']*)')/;

/** Reads one start tag at `s` (just after '<'); returns its name, attribute problems, end and self-closing flag. */
function startTag(s: string): { name: string; len: number; empty: boolean; problems: string[] } | null {
  const name = NAME.exec(s)?.[0];
  if (!name) return null;
  const problems: string[] = [];
  const seen = new Set<string>();
  let i = name.length;
  for (let m = ATTR.exec(s.slice(i)); m; m = ATTR.exec(s.slice(i))) {
    const value = m[2] ?? m[3];
    if (seen.has(m[1])) problems.push(`attribute ${m[1]} repeated on <${name}>`); // §3.1 Unique Att Spec
    if (value.includes('<') || BAD_AMP.test(value)) problems.push(`attribute ${m[1]} of <${name}> holds a raw < or &`);
    seen.add(m[1]);
    i += m[0].length;
  }
  const close = /^\s*(\/?)>/.exec(s.slice(i));
  if (!close) return { name, len: i, empty: false, problems: [...problems, `<${name}> is not closed properly`] };
  return { name, len: i + close[0].length, empty: close[1] === '/', problems };
}

/**
 * Problems that make `text` not a well-formed XML document (XML 1.0 §2.1: one root element,
 * properly nested start and end tags, §3.1 quoted unique attributes, §2.4 escaped '<' and '&').
 * Covers what our SVG writers emit: declarations, comments, elements, attributes, text.
 */
export function xmlProblems(text: string): string[] {
  const problems: string[] = [];
  const open: string[] = [];
  let roots = 0;
  let i = 0;
  while (i < text.length) {
    const lt = text.indexOf('<', i);
    const chars = text.slice(i, lt < 0 ? text.length : lt);
    if (BAD_AMP.test(chars)) problems.push(`raw & in text near ${JSON.stringify(chars.slice(0, 40))}`);
    if (open.length === 0 && chars.trim() !== '') problems.push(`text outside the root element: ${JSON.stringify(chars.slice(0, 40))}`);
    if (lt < 0) break;
    const rest = text.slice(lt + 1);
    const skip = /^\?[\s\S]*?\?>|^!--[\s\S]*?-->|^!\[CDATA\[[\s\S]*?\]\]>/.exec(rest);
    if (skip) { i = lt + 1 + skip[0].length; continue; }
    const end = /^\/([A-Za-z_:][\w.:-]*)\s*>/.exec(rest);
    if (end) {
      const top = open.pop();
      if (top !== end[1]) problems.push(`</${end[1]}> closes <${top ?? 'nothing'}>`);
      i = lt + 1 + end[0].length;
      continue;
    }
    const tag = startTag(rest);
    if (!tag) { problems.push(`raw < in text at offset ${lt}`); i = lt + 1; continue; }
    problems.push(...tag.problems);
    if (open.length === 0) roots++;
    if (!tag.empty) open.push(tag.name);
    i = lt + 1 + tag.len;
  }
  if (open.length > 0) problems.push(`unclosed elements: ${open.join(' > ')}`);
  if (roots !== 1) problems.push(`${roots} root elements, expected 1`);
  return problems;
}

/** The Paeth predictor (PNG Specification, W3C, 2nd ed., §9.4). */
function paeth(a: number, b: number, c: number): number {
  const p = a + b - c;
  const pa = Math.abs(p - a);
  const pb = Math.abs(p - b);
  const pc = Math.abs(p - c);
  return pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
}

/**
 * Decodes an 8-bit, non-interlaced RGB or RGBA PNG (what a browser screenshot is) into its
 * pixels as 0xRRGGBB numbers: chunks and IHDR per the PNG Specification (W3C, 2nd ed., §5, §11.2.2),
 * IDAT data concatenated and inflated (zlib), scanlines un-filtered per §9.2. CRCs are not checked.
 */
export function decodePng(png: Buffer): { width: number; height: number; pixels: Uint32Array } {
  if (!png.subarray(0, 8).equals(Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]))) throw new Error('not a PNG');
  let width = 0, height = 0, bpp = 0;
  const idat: Buffer[] = [];
  for (let at = 8; at < png.length;) {
    const len = png.readUInt32BE(at);
    const type = png.toString('latin1', at + 4, at + 8);
    const data = png.subarray(at + 8, at + 8 + len);
    if (type === 'IHDR') {
      width = data.readUInt32BE(0);
      height = data.readUInt32BE(4);
      const [depth, colour, , , interlace] = data.subarray(8, 13);
      if (depth !== 8 || (colour !== 2 && colour !== 6) || interlace !== 0) throw new Error(`unsupported PNG: depth ${depth}, colour type ${colour}, interlace ${interlace}`);
      bpp = colour === 6 ? 4 : 3;
    } else if (type === 'IDAT') idat.push(data);
    at += 12 + len;
  }
  const raw = inflateSync(Buffer.concat(idat));
  const stride = width * bpp;
  const cur = new Uint8Array(stride);
  let prev = new Uint8Array(stride);
  const pixels = new Uint32Array(width * height);
  for (let y = 0; y < height; y++) {
    const filter = raw[y * (stride + 1)];
    const line = raw.subarray(y * (stride + 1) + 1, (y + 1) * (stride + 1));
    for (let x = 0; x < stride; x++) {
      const a = x >= bpp ? cur[x - bpp] : 0;
      const b = prev[x];
      const c = x >= bpp ? prev[x - bpp] : 0;
      const pred = [0, a, b, (a + b) >> 1, paeth(a, b, c)][filter];
      if (pred === undefined) throw new Error(`bad PNG filter type ${filter} on row ${y}`);
      cur[x] = (line[x] + pred) & 0xff;
    }
    for (let x = 0; x < width; x++) pixels[y * width + x] = (cur[x * bpp] << 16) | (cur[x * bpp + 1] << 8) | cur[x * bpp + 2];
    prev = Uint8Array.from(cur);
  }
  return { width, height, pixels };
}

/** Distinct colours of a pixel array, with the most frequent one. */
export function colourStats(pixels: Uint32Array): { distinct: number; commonest: number } {
  const counts = new Map<number, number>();
  for (const p of pixels) counts.set(p, (counts.get(p) ?? 0) + 1);
  let commonest = 0, best = -1;
  for (const [c, k] of counts) if (k > best) { best = k; commonest = c; }
  return { distinct: counts.size, commonest };
}

/** A headless chromium (Debian's build, driven by playwright-core). */
export function launchChromium(): Promise<Browser> {
  return chromium.launch({
    executablePath: CHROMIUM,
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
  });
}

/** What a page did wrong while it was watched: console errors, uncaught errors, non-file requests. */
export interface PageWatch { readonly errors: string[]; readonly network: string[] }

/**
 * Watches `page` for console errors and uncaught exceptions, and aborts every request that
 * is not for a file:// URL, recording it: a self-contained page makes none.
 */
export async function watchPage(page: Page): Promise<PageWatch> {
  const w: PageWatch = { errors: [], network: [] };
  page.on('console', (m) => { if (m.type() === 'error') w.errors.push(`console: ${m.text()}`); });
  page.on('pageerror', (e) => w.errors.push(`page: ${e.message}`));
  await page.route('**', async (route) => {
    const url = route.request().url();
    if (url.startsWith('file:')) return route.continue();
    w.network.push(url);
    return route.abort();
  });
  return w;
}

/** A headless chromium with one watched page (1200 × 900) open at a local file. */
export async function openPage(file: string): Promise<{ browser: Browser; page: Page; watch: PageWatch }> {
  const browser = await launchChromium();
  const page = await browser.newPage({ viewport: { width: 1200, height: 900 } });
  const watch = await watchPage(page);
  await page.goto(pathToFileURL(file).href, { waitUntil: 'load' });
  return { browser, page, watch };
}
