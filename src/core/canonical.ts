import { createHash } from 'node:crypto';

/**
 * Canonical JSON: object keys sorted, no whitespace, numbers in JavaScript's shortest
 * round-trip form (so every double survives bit for bit), `-0` kept as `-0`.
 * Typed arrays are written as plain arrays. NaN, ±Infinity, undefined values inside arrays,
 * functions and Maps/Sets are refused: run state must not hold them.
 */
export function canonicalJson(value: unknown): string {
  const out: string[] = [];
  write(value, out, '$');
  return out.join('');
}

function write(v: unknown, out: string[], path: string): void {
  if (v === null) {
    out.push('null');
  } else if (typeof v === 'number') {
    if (!Number.isFinite(v)) throw new Error(`canonicalJson: non-finite number at ${path}`);
    out.push(Object.is(v, -0) ? '-0' : JSON.stringify(v));
  } else if (typeof v === 'string' || typeof v === 'boolean') {
    out.push(JSON.stringify(v));
  } else if (Array.isArray(v) || ArrayBuffer.isView(v)) {
    const arr = v as ArrayLike<unknown>;
    out.push('[');
    for (let i = 0; i < arr.length; i++) {
      if (i > 0) out.push(',');
      write(arr[i], out, `${path}[${i}]`);
    }
    out.push(']');
  } else if (typeof v === 'object') {
    if (v instanceof Map || v instanceof Set) throw new Error(`canonicalJson: Map/Set at ${path}`);
    const obj = v as Record<string, unknown>;
    const keys = Object.keys(obj).filter((k) => obj[k] !== undefined).sort();
    out.push('{');
    keys.forEach((k, i) => {
      if (i > 0) out.push(',');
      out.push(JSON.stringify(k), ':');
      write(obj[k], out, `${path}.${k}`);
    });
    out.push('}');
  } else {
    throw new Error(`canonicalJson: unsupported ${typeof v} at ${path}`);
  }
}

/** Lower-case hex SHA-256 of a string or bytes. */
export function sha256(data: string | Uint8Array): string {
  return createHash('sha256').update(data).digest('hex');
}

/** SHA-256 of the canonical JSON of `value`. */
export function hashValue(value: unknown): string {
  return sha256(canonicalJson(value));
}
