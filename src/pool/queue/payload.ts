import { z } from 'zod';
import { formatPath, versionDifferences, writerVersions, type Versions } from '../../core/index.js';
import { parseBodyPlan } from '../../body/index.js';
import type { RolloutResult } from '../../sim/index.js';
import type { BatchTables, Task } from '../task.js';
import type { JobItem } from '../transport.js';

/** Version of the job format; a worker refuses others. */
export const JOB_FORMAT = 1;

/** What one queue job carries: indices and seeds; the batch's tables travel once, under `tables`. */
export interface JobData {
  readonly format: number;
  readonly versions: Versions;
  readonly session: string;
  readonly batch: number;
  readonly tables: string;
  readonly items: readonly JobItem[];
}

/** What a worker returns for a job. `stale`: the job's coordinator session is gone, nothing was run. */
export type JobReturn = { readonly results: readonly RolloutResult[] } | { readonly stale: true };

const finite = z.number().finite();
const int = z.number().int().min(0);
const index = z.number().int().min(0).max(1_000_000);

const policy = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('params'), params: z.array(finite).max(10_000_000) }).strict(),
  z.object({ kind: z.literal('perturbed'), base: index, seed: z.number().int(), sign: z.union([z.literal(1), z.literal(-1)]), sigma: finite }).strict(),
]);

const task = z.object({ kind: z.literal('rollout'), course: index, plan: index, shape: index, options: index, policy }).strict();

const jobSchema = z.object({
  format: z.literal(JOB_FORMAT),
  versions: z.object({ node: z.string(), planck: z.string(), cairn: z.string() }).strict(),
  session: z.string().regex(/^[A-Za-z0-9-]{1,64}$/),
  batch: int,
  tables: z.string().max(300),
  items: z.array(z.object({ index, attempt: z.number().int().min(0).max(100), task }).strict()).min(1).max(10_000),
}).strict();

const points = z.array(finite).max(10_000_000);
const course = z.object({ ground: points, obstacles: z.array(points).max(100_000), friction: finite, startX: finite, finishX: finite, spawnGroundY: finite }).strict();
const shape = z.object({ inputs: z.number().int().min(1).max(100_000), hidden: z.array(z.number().int().min(1).max(1024)).max(8), outputs: z.number().int().min(1).max(100_000), activation: z.enum(['tanh', 'relu', 'linear']) }).strict();
const options = z.object({
  physics: z.object({ gravity: finite, timeStep: z.number().positive().max(1), velocityIterations: z.number().int().min(1).max(500), positionIterations: z.number().int().min(1).max(500) }).strict(),
  maxSteps: z.number().int().min(1).max(10_000_000), stallSeconds: finite, stallDistance: finite, fallPenalty: finite,
  traceEvery: z.number().int().min(0), control: z.enum(['policy', 'scripted', 'scripted-with-sensing']), push: finite.optional(),
}).strict();
const tablesSchema = z.object({
  courses: z.array(course).max(100_000), plans: z.array(z.unknown()).min(1).max(1000), shapes: z.array(shape).min(1).max(1000),
  options: z.array(options).min(1).max(100_000), bases: z.array(points).max(100_000),
}).strict();

function problems(error: z.ZodError): string {
  return error.issues.slice(0, 3).map((i) => `${formatPath(i.path)}: ${i.message}`).join('; ');
}

/** Validates a job's data; throws an Error whose message says what is wrong (the job fails with it). */
export function parseJobData(data: unknown): JobData {
  const r = jobSchema.safeParse(data);
  if (!r.success) throw new Error(`refused a malformed job: ${problems(r.error)}`);
  const diff = versionDifferences(writerVersions(), r.data.versions);
  if (diff.length > 0) throw new Error(`refused a job from another version (${diff.join('; ')}): its results would differ`);
  return r.data as JobData;
}

/** Validates a batch's tables as read from Redis, and that every task's indices point into them. */
export function parseTables(json: unknown, tasks: readonly Task[]): BatchTables {
  const r = tablesSchema.safeParse(json);
  if (!r.success) throw new Error(`refused malformed batch tables: ${problems(r.error)}`);
  const t = r.data;
  const plans = t.plans.map((p, i) => parseBodyPlan(p, `batch tables plans[${i}]`));
  const tables: BatchTables = { courses: t.courses, plans, shapes: t.shapes, options: t.options as BatchTables['options'], bases: t.bases };
  assertTaskIndices(tables, tasks);
  return tables;
}

/** Refuses a job whose tasks point past its batch's tables (checked for every job, tables cached or not). */
export function assertTaskIndices(t: BatchTables, tasks: readonly Task[]): void {
  for (const [k, x] of tasks.entries()) {
    const p = x.policy;
    const bad = x.course >= t.courses.length ? 'course' : x.plan >= t.plans.length ? 'plan' : x.shape >= t.shapes.length ? 'shape'
      : x.options >= t.options.length ? 'options' : p.kind === 'perturbed' && p.base >= t.bases.length ? 'policy.base' : null;
    if (bad) throw new Error(`refused a job: task ${k} points past the batch's ${bad} table`);
  }
}
