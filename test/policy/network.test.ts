import { describe, expect, it } from 'vitest';
import { canonicalJson, stream, UserError } from '../../src/core/index.js';
import {
  initParams, makeForward, paramCount, parseParams, parseShape, validateShape, type PolicyShape,
} from '../../src/policy/index.js';

const shape = (inputs: number, hidden: number[], outputs: number, activation: PolicyShape['activation'] = 'tanh'): PolicyShape =>
  ({ inputs, hidden, outputs, activation });

describe('paramCount', () => {
  it('counts weights and biases of every layer', () => {
    expect(paramCount(shape(2, [], 1))).toBe(3); // 2·1 + 1
    expect(paramCount(shape(2, [2], 1))).toBe(9); // (2·2 + 2) + (2·1 + 1)
    expect(paramCount(shape(24, [32, 32], 8))).toBe(2120); // (24·32 + 32) + (32·32 + 32) + (32·8 + 8) = 800 + 1056 + 264
  });
});

describe('forward pass', () => {
  // A 2-2-1 network in the documented layout: W1 row-major, b1, W2, b2.
  const w1 = [0.5, -1, 2, 0.25];
  const b1 = [0.1, -0.2];
  const w2 = [1.5, -0.5];
  const b2 = [0.3];
  const params = Float64Array.from([...w1, ...b1, ...w2, ...b2]);
  const x = [0.4, -0.6];

  it('matches a hand computation for a 2-2-1 tanh network', () => {
    const out = new Float64Array(1);
    makeForward(shape(2, [2], 1, 'tanh'))(params, x, out);
    const h0 = Math.tanh(0.5 * 0.4 + -1 * -0.6 + 0.1); // tanh(0.9)
    const h1 = Math.tanh(2 * 0.4 + 0.25 * -0.6 - 0.2); // tanh(0.45)
    expect(out[0]).toBeCloseTo(Math.tanh(1.5 * h0 - 0.5 * h1 + 0.3), 14);
  });

  it('clips negative hidden pre-activations to zero with relu', () => {
    const p = Float64Array.from([...w1, 0.1, -1, ...w2, ...b2]); // second hidden unit: 0.65 − 1 < 0
    const out = new Float64Array(1);
    makeForward(shape(2, [2], 1, 'relu'))(p, x, out);
    expect(out[0]).toBeCloseTo(Math.tanh(1.5 * 0.9 - 0.5 * 0 + 0.3), 14);
  });

  it('passes hidden pre-activations through unchanged with linear', () => {
    const p = Float64Array.from([...w1, 0.1, -1, ...w2, ...b2]);
    const out = new Float64Array(1);
    makeForward(shape(2, [2], 1, 'linear'))(p, x, out);
    expect(out[0]).toBeCloseTo(Math.tanh(1.5 * 0.9 - 0.5 * -0.35 + 0.3), 14);
  });

  it('computes tanh(W x + b) for a linear policy (no hidden layers)', () => {
    // 3 inputs, 2 outputs: W = [[1, 2, 3], [-1, 0.5, 0]], b = [0.1, -0.1].
    const p = Float64Array.from([1, 2, 3, -1, 0.5, 0, 0.1, -0.1]);
    const out = new Float64Array(2);
    makeForward(shape(3, [], 2))(p, [0.1, -0.2, 0.05], out);
    expect(out[0]).toBeCloseTo(Math.tanh(0.1 - 0.4 + 0.15 + 0.1), 14);
    expect(out[1]).toBeCloseTo(Math.tanh(-0.1 - 0.1 + 0 - 0.1), 14);
  });

  it('gives the same answer on repeated calls, so scratch buffers carry nothing over', () => {
    const s = shape(3, [4, 5, 4], 2);
    const p = initParams(s, stream(1, 'policy'), { outputScale: 1 });
    const reused = makeForward(s);
    const a = new Float64Array(2);
    reused(p, [0.9, -0.9, 0.2], a);
    reused(p, [0.1, 0.2, 0.3], a);
    const b = new Float64Array(2);
    makeForward(s)(p, [0.1, 0.2, 0.3], b);
    expect(Array.from(a)).toEqual(Array.from(b));
  });

  it('keeps every action in [-1, 1] even with huge weights', () => {
    const s = shape(2, [3], 2, 'relu');
    const p = new Float64Array(paramCount(s)).map((_, i) => (i % 2 === 0 ? 1e6 : -1e6));
    const out = new Float64Array(2);
    makeForward(s)(p, [1, -1], out);
    for (const y of out) expect(Math.abs(y)).toBeLessThanOrEqual(1);
  });

  it('refuses parameters of the wrong length', () => {
    expect(() => makeForward(shape(2, [2], 1))(new Float64Array(8), [0, 0], new Float64Array(1))).toThrow(/9 parameters/);
  });
});

