import { closeSync, fsyncSync, openSync, renameSync, rmSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';

/** Prefix of temporary files; anything starting with it in a run directory is stale and may be removed. */
export const TEMP_PREFIX = '.tmp-';

/** A failed write, naming the file it was for. */
export class WriteError extends Error {
  readonly code: string | undefined;

  constructor(readonly path: string, cause: Error) {
    super(`could not write ${path}: ${cause.message}`);
    this.name = 'WriteError';
    this.code = (cause as NodeJS.ErrnoException).code;
  }
}

/** Writes every byte, retrying short writes. */
function writeAll(fd: number, data: Buffer): void {
  let off = 0;
  while (off < data.length) off += writeSync(fd, data, off, data.length - off);
}

/**
 * Writes `data` to `path` so that readers see either the old file or the whole new one, even
 * across a crash: temporary file in the same directory, write, fsync the file, rename over the
 * target, fsync the directory. On any error the temporary file is removed and the error rethrown;
 * the previous file is untouched.
 */
export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  const dir = dirname(path);
  const tmp = join(dir, `${TEMP_PREFIX}${basename(path)}-${process.pid}`);
  const buf = typeof data === 'string' ? Buffer.from(data, 'utf8') : Buffer.from(data.buffer, data.byteOffset, data.byteLength);
  let fd = -1;
  try {
    fd = openSync(tmp, 'w');
    writeAll(fd, buf);
    fsyncSync(fd);
    closeSync(fd);
    fd = -1;
    renameSync(tmp, path);
  } catch (e) {
    if (fd >= 0) closeSync(fd);
    rmSync(tmp, { force: true });
    throw new WriteError(path, e as Error);
  }
  syncDir(dir);
}

/** fsyncs a directory so a rename in it is durable (a no-op where the platform refuses). */
export function syncDir(dir: string): void {
  let fd = -1;
  try {
    fd = openSync(dir, 'r');
    fsyncSync(fd);
  } catch {
    // Some file systems do not support fsync on directories; the rename is still atomic.
  } finally {
    if (fd >= 0) closeSync(fd);
  }
}
