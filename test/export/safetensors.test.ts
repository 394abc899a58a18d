/**
 * Walker files against the published safetensors layout: an 8-byte little-endian unsigned
 * header length N, N bytes of JSON header ({dtype, shape, data_offsets} per tensor, offsets
 * relative to the data section, plus a `__metadata__` map of strings), then the raw
 * little-endian data. Checked three ways: bytes laid out by hand here, cairn's own round trip,
 * and an independent reader in Python/NumPy (test/fixtures/read_walker.py) that rebuilds the
 * network from the file alone and must give cairn's forward-pass outputs.
 */
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildWalker, CourseRays, loadBodyPlan, rayDirections, sense, trackContacts, applyActions } from '../../src/body/index.js';
import { stream, UserError } from '../../src/core/index.js';
import { courseOf, decodeSafetensors, encodeSafetensors, loadCurriculum, loadSafetensorsWalker, paramsToTensors, type Curriculum } from '../../src/export/index.js';
import { initParams, makeForward, paramCount, type PolicyShape } from '../../src/policy/index.js';
import { addCourse, makeWorld, stepWorld } from '../../src/sim/index.js';
import { openRun } from '../../src/store/index.js';
import { cleanup, exportRun, python, READ_WALKER_PY, smokeRun, tempDir } from './helpers.js';

/** A file laid out by hand from the format description, not by cairn's encoder. */
function handBuilt(header: object, values: number[]): Buffer {
  let json = JSON.stringify(header);
  json += ' '.repeat((8 - (json.length % 8)) % 8);
  const data = Buffer.alloc(8 * values.length);
  values.forEach((v, i) => data.writeDoubleLE(v, 8 * i));
  const len = Buffer.alloc(8);
  len.writeBigUInt64LE(BigInt(json.length));
  return Buffer.concat([len, Buffer.from(json, 'ascii'), data]);
}

describe('safetensors encoding in cairn', () => {
  it('decodes a file laid out by hand from the published format', () => {
    const bytes = handBuilt({ b: { dtype: 'F64', shape: [1], data_offsets: [32, 40] }, a: { dtype: 'F64', shape: [2, 2], data_offsets: [0, 32] }, __metadata__: { note: 'x' } }, [1.5, -2.25, 0.1, 1e-300, -7]);
    const { tensors, metadata } = decodeSafetensors(bytes, 'hand-built');
    expect(metadata).toEqual({ note: 'x' });
    expect(tensors.get('a')?.shape).toEqual([2, 2]);
    expect(Array.from(tensors.get('a')!.data)).toEqual([1.5, -2.25, 0.1, 1e-300]);
    expect(Array.from(tensors.get('b')!.data)).toEqual([-7]);
  });

  it('writes the layout byte for byte: length prefix, JSON header, little-endian F64 data at its offsets', () => {
    const bytes = Buffer.from(encodeSafetensors([{ name: 'w', shape: [3], data: Float64Array.of(1, -0.5, 3e10) }, { name: 'v', shape: [1], data: Float64Array.of(2) }], { k: 'v' }));
    const n = Number(bytes.readBigUInt64LE(0));
    const header = JSON.parse(bytes.subarray(8, 8 + n).toString('utf8'));
    expect(header).toEqual({ __metadata__: { k: 'v' }, w: { dtype: 'F64', shape: [3], data_offsets: [0, 24] }, v: { dtype: 'F64', shape: [1], data_offsets: [24, 32] } });
    const data = bytes.subarray(8 + n);
    expect(data.length).toBe(32);
    expect([0, 8, 16, 24].map((o) => data.readDoubleLE(o))).toEqual([1, -0.5, 3e10, 2]);
  });

  it('pads the header with spaces to a multiple of 8 bytes, whatever the metadata length', () => {
    for (let len = 0; len < 16; len++) {
      const bytes = Buffer.from(encodeSafetensors([{ name: 't', shape: [1], data: Float64Array.of(len) }], { m: 'é'.repeat(len % 3) + 'x'.repeat(len) }));
      const n = Number(bytes.readBigUInt64LE(0));
      expect(n % 8).toBe(0);
      const text = bytes.subarray(8, 8 + n).toString('utf8');
      const json = text.trimEnd();
      expect(text.slice(json.length)).toMatch(/^ {0,7}$/);
      expect(JSON.parse(json).__metadata__.m).toContain('x'.repeat(len));
      expect(bytes.readDoubleLE(8 + n)).toBe(len);
    }
  });

  it('round-trips any F64 values and metadata exactly (decode ∘ encode = identity)', () => {
    fc.assert(fc.property(
      fc.array(fc.array(fc.double({ noNaN: true }), { minLength: 1, maxLength: 12 }), { minLength: 1, maxLength: 4 }),
      fc.dictionary(fc.string().filter((k) => k !== '__proto__'), fc.string(), { maxKeys: 4 }),
      (arrays, metadata) => {
        const tensors = arrays.map((a, i) => ({ name: `t${i}`, shape: [a.length], data: Float64Array.from(a) }));
        const back = decodeSafetensors(encodeSafetensors(tensors, metadata), 'round trip');
        expect(back.metadata).toEqual(metadata);
        for (const t of tensors) {
          const got = back.tensors.get(t.name)!;
          expect(got.shape).toEqual(t.shape);
          // Object.is tells -0 from 0: the bits must survive, not just the value.
          t.data.forEach((v, i) => expect(Object.is(got.data[i], v)).toBe(true));
        }
      },
    ), { numRuns: 100 });
  });

  it('refuses files that do not follow the layout, saying why', () => {
    const good = { w: { dtype: 'F64', shape: [2], data_offsets: [0, 16] } };
    expect(() => decodeSafetensors(Buffer.alloc(5), 'f')).toThrow(UserError);
    const long = handBuilt(good, [1, 2]);
    long.writeBigUInt64LE(10_000n);
    expect(() => decodeSafetensors(long, 'f')).toThrow(/runs past the end/);
    expect(() => decodeSafetensors(handBuilt({ w: { dtype: 'F32', shape: [2], data_offsets: [0, 8] } }, [1]), 'f')).toThrow(/dtype F32/);
    expect(() => decodeSafetensors(handBuilt({ w: { dtype: 'F64', shape: [3], data_offsets: [0, 16] } }, [1, 2]), 'f')).toThrow(/do not fit/);
    expect(() => decodeSafetensors(handBuilt(good, [1]), 'f')).toThrow(/do not fit/);
  });
});

