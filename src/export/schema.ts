import Ajv2020Module from 'ajv/dist/2020.js';
import { UserError } from '../core/index.js';
import { CURRICULUM_SCHEMA } from './schema/curriculum-schema.js';

/** A fresh copy of the curriculum JSON Schema (draft 2020-12) that ships with cairn. */
export function curriculumSchema(): Record<string, unknown> {
  return structuredClone(CURRICULUM_SCHEMA) as Record<string, unknown>;
}

/** The schema as the file an export writes beside its curriculum. */
export function curriculumSchemaText(): string {
  return `${JSON.stringify(CURRICULUM_SCHEMA, null, 2)}\n`;
}

type Validate = ((data: unknown) => boolean) & { errors?: { instancePath: string; message?: string }[] | null };
let cached: Validate | undefined;

/** Every schema problem of a curriculum object, as `<path>: <message>`; empty when valid. */
export function curriculumProblems(data: unknown): string[] {
  if (!cached) {
    const Ajv2020 = (Ajv2020Module as unknown as { default?: unknown }).default ?? Ajv2020Module;
    const ajv = new (Ajv2020 as new (o: object) => { compile(s: object): Validate })({ allErrors: true, strict: false });
    cached = ajv.compile(curriculumSchema());
  }
  if (cached(data)) return [];
  return (cached.errors ?? []).map((e) => `${e.instancePath || '(top level)'}: ${e.message ?? 'invalid'}`);
}

/** Throws a UserError naming the file and every problem when `data` does not match the schema. */
export function assertCurriculum(data: unknown, where: string): void {
  const p = curriculumProblems(data);
  if (p.length > 0) throw new UserError(`Curriculum ${where} does not match the curriculum schema:`, p.slice(0, 20).map((x) => `${where}: ${x}`));
}
