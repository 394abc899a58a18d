import type { z } from 'zod';
import { UserError } from './errors.js';

/** `a.b[2].c` from a zod issue path. */
export function formatPath(path: readonly PropertyKey[]): string {
  let s = '';
  for (const p of path) s += typeof p === 'number' ? `[${p}]` : s === '' ? String(p) : `.${String(p)}`;
  return s === '' ? '(top level)' : s;
}

function valueAt(root: unknown, path: readonly PropertyKey[]): unknown {
  let v: unknown = root;
  for (const p of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<PropertyKey, unknown>)[p];
  }
  return v;
}

function shortJson(v: unknown): string {
  if (v === undefined) return 'nothing';
  const s = JSON.stringify(v);
  return s.length > 60 ? `${s.slice(0, 57)}...` : s;
}

/**
 * Parses `value` with a zod schema; on failure throws one UserError that lists every problem
 * as `<where>: <field path>: <expected> (found <value>)`.
 */
export function parseWith<T>(schema: z.ZodType<T>, value: unknown, where: string, what: string): T {
  const r = schema.safeParse(value);
  if (r.success) return r.data;
  const problems = r.error.issues.map((issue) => {
    const found = issue.code === 'unrecognized_keys' ? '' : ` (found ${shortJson(valueAt(value, issue.path))})`;
    return `${where}: ${formatPath(issue.path)}: ${issue.message}${found}`;
  });
  throw new UserError(`${what} ${where} is not valid:`, problems);
}