/** Observations from cairn's own sense path: the walker driven by `params` on the course for `steps` steps. */
function recordObservations(cur: Curriculum, shape: PolicyShape, params: Float64Array, steps: number): number[][] {
  const plan = loadBodyPlan(join(cur.dir, cur.body.file));
  const course = courseOf(cur.courses[cur.courses.length - 1]);
  const world = makeWorld(cur.physics);
  addCourse(world, course);
  const walker = buildWalker(world, plan, course.startX, course.spawnGroundY);
  trackContacts(world, walker);
  const rays = new CourseRays(course);
  const dirs = rayDirections(plan);
  const forward = makeForward(shape);
  const obs = new Float64Array(shape.inputs);
  const act = new Float64Array(shape.outputs);
  const out: number[][] = [];
  for (let s = 0; s < steps && !walker.fell; s++) {
    sense(walker, rays, dirs, obs);
    out.push(Array.from(obs));
    forward(params, obs, act);
    applyActions(walker, act);
    stepWorld(world, cur.physics);
  }
  return out;
}

interface PyWalker { headerLength: number; tensors: Record<string, number[]>; metadata: Record<string, string>; outputs: number[][] }

describe('exported walkers read independently with NumPy', () => {
  let run: string;
  let dir: string;
  let cur: Curriculum;
  let files: string[];
  let observations: number[][];

  beforeAll(() => {
    run = smokeRun();
    dir = join(tempDir('safetensors'), 'exp');
    exportRun(run, dir);
    cur = loadCurriculum(join(dir, 'curriculum.json'));
    files = [...new Set(cur.courses.flatMap((c) => [c.best.walker.file, ...(c.solvedBy ? [c.solvedBy.walker.file] : [])]))];
    const first = loadSafetensorsWalker(join(dir, files[0]));
    const real = recordObservations(cur, first.shape, first.params, 120).filter((_, i) => i % 4 === 0);
    const s = stream(5, 'test/export/random-observations');
    const random = Array.from({ length: 20 }, () => Array.from({ length: first.shape.inputs }, () => s.uniform(-3, 3)));
    observations = [...real, ...random];
    expect(real.length).toBeGreaterThan(10);
  }, 600_000);
  afterAll(cleanup);

  function numpy(paths: string[]): PyWalker[] {
    const obsFile = join(dir, '..', 'observations.json');
    writeFileSync(obsFile, JSON.stringify(observations));
    return JSON.parse(python([READ_WALKER_PY, obsFile, ...paths])) as PyWalker[];
  }

  function expectSameOutputs(py: PyWalker, shape: PolicyShape, params: Float64Array): void {
    const forward = makeForward(shape);
    const out = new Float64Array(shape.outputs);
    expect(py.outputs).toHaveLength(observations.length);
    observations.forEach((o, k) => {
      forward(params, o, out);
      // Summation order differs between NumPy's matrix product and cairn's loop: rounding only.
      out.forEach((v, j) => expect(Math.abs(py.outputs[k][j] - v)).toBeLessThanOrEqual(1e-12));
    });
  }

  it('holds exactly the run\'s weights, and each file\'s SHA-256 is the one the curriculum names', () => {
    const { state } = openRun(run);
    for (const c of cur.courses) {
      const path = join(dir, c.best.walker.file);
      expect(createHash('sha256').update(readFileSync(path)).digest('hex')).toBe(c.best.walker.sha256);
      const w = loadSafetensorsWalker(path, c.best.walker.sha256);
      expect(Array.from(w.params)).toEqual(state.courses.find((r) => r.id === c.id)!.best.params);
    }
  });

  it('NumPy, given only the file, computes the same actions as cairn within 1e-12', () => {
    const py = numpy(files.map((f) => join(dir, f)));
    const policy = (JSON.parse(readFileSync(join(dir, 'curriculum.json'), 'utf8')) as { policy: PolicyShape }).policy;
    expect(py).toHaveLength(files.length);
    files.forEach((f, i) => {
      const w = loadSafetensorsWalker(join(dir, f));
      expect(py[i].headerLength % 8).toBe(0);
      expect(JSON.parse(py[i].metadata.shape)).toEqual(policy);
      expect(JSON.parse(py[i].metadata.observation)).toEqual((cur as unknown as { body: { observation: string[] } }).body.observation);
      expect(py[i].tensors).toEqual({ 'layer0.weight': [policy.outputs, policy.inputs], 'layer0.bias': [policy.outputs] });
      expectSameOutputs(py[i], w.shape, w.params);
    });
  });

  it('NumPy agrees for networks with hidden layers and each hidden activation', () => {
    const shapes: PolicyShape[] = [
      { inputs: observations[0].length, hidden: [7], outputs: 8, activation: 'tanh' },
      { inputs: observations[0].length, hidden: [6, 5], outputs: 8, activation: 'relu' },
      { inputs: observations[0].length, hidden: [4, 4, 3], outputs: 8, activation: 'linear' },
    ];
    const params = shapes.map((sh, i) => initParams(sh, stream(i, 'test/export/hidden'), { outputScale: 1 }));
    const paths = shapes.map((sh, i) => {
      // Random biases too, so a reader that dropped or misplaced them would be caught.
      const s = stream(i, 'test/export/bias');
      const p = params[i].map((v) => (v === 0 ? s.uniform(-0.5, 0.5) : v));
      params[i] = p;
      expect(p.length).toBe(paramCount(sh));
      const path = join(dir, '..', `hidden-${i}.safetensors`);
      writeFileSync(path, encodeSafetensors(paramsToTensors(sh, p), { shape: JSON.stringify(sh), activation: sh.activation }));
      return path;
    });
    const py = numpy(paths);
    shapes.forEach((sh, i) => {
      expect(Object.keys(py[i].tensors)).toHaveLength(2 * (sh.hidden.length + 1));
      expect(py[i].tensors['layer1.weight']).toEqual([sh.hidden[1] ?? sh.outputs, sh.hidden[0]]);
      expectSameOutputs(py[i], sh, params[i]);
    });
  });
});
