/**
 * One build step shared by every test that runs compiled code (worker threads, child
 * processes, the command line): they run dist/, which `npm test` compiles first; when a test
 * is run on its own after an edit, dist/ is rebuilt here.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { sha256 } from '../src/core/index.js';

export const ROOT = fileURLToPath(new URL('../', import.meta.url));
export const WORKER_JS = join(ROOT, 'dist/pool/worker.js');
export const CLI = join(ROOT, 'dist/cli/main.js');

/** Newest modification time of any TypeScript source under src/, ms. */
function newestSource(): number {
  const dir = join(ROOT, 'src');
  return Math.max(...readdirSync(dir, { recursive: true, encoding: 'utf8' })
    .filter((f) => f.endsWith('.ts'))
    .map((f) => statSync(join(dir, f)).mtimeMs));
}

/** tsc rewrites every output, so two files' ages stand for all of dist/. */
function stale(): boolean {
  const newest = newestSource();
  return [WORKER_JS, CLI].some((f) => !existsSync(f) || statSync(f).mtimeMs < newest);
}

/**
 * Compiles src/ to dist/ when it is missing or older than any source. Test files run in
 * parallel, so a lock directory keeps two compilers from rewriting dist/ under a worker that
 * is loading it; a lock left by a killed run is ignored after three minutes.
 */
export function ensureBuilt(): void {
  if (!stale()) return;
  const lock = join(tmpdir(), `cairn-build-${sha256(ROOT).slice(0, 12)}.lock`);
  for (;;) {
    try { mkdirSync(lock); break; } catch {
      const since = statSync(lock, { throwIfNoEntry: false })?.mtimeMs ?? Date.now();
      if (Date.now() - since > 180_000) rmSync(lock, { recursive: true, force: true });
      Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 200);
    }
  }
  try {
    if (!stale()) return;
    const tsc = spawnSync(process.execPath, [join(ROOT, 'node_modules/typescript/bin/tsc'), '-p', '.'], { cwd: ROOT, encoding: 'utf8' });
    // tsc emits even with type errors elsewhere; only a dist/ still missing or stale is fatal.
    if (stale()) throw new Error(`could not build dist/:\n${tsc.stdout}${tsc.stderr}`);
  } finally {
    rmSync(lock, { recursive: true, force: true });
  }
}
