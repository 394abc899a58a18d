/**
 * Shared pieces of the export tests: the command line in a child process, one smoke run shared
 * by every test file (it is the slow part), exports of it, a run variant with solved courses,
 * and Debian's Python (with NumPy and jsonschema) as an independent reader of the exported files.
 */
import { execFile, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { cpSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, renameSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { CourseRecord, RunState } from '../../src/coevo/index.js';
import { openRun, processAlive, writeCheckpoint } from '../../src/store/index.js';
import { ensureBuilt, ROOT } from '../pool/helpers.js';

export { ensureBuilt, ROOT };
export const CLI = join(ROOT, 'dist/cli/main.js');
export const SMOKE = join(ROOT, 'runs/smoke.json');
/** Debian's interpreter, where CI installs python3-numpy and python3-jsonschema (not a pyenv one on PATH). */
export const PYTHON = '/usr/bin/python3';
export const READ_WALKER_PY = join(ROOT, 'test/fixtures/read_walker.py');

export interface Ran { readonly code: number | null; readonly stdout: string; readonly stderr: string }

/** `cairn ...args` with the compiled CLI in a child process. */
export function cairn(args: readonly string[], cwd = ROOT): Ran {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd, encoding: 'utf8', timeout: 600_000, env: { ...process.env, NO_COLOR: '1' } });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Like {@link cairn}, without blocking: several short commands can share the cores. */
export function cairnAsync(args: readonly string[], cwd = ROOT): Promise<Ran> {
  return new Promise((done) => {
    execFile(process.execPath, [CLI, ...args], { cwd, encoding: 'utf8', timeout: 600_000, env: { ...process.env, NO_COLOR: '1' } }, (err, stdout, stderr) => {
      const code = err ? (typeof err.code === 'number' ? err.code : null) : 0;
      done({ code, stdout, stderr });
    });
  });
}

/** Runs `/usr/bin/python3 args...` with `input` on stdin; throws with its stderr when it fails. */
export function python(args: readonly string[], input = ''): string {
  const r = spawnSync(PYTHON, [...args], { input, encoding: 'utf8', timeout: 120_000, maxBuffer: 64 * 1024 * 1024 });
  if (r.error) throw new Error(`${PYTHON} could not run (${r.error.message}); install python3-numpy and python3-jsonschema`);
  if (r.status !== 0) throw new Error(`${PYTHON} ${args.join(' ')} exited ${r.status}:\n${r.stderr}`);
  return r.stdout;
}

/** A fresh temporary directory; `cleanup` removes every one made by this test file. */
const made: string[] = [];
export function tempDir(label: string): string {
  const d = mkdtempSync(join(tmpdir(), `cairn-export-${label}-`));
  made.push(d);
  return d;
}
export function cleanup(): void {
  for (const d of made.splice(0)) rmSync(d, { recursive: true, force: true });
}

export function readJson<T = Record<string, unknown>>(path: string): T {
  return JSON.parse(readFileSync(path, 'utf8')) as T;
}

function sleep(ms: number): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

/**
 * The run directory of `cairn run runs/smoke.json --quiet --workers 2`, made once per vitest
 * invocation and shared by its test files. They run in child processes of one vitest process
 * (vitest.config.ts: pool 'forks'), so the directory is keyed by that parent's pid; the first
 * file to get here runs it under a lock directory while the others wait. Directories left by
 * vitest processes that have ended are removed. Tests must not write into it (copy it first).
 */
export function smokeRun(): string {
  ensureBuilt();
  const prefix = `cairn-export-smoke-${createHash('sha256').update(ROOT).digest('hex').slice(0, 8)}-`;
  const base = join(tmpdir(), `${prefix}${process.ppid}`);
  const dir = join(base, 'run');
  if (existsSync(dir)) return dir;
  const lock = `${base}.lock`;
  for (;;) {
    try { mkdirSync(lock); break; } catch {
      // A lock left by a killed test run must not block forever (the run takes about a minute at most).
      const since = statSync(lock, { throwIfNoEntry: false })?.mtimeMs ?? Date.now();
      if (Date.now() - since > 600_000) rmSync(lock, { recursive: true, force: true });
      sleep(250);
    }
  }
  try {
    if (existsSync(dir)) return dir;
    for (const n of readdirSync(tmpdir())) {
      const pid = n.startsWith(prefix) ? Number(/^(\d+)/.exec(n.slice(prefix.length))?.[1]) : NaN;
      if (pid > 0 && pid !== process.ppid && !processAlive(pid)) rmSync(join(tmpdir(), n), { recursive: true, force: true });
    }
    const building = `${base}.tmp-${process.pid}`;
    rmSync(building, { recursive: true, force: true });
    const r = cairn(['run', SMOKE, '--out', join(building, 'run'), '--quiet', '--workers', '2']);
    if (r.code !== 0) throw new Error(`cairn run ${SMOKE} exited ${r.code}:\n${r.stderr}`);
    renameSync(building, base);
    return dir;
  } finally {
    rmSync(lock, { recursive: true, force: true });
  }
}

/** `cairn export run --out out --json ...extra`; throws with stderr unless it exits 0. */
export function exportRun(run: string, out: string, ...extra: string[]): { dir: string; courses: number; walkers: number; iteration: number } {
  const r = cairn(['export', run, '--out', out, '--json', ...extra]);
  if (r.code !== 0) throw new Error(`cairn export exited ${r.code}:\n${r.stderr}`);
  return JSON.parse(r.stdout) as { dir: string; courses: number; walkers: number; iteration: number };
}

/** What {@link solvedVariant} changed. */
export interface SolvedVariant {
  readonly dir: string;
  /** Courses marked solved, in admission order. */
  readonly solved: readonly number[];
  /** A solved course whose `best` now names another course's walker, so `best` and `solvedBy` differ. */
  readonly mixed: number;
}

/**
 * A copy of the smoke run in `dir` whose newest checkpoint marks two courses solved (the smoke
 * run solves none): course 1 keeps its real best walker as `solvedBy` while its `best` is set to
 * course 2's record, and course 3 is solved by its own best. The figures are the run's real ones.
 */
export function solvedVariant(run: string, dir: string): SolvedVariant {
  cpSync(run, dir, { recursive: true });
  const { inputs, state } = openRun(dir);
  const byId = (id: number): CourseRecord => state.courses.find((c) => c.id === id)!;
  const [mixed, donor, other] = [1, 2, 3];
  const courses = state.courses.map((c): CourseRecord => {
    if (c.id === mixed) return { ...c, solvedAt: state.iteration, solvedBy: c.best, best: byId(donor).best };
    if (c.id === other) return { ...c, solvedAt: c.admittedAt, solvedBy: c.best };
    return c;
  });
  const next: RunState = { ...state, courses };
  writeCheckpoint(inputs.dir, next, inputs.recipeHash, inputs.recipe.checkpoint.keep);
  return { dir, solved: [mixed, other], mixed };
}
