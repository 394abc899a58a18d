/**
 * summary.csv against RFC 4180 (Common Format and MIME Type for CSV Files), section 2: records
 * end in CRLF (rule 1, 2); an optional header row first (rule 3); every record has the same
 * number of fields (rule 4); fields holding commas, double quotes, CR or LF are enclosed in
 * double quotes (rule 6); a double quote inside a quoted field is written as two (rule 7).
 * The parser below follows that grammar strictly and is the test's own, not cairn's.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { csvField, snakeCase, toCsv } from '../../src/export/index.js';
import { cleanup, exportRun, readJson, smokeRun, tempDir } from './helpers.js';

/** Parses RFC 4180 text into records; throws on anything the grammar does not allow (bare CR or LF, stray quotes, a missing final CRLF). */
function parseCsv(text: string): string[][] {
  const records: string[][] = [];
  let record: string[] = [];
  let i = 0;
  while (i < text.length) {
    let field = '';
    if (text[i] === '"') {
      for (i++; ; i++) {
        if (i >= text.length) throw new Error('unterminated quoted field');
        if (text[i] === '"') {
          if (text[i + 1] === '"') { field += '"'; i++; } else { i++; break; }
        } else field += text[i];
      }
    } else {
      while (i < text.length && !',\r\n'.includes(text[i])) {
        if (text[i] === '"') throw new Error(`double quote inside an unquoted field at ${i}`);
        field += text[i++];
      }
    }
    record.push(field);
    if (text[i] === ',') { i++; continue; }
    if (text.startsWith('\r\n', i)) { records.push(record); record = []; i += 2; continue; }
    throw new Error(`expected a comma or CRLF at ${i}, found ${JSON.stringify(text.slice(i, i + 2) || 'end of text')}`);
  }
  if (record.length > 0) throw new Error('last record does not end in CRLF');
  return records;
}

describe('csvField and toCsv (RFC 4180)', () => {
  it('quotes exactly the fields that need it and doubles inner quotes', () => {
    expect(csvField('plain text')).toBe('plain text');
    expect(csvField(0.125)).toBe('0.125');
    expect(csvField(null)).toBe('');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('two\r\nlines')).toBe('"two\r\nlines"');
    expect(csvField('cr\ronly')).toBe('"cr\ronly"');
    expect(csvField('lf\nonly')).toBe('"lf\nonly"');
    expect(csvField('"')).toBe('""""');
  });

  it('writes a header and CRLF-terminated records that a strict parser reads back unchanged', () => {
    const header = ['name', 'note, with comma', 'n'];
    const rows = [['x', 'say "hi"', 1], ['line\nbreak', '', null], [' spaced ', '"quoted"', -2.5e-7], ['', ',', 'é']];
    const text = toCsv(header, rows);
    expect(text.endsWith('\r\n')).toBe(true);
    expect(parseCsv(text)).toEqual([header, ...rows.map((r) => r.map((v) => (v === null ? '' : String(v))))]);
  });

  it('round-trips arbitrary strings, commas, quotes and line breaks included', () => {
    const cell = fc.oneof(fc.string(), fc.constantFrom(',', '"', '\r', '\n', '\r\n', '""', ' , '));
    fc.assert(fc.property(fc.integer({ min: 1, max: 5 }).chain((n) => fc.tuple(
      fc.array(cell, { minLength: n, maxLength: n }), fc.array(fc.array(cell, { minLength: n, maxLength: n }), { maxLength: 5 }),
    )), ([header, rows]) => {
      // A lone empty field is an empty line: a record with one empty field. Keep it unambiguous.
      fc.pre(header.length > 1 || header[0] !== '');
      fc.pre(rows.every((r) => r.length > 1 || r[0] !== ''));
      expect(parseCsv(toCsv(header, rows))).toEqual([header, ...rows]);
    }), { numRuns: 200 });
  });
});

describe('summary.csv of an export', () => {
  let records: string[][];
  let text: string;
  let courses: Record<string, any>[]; // parsed curriculum entries

  let dir: string;

  beforeAll(() => {
    dir = join(tempDir('csv'), 'exp');
    exportRun(smokeRun(), dir, '--order', 'difficulty');
    text = readFileSync(join(dir, 'summary.csv'), 'utf8');
    records = parseCsv(text);
    courses = readJson<{ courses: Record<string, any>[] }>(join(dir, 'curriculum.json')).courses;
  }, 600_000);
  afterAll(cleanup);

  it('uses CRLF line ends only, a header row first and the same number of fields in every record', () => {
    expect(text.replace(/\r\n/g, '')).not.toMatch(/[\r\n]/);
    expect(records[0].slice(0, 2)).toEqual(['order', 'course_id']);
    expect(new Set(records.map((r) => r.length)).size).toBe(1);
  });

  it('writes every header in one style, snake case, the descriptor names included', () => {
    for (const h of records[0]) expect(h).toMatch(/^[a-z]+(_[a-z]+)*$/);
    const names = readJson<{ descriptorNames: string[] }>(join(dir, 'curriculum.json')).descriptorNames;
    expect(names).toContain('gapWidth');
    expect(records[0]).toContain('gap_width');
    expect(records[0].filter((h) => names.map(snakeCase).includes(h))).toHaveLength(names.length);
  });

  it('has one row per course, in curriculum order, with the exported figures', () => {
    const col = (name: string): number => records[0].indexOf(name);
    const rows = records.slice(1);
    expect(rows.map((r) => Number(r[col('course_id')]))).toEqual(courses.map((c) => c.id));
    expect(rows.map((r) => r[col('order')])).toEqual(courses.map((_, i) => String(i + 1)));
    rows.forEach((r, i) => {
      const c = courses[i];
      expect(Number(r[col('difficulty')])).toBe(c.difficulty);
      expect(Number(r[col('best_progress')])).toBe(c.best.progress);
      expect(r[col('parent_id')]).toBe(c.parent === null ? '' : String(c.parent));
      expect(r[col('kinds')]).toBe(c.genome.features.map((f: { kind: string }) => f.kind).join(' '));
      expect(r[col('solved_at')]).toBe(c.solvedAt === null ? '' : String(c.solvedAt));
      expect(r[col('crossed_at')]).toBe(c.crossedAt === null ? '' : String(c.crossedAt));
      expect([Number(r[col('rollouts')]), Number(r[col('lineage_rollouts')])]).toEqual([c.rollouts, c.lineageRollouts]);
    });
  });
});
