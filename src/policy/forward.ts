import { layerSizes, paramCount, type Activation, type PolicyShape } from './shape.js';

/**
 * One forward pass: reads `obs` (length `shape.inputs`) and writes the actions, each in
 * [-1, 1], into `out` (length ≥ `shape.outputs`). `params` is laid out as documented on
 * `paramCount`. Allocates nothing.
 */
export type Forward = (params: Float64Array, obs: ArrayLike<number>, out: Float64Array) => void;

// Activation codes: a small integer switch in the hot loop instead of a string compare.
const TANH = 0;
const RELU = 1;
const LINEAR = 2;

function activationCode(a: Activation): number {
  return a === 'tanh' ? TANH : a === 'relu' ? RELU : LINEAR;
}

/** y[o] = act(b[o] + Σ_i W[o·nIn + i]·x[i]); returns the offset just after this layer's parameters. */
function dense(
  p: Float64Array, offset: number, x: ArrayLike<number>, nIn: number,
  y: Float64Array, nOut: number, act: number,
): number {
  const bias = offset + nOut * nIn;
  for (let o = 0; o < nOut; o++) {
    let s = p[bias + o];
    const row = offset + o * nIn;
    for (let i = 0; i < nIn; i++) s += p[row + i] * x[i];
    y[o] = act === TANH ? Math.tanh(s) : act === RELU ? (s > 0 ? s : 0) : s;
  }
  return bias + nOut;
}

/**
 * A forward pass for `shape` with its scratch buffers allocated once here, so calling it in a
 * simulation loop allocates nothing. The returned function is not re-entrant: one per thread
 * of use (it keeps its hidden activations in shared scratch).
 */
export function makeForward(shape: PolicyShape): Forward {
  const sizes = layerSizes(shape);
  const nLayers = sizes.length - 1;
  const count = paramCount(shape);
  const hiddenAct = activationCode(shape.activation);
  const widest = Math.max(1, ...shape.hidden);
  // Two ping-pong buffers hold consecutive hidden layers.
  const bufA = new Float64Array(widest);
  const bufB = new Float64Array(widest);
  return (params, obs, out) => {
    if (params.length !== count) throw new RangeError(`forward: expected ${count} parameters, got ${params.length}`);
    if (obs.length !== sizes[0]) throw new RangeError(`forward: expected ${sizes[0]} observations, got ${obs.length}`);
    if (out.length < sizes[nLayers]) throw new RangeError(`forward: output buffer shorter than ${sizes[nLayers]}`);
    let x: ArrayLike<number> = obs;
    let offset = 0;
    for (let l = 1; l <= nLayers; l++) {
      const last = l === nLayers;
      const y = last ? out : l % 2 === 1 ? bufA : bufB;
      offset = dense(params, offset, x, sizes[l - 1], y, sizes[l], last ? TANH : hiddenAct);
      x = y;
    }
  };
}
