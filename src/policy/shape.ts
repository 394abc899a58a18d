import { assertNoProblems } from '../core/index.js';

/** Activation of the hidden layers. The output layer always uses tanh. */
export type Activation = 'tanh' | 'relu' | 'linear';

/** The activations a shape may name, in a fixed order for messages. */
export const ACTIVATIONS: readonly Activation[] = ['tanh', 'relu', 'linear'];

/** Largest hidden layer accepted: far above what a walker needs, low enough to catch typos. */
export const MAX_HIDDEN_SIZE = 1024;

/**
 * The architecture of a fully connected controller network.
 *
 * Actions come out of a tanh, so every action lies in [-1, 1].
 */
export interface PolicyShape {
  /** Observation length (sensor count), integer ≥ 1. */
  readonly inputs: number;
  /** Width of each hidden layer, each an integer in 1..1024. Empty: a linear policy (tanh of W x + b). */
  readonly hidden: readonly number[];
  /** Action length (motor count), integer ≥ 1. */
  readonly outputs: number;
  /** Activation of the hidden layers. */
  readonly activation: Activation;
}

/** Layer widths from input to output: `[inputs, ...hidden, outputs]`. */
export function layerSizes(shape: PolicyShape): number[] {
  return [shape.inputs, ...shape.hidden, shape.outputs];
}

/**
 * Number of parameters of a network of this shape.
 *
 * Flat parameter layout (a `Float64Array`, published with exported walkers): for each layer l
 * in order input→hidden₁→…→output, first its weight matrix W_l of shape [out_l, in_l] stored
 * row-major (`W_l[o * in_l + i]`), then its bias b_l of length out_l. Layer l computes
 * y = act_l(W_l x + b_l), with act_l the shape's activation for hidden layers and tanh for the
 * output layer.
 */
export function paramCount(shape: PolicyShape): number {
  const sizes = layerSizes(shape);
  let n = 0;
  for (let l = 1; l < sizes.length; l++) n += sizes[l] * sizes[l - 1] + sizes[l];
  return n;
}

function isPositiveInt(x: unknown, max = Number.MAX_SAFE_INTEGER): boolean {
  return typeof x === 'number' && Number.isInteger(x) && x >= 1 && x <= max;
}

function show(x: unknown): string {
  return x === undefined ? 'nothing' : JSON.stringify(x) ?? String(x);
}

/**
 * Problems with a policy shape read from JSON, each prefixed with its path under `where`
 * (e.g. `recipe.json: policy.hidden[1]: ...`). Empty when the shape is valid.
 */
export function validateShape(shape: unknown, where: string): string[] {
  if (typeof shape !== 'object' || shape === null || Array.isArray(shape)) {
    return [`${where}: expected an object {inputs, hidden, outputs, activation}, found ${show(shape)}`];
  }
  const s = shape as Record<string, unknown>;
  const problems: string[] = [];
  for (const key of ['inputs', 'outputs']) {
    if (!isPositiveInt(s[key])) problems.push(`${where}.${key}: expected an integer ≥ 1, found ${show(s[key])}`);
  }
  if (!Array.isArray(s.hidden)) {
    problems.push(`${where}.hidden: expected an array of layer widths (may be empty), found ${show(s.hidden)}`);
  } else {
    s.hidden.forEach((h: unknown, i: number) => {
      if (!isPositiveInt(h, MAX_HIDDEN_SIZE)) {
        problems.push(`${where}.hidden[${i}]: expected an integer in 1..${MAX_HIDDEN_SIZE}, found ${show(h)}`);
      }
    });
  }
  if (!ACTIVATIONS.includes(s.activation as Activation)) {
    problems.push(`${where}.activation: expected one of ${ACTIVATIONS.join(', ')}, found ${show(s.activation)}`);
  }
  const known = new Set(['inputs', 'hidden', 'outputs', 'activation']);
  for (const key of Object.keys(s).sort()) {
    if (!known.has(key)) problems.push(`${where}.${key}: unknown field`);
  }
  return problems;
}

/** A validated copy of a policy shape read from JSON; throws a UserError listing every problem. */
export function parseShape(json: unknown, where: string): PolicyShape {
  assertNoProblems(`policy shape at ${where}`, validateShape(json, where));
  const s = json as PolicyShape;
  return { inputs: s.inputs, hidden: [...s.hidden], outputs: s.outputs, activation: s.activation };
}