describe('initParams', () => {
  const s = shape(6, [8], 3);

  it('is deterministic for the same stream label and differs between labels', () => {
    const a = initParams(s, stream(42, 'pair/0/policy'));
    const b = initParams(s, stream(42, 'pair/0/policy'));
    const c = initParams(s, stream(42, 'pair/1/policy'));
    expect(Array.from(a)).toEqual(Array.from(b));
    expect(Array.from(a)).not.toEqual(Array.from(c));
  });

  it('starts biases at zero and scales only the output layer by outputScale', () => {
    const one = initParams(s, stream(3, 'p'), { outputScale: 1 });
    const tenth = initParams(s, stream(3, 'p'), { outputScale: 0.1 });
    const hiddenEnd = 6 * 8;
    for (let i = hiddenEnd; i < hiddenEnd + 8; i++) expect(one[i]).toBe(0); // b1
    for (let i = paramCount(s) - 3; i < paramCount(s); i++) expect(one[i]).toBe(0); // b2
    for (let i = 0; i < hiddenEnd; i++) expect(tenth[i]).toBe(one[i]);
    for (let i = hiddenEnd + 8; i < hiddenEnd + 8 + 24; i++) expect(tenth[i]).toBeCloseTo(one[i] * 0.1, 15);
  });

  it('draws weights with standard deviation sqrt(1 / fan-in)', () => {
    const big = shape(400, [300], 1);
    const p = initParams(big, stream(5, 'p'));
    const w = p.subarray(0, 400 * 300);
    const mean = w.reduce((a, b) => a + b, 0) / w.length;
    const sd = Math.sqrt(w.reduce((a, b) => a + (b - mean) ** 2, 0) / w.length);
    expect(sd).toBeGreaterThan(0.05 * 0.98); // sqrt(1/400) = 0.05; with 120 000 draws the sample sd has a standard error of sd/sqrt(2n), about 0.2 %
    expect(sd).toBeLessThan(0.05 * 1.02);
  });
});

describe('shape validation', () => {
  it('accepts a valid shape and returns a copy', () => {
    const json = { inputs: 4, hidden: [16, 16], outputs: 2, activation: 'relu' };
    const parsed = parseShape(json, 'recipe.json: policy');
    expect(parsed).toEqual(json);
    json.hidden.push(3);
    expect(parsed.hidden).toEqual([16, 16]);
  });

  it('lists every problem with its path', () => {
    const problems = validateShape({ inputs: 0, hidden: [8, 1025, 2.5], outputs: 'x', activation: 'sigmoid', depth: 2 }, 'p');
    expect(problems).toHaveLength(6);
    expect(problems.some((m) => m.startsWith('p.inputs:'))).toBe(true);
    expect(problems.some((m) => m.startsWith('p.outputs:'))).toBe(true);
    expect(problems.some((m) => m.startsWith('p.hidden[1]:') && m.includes('1025'))).toBe(true);
    expect(problems.some((m) => m.startsWith('p.hidden[2]:'))).toBe(true);
    expect(problems.some((m) => m.startsWith('p.activation:') && m.includes('sigmoid'))).toBe(true);
    expect(problems.some((m) => m.startsWith('p.depth:'))).toBe(true);
  });

  it('throws a UserError listing the problems', () => {
    const parse = (): PolicyShape => parseShape({ inputs: 2, outputs: 1, activation: 'tanh' }, 'body.json');
    expect(parse).toThrow(UserError);
    expect(parse).toThrow(/body\.json\.hidden/);
  });
});

describe('parameter (de)serialisation', () => {
  const s = shape(3, [2], 2);

  it('round-trips through canonical JSON bit for bit', () => {
    const p = initParams(s, stream(9, 'p'), { outputScale: 1 });
    expect(Array.from(parseParams(JSON.parse(canonicalJson(p)), s, 'walker.json'))).toEqual(Array.from(p));
  });

  it('refuses the wrong length or a non-number', () => {
    expect(() => parseParams([1, 2, 3], s, 'walker.json')).toThrow(/expected 14 numbers/); // (3·2 + 2) + (2·2 + 2)
    expect(() => parseParams([...new Array(13).fill(0), 'x'], s, 'walker.json')).toThrow(/walker\.json\[13\]/);
  });
});
