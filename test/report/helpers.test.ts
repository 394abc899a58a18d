/**
 * The test helpers themselves: the XML check must reject what XML 1.0 forbids, and the PNG
 * decoder must undo every PNG filter type, or the report tests built on them prove nothing.
 */
import { deflateSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { colourStats, decodePng, xmlProblems } from './helpers.js';

describe('xmlProblems', () => {
  it('accepts a well-formed SVG document', () => {
    const svg = '<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg"><!-- c --><title>a &amp; b &#60;</title><g a=\'1\'><rect x="0"/></g></svg>\n';
    expect(xmlProblems(svg)).toEqual([]);
  });

  // Each is not well-formed under XML 1.0 (W3C Recommendation, 5th ed.): §2.1 one root and
  // proper nesting, §3.1 quoted and unique attributes, §2.4 no raw '<' or '&' in character data.
  it.each([
    ['crossed nesting', '<a><b></a></b>'],
    ['an unclosed element', '<a><b></b>'],
    ['two roots', '<a/><b/>'],
    ['a raw ampersand in text', '<a>x & y</a>'],
    ['a raw less-than in text', '<a>x < y</a>'],
    ['an unquoted attribute', '<a x=1></a>'],
    ['a repeated attribute', '<a x="1" x="2"/>'],
    ['a raw ampersand in an attribute', '<a x="&"/>'],
    ['text after the root', '<a/>tail'],
  ])('rejects %s', (_, doc) => {
    expect(xmlProblems(doc)).not.toEqual([]);
  });
});

/** PNG chunk: length, type, data, CRC (left zero: the decoder does not check it). */
function chunk(type: string, data: Buffer): Buffer {
  const len = Buffer.alloc(4);
  len.writeUInt32BE(data.length);
  return Buffer.concat([len, Buffer.from(type, 'latin1'), data, Buffer.alloc(4)]);
}

describe('decodePng', () => {
  it('undoes each of the five filter types of the PNG specification', () => {
    // 3×5 RGB image, one row per filter type 0..4 (PNG Specification, W3C 2nd ed., §9.2),
    // filtered here by the specification's forward formulas.
    const w = 3, bpp = 3, stride = w * bpp;
    const rows = Array.from({ length: 5 }, (_, y) => Uint8Array.from({ length: stride }, (_, x) => (37 * x + 91 * y + 11 * x * y) & 0xff));
    const paeth = (a: number, b: number, c: number) => {
      const p = a + b - c, pa = Math.abs(p - a), pb = Math.abs(p - b), pc = Math.abs(p - c);
      return pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
    };
    const filtered = rows.map((row, f) => {
      const up = rows[f - 1] ?? new Uint8Array(stride);
      const out = Buffer.alloc(stride + 1);
      out[0] = f;
      for (let x = 0; x < stride; x++) {
        const a = x >= bpp ? row[x - bpp] : 0, b = up[x], c = x >= bpp ? up[x - bpp] : 0;
        out[x + 1] = (row[x] - [0, a, b, Math.floor((a + b) / 2), paeth(a, b, c)][f]) & 0xff;
      }
      return out;
    });
    const ihdr = Buffer.alloc(13);
    ihdr.writeUInt32BE(w, 0);
    ihdr.writeUInt32BE(5, 4);
    ihdr.set([8, 2, 0, 0, 0], 8);
    const png = Buffer.concat([
      Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]),
      chunk('IHDR', ihdr), chunk('IDAT', deflateSync(Buffer.concat(filtered))), chunk('IEND', Buffer.alloc(0)),
    ]);
    const img = decodePng(png);
    expect([img.width, img.height]).toEqual([3, 5]);
    const want = rows.flatMap((row) => Array.from({ length: w }, (_, x) => (row[3 * x] << 16) | (row[3 * x + 1] << 8) | row[3 * x + 2]));
    expect(Array.from(img.pixels)).toEqual(want);
    expect(colourStats(img.pixels).distinct).toBe(new Set(want).size);
  });
});
