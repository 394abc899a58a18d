import { existsSync, mkdirSync, readdirSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import type { RunContext, RunState } from '../coevo/index.js';
import { UserError } from '../core/index.js';
import { syncDir, WriteError } from '../store/index.js';
import { buildCurriculum, SCHEMA_FILE, type Only, type Order } from './curriculum.js';
import { assertCurriculum, curriculumSchemaText } from './schema.js';
import { summaryCsv } from './summary.js';

/** What an export directory holds: an existing `out` with anything else in it is not replaced. */
const EXPORT_ENTRIES = new Set(['curriculum.json', SCHEMA_FILE, 'summary.csv', 'walkers', 'body.json', 'family.json']);

/**
 * Refuses an `out` that exists and is not an earlier export: replacing it deletes what was
 * there, and `--out` pointing at a run directory (or `.`) would otherwise wipe its checkpoints.
 */
function assertReplaceable(target: string): void {
  const st = statSync(target, { throwIfNoEntry: false });
  if (!st) return;
  if (!st.isDirectory()) throw new UserError(`Export target ${target} is an existing file; expected a new directory or an earlier export: choose another --out`);
  const foreign = readdirSync(target).filter((n) => !EXPORT_ENTRIES.has(n));
  if (foreign.length > 0) {
    throw new UserError(`Export target ${target} is not an earlier export (it holds ${foreign.slice(0, 3).join(', ')}${foreign.length > 3 ? ', ...' : ''}); choose another --out or remove it`);
  }
}

/**
 * Refuses an `out` below an existing file: the nearest existing ancestor must be a directory,
 * or creating the target's parents would fail half-way with a bare ENOTDIR.
 */
function assertParentIsDirectory(target: string): void {
  for (let dir = dirname(target); ; dir = dirname(dir)) {
    let st;
    try { st = statSync(dir, { throwIfNoEntry: false }); } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'ENOTDIR') throw e; // a file further up: look there
    }
    if (st?.isDirectory()) return;
    if (st) throw new UserError(`Export target ${target} cannot be created: ${dir} is a file, not a directory; choose another --out`);
    if (dirname(dir) === dir) return;
  }
}

export interface ExportResult {
  readonly dir: string;
  readonly courses: number;
  readonly walkers: number;
}

/**
 * Writes an export directory: curriculum.json (validated against the shipped schema before
 * anything is written), its schema, summary.csv, the walkers as safetensors, and copies of the
 * body plan and terrain family. Everything goes to a temporary sibling directory first, which
 * replaces `out` only when complete: a failed export leaves no half-written files. An existing
 * `out` is replaced only when it is empty or an earlier export.
 */
export function writeExport(ctx: RunContext, state: RunState, out: string, order: Order, only: Only): ExportResult {
  const { curriculum, walkers } = buildCurriculum(ctx, state, order, only);
  assertCurriculum(curriculum, 'the export');
  const target = resolve(out);
  assertParentIsDirectory(target);
  assertReplaceable(target);
  mkdirSync(dirname(target), { recursive: true });
  const tmp = join(dirname(target), `.tmp-${basename(target)}-${process.pid}`);
  rmSync(tmp, { recursive: true, force: true });
  try {
    mkdirSync(join(tmp, 'walkers'), { recursive: true });
    writeFileSync(join(tmp, 'curriculum.json'), `${JSON.stringify(curriculum, null, 1)}\n`);
    writeFileSync(join(tmp, SCHEMA_FILE), curriculumSchemaText());
    writeFileSync(join(tmp, 'summary.csv'), summaryCsv(curriculum.courses as Parameters<typeof summaryCsv>[0], curriculum.descriptorNames as string[]));
    writeFileSync(join(tmp, 'body.json'), `${JSON.stringify(ctx.plan, null, 2)}\n`);
    writeFileSync(join(tmp, 'family.json'), `${JSON.stringify(ctx.family, null, 2)}\n`);
    for (const w of walkers) writeFileSync(join(tmp, w.file), w.bytes);
    syncDir(join(tmp, 'walkers'));
    syncDir(tmp);
    const old = `${tmp}-old`;
    if (existsSync(target)) renameSync(target, old);
    renameSync(tmp, target);
    rmSync(old, { recursive: true, force: true });
    syncDir(dirname(target));
  } catch (e) {
    if (existsSync(`${tmp}-old`) && !existsSync(target)) renameSync(`${tmp}-old`, target);
    rmSync(tmp, { recursive: true, force: true });
    throw e instanceof WriteError ? e : new WriteError(target, e as Error);
  }
  return { dir: target, courses: (curriculum.courses as unknown[]).length, walkers: walkers.length };
}
