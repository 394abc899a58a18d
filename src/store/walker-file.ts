import { z } from 'zod';
import { parseWith, readJsonFile, UserError } from '../core/index.js';
import { paramCount, parseShape, type PolicyShape } from '../policy/index.js';
import { writeFileAtomic } from './atomic.js';

/** Format tag of cairn's own walker files (the curriculum export also writes safetensors). */
export const WALKER_FORMAT = 'cairn-walker/1';

/** A walker on disk: network shape and weights plus the body plan it drives. */
export interface WalkerFile {
  readonly format: typeof WALKER_FORMAT;
  /** Path of the body plan file, as given when the walker was made. */
  readonly body: string;
  /** The plan's `name`, checked on load against the plan actually used. */
  readonly bodyName: string;
  readonly shape: PolicyShape;
  readonly params: readonly number[];
  /** Free-form facts about how it was made (course, iterations, progress). */
  readonly meta?: Record<string, unknown>;
}

const schema = z
  .object({
    format: z.literal(WALKER_FORMAT),
    body: z.string().min(1),
    bodyName: z.string().min(1),
    shape: z.unknown(),
    params: z.array(z.number()),
    meta: z.record(z.string(), z.unknown()).optional(),
  })
  .strict();

/** Loads and validates a walker file; the weight count must match the shape. */
export function loadWalker(path: string): WalkerFile {
  const raw = parseWith(schema, readJsonFile(path, 'Walker'), path, 'Walker file');
  const shape = parseShape(raw.shape, `${path}: shape`);
  if (raw.params.length !== paramCount(shape)) {
    throw new UserError(`Walker file ${path}: params: expected ${paramCount(shape)} numbers for the shape, found ${raw.params.length}`);
  }
  return { ...raw, format: WALKER_FORMAT, shape };
}

/** Writes a walker file atomically. */
export function saveWalker(path: string, walker: Omit<WalkerFile, 'format'>): void {
  writeFileAtomic(path, `${JSON.stringify({ format: WALKER_FORMAT, ...walker }, null, 1)}\n`);
}
