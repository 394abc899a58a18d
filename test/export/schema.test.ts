/**
 * The curriculum JSON Schema against the JSON Schema 2020-12 standard (json-schema.org, draft
 * 2020-12), checked with two independent implementations: ajv's draft 2020-12 build in Node and
 * Python's jsonschema (Draft202012Validator) from Debian's python3-jsonschema.
 */
import { spawnSync } from 'node:child_process';
import { cpSync, existsSync, readFileSync, symlinkSync } from 'node:fs';
import { join } from 'node:path';
import Ajv2020Module from 'ajv/dist/2020.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { curriculumProblems, curriculumSchemaText } from '../../src/export/index.js';
import { cleanup, exportRun, python, readJson, ROOT, smokeRun, tempDir } from './helpers.js';

// Corruptions reach deep into the parsed JSON: loosely typed on purpose.
type Json = Record<string, any>;
type Validate = ((d: unknown) => boolean) & { errors?: unknown[] | null };
const Ajv2020 = ((Ajv2020Module as unknown as { default?: unknown }).default ?? Ajv2020Module) as new (o: object) => {
  compile(s: object): Validate; validateSchema(s: object): boolean; errors?: unknown[] | null;
};

/** Hand-made corruptions of a valid curriculum, each of which the schema must reject. */
const CORRUPTIONS: Record<string, (c: Json) => void> = {
  'a course without its geometry': (c) => { delete c.courses[0].geometry; },
  'a top-level field missing (run)': (c) => { delete c.run; },
  'progress above 1': (c) => { c.courses[1].best.progress = 1.5; },
  'negative progress at admission': (c) => { c.courses[1].admission.bestProgress = -0.1; },
  'a walker SHA-256 that is not 64 lowercase hex digits': (c) => { c.courses[0].best.walker.sha256 = c.courses[0].best.walker.sha256.toUpperCase(); },
  'a short fingerprint': (c) => { c.run.fingerprint = 'abc123'; },
  'an extra top-level property': (c) => { c.comment = 'hello'; },
  'an extra property in a course': (c) => { c.courses[2].colour = 'red'; },
  'a ground point with three coordinates': (c) => { c.courses[0].geometry.ground[1].push(0); },
  'an unknown feature kind': (c) => { c.courses.find((x: Json) => x.genome.features.length > 0).genome.features[0].kind = 'wall'; },
  'a fractional course id': (c) => { c.courses[0].id = 0.5; },
  'an unknown order': (c) => { c.order = 'random'; },
};

/** Errors per instance from Python's Draft202012Validator, after checking the schema itself against the 2020-12 metaschema. */
function pythonErrors(schema: unknown, instances: unknown[]): string[][] {
  const script = [
    'import json, sys',
    'from jsonschema import Draft202012Validator',
    'd = json.load(sys.stdin)',
    "Draft202012Validator.check_schema(d['schema'])",
    "v = Draft202012Validator(d['schema'])",
    "print(json.dumps([[e.message for e in v.iter_errors(i)] for i in d['instances']]))",
  ].join('\n');
  return JSON.parse(python(['-c', script], JSON.stringify({ schema, instances }))) as string[][];
}

describe('curriculum.json against its JSON Schema (draft 2020-12)', () => {
  let dir: string;
  let curriculum: Json;
  let schema: Json;
  let corrupted: [string, Json][];

  beforeAll(() => {
    dir = join(tempDir('schema'), 'exp');
    exportRun(smokeRun(), dir);
    curriculum = readJson(join(dir, 'curriculum.json'));
    schema = readJson(join(dir, curriculum.$schema));
    corrupted = Object.entries(CORRUPTIONS).map(([name, corrupt]) => {
      const c = structuredClone(curriculum);
      corrupt(c);
      return [name, c];
    });
  }, 600_000);
  afterAll(cleanup);

  it('ships the schema beside the curriculum, byte for byte the one compiled into cairn', () => {
    expect(curriculum.$schema).toBe('./curriculum.schema.json');
    expect(readFileSync(join(dir, 'curriculum.schema.json'), 'utf8')).toBe(curriculumSchemaText());
    expect(schema.$schema).toBe('https://json-schema.org/draft/2020-12/schema');
  });

  it('travels with the built package: an export from a copy of dist/ with no src/ beside it writes the same schema', () => {
    const pkg = tempDir('package');
    cpSync(join(ROOT, 'dist'), join(pkg, 'dist'), { recursive: true });
    cpSync(join(ROOT, 'package.json'), join(pkg, 'package.json'));
    symlinkSync(join(ROOT, 'node_modules'), join(pkg, 'node_modules'));
    const out = join(pkg, 'exp');
    const r = spawnSync(process.execPath, [join(pkg, 'dist/cli/main.js'), 'export', smokeRun(), '--out', out], { cwd: pkg, encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    expect(existsSync(join(pkg, 'src'))).toBe(false);
    expect(readFileSync(join(out, 'curriculum.schema.json'), 'utf8')).toBe(readFileSync(join(dir, 'curriculum.schema.json'), 'utf8'));
  });

  it('compiles under ajv\'s draft 2020-12 build in strict mode and accepts the export', () => {
    const ajv = new Ajv2020({ strict: true, allErrors: true });
    expect(ajv.validateSchema(schema), JSON.stringify(ajv.errors)).toBe(true);
    const validate = ajv.compile(schema);
    expect(validate(curriculum), JSON.stringify(validate.errors)).toBe(true);
    expect(curriculumProblems(curriculum)).toEqual([]);
  });

  it('ajv rejects each hand-made corruption, and so does cairn\'s own check', () => {
    const validate = new Ajv2020({ strict: true, allErrors: true }).compile(schema);
    for (const [name, c] of corrupted) {
      expect(validate(c), name).toBe(false);
      expect(curriculumProblems(c).length, name).toBeGreaterThan(0);
    }
  });

  it('Python\'s jsonschema (Draft202012Validator), a second implementation, accepts the export and rejects every corruption', () => {
    const errors = pythonErrors(schema, [curriculum, ...corrupted.map(([, c]) => c)]);
    expect(errors[0]).toEqual([]);
    corrupted.forEach(([name], i) => expect(errors[i + 1].length, name).toBeGreaterThan(0));
  });
});
