/**
 * Evolution strategies as ask/tell on a plain, serialisable state (Salimans, Ho, Chen, Sidor,
 * Sutskever 2017, "Evolution Strategies as a Scalable Alternative to Reinforcement Learning"):
 * mirrored (antithetic) Gaussian sampling, centred-rank fitness shaping, an L2 weight-decay
 * term, and an Adam step (Kingma & Ba 2015) on the estimated gradient.
 *
 * Only seeds cross to the evaluators; each rebuilds its perturbation from its seed.
 */
import { restoreStream, type Stream, type StreamState } from '../core/index.js';
import { adamAscent } from './adam.js';
import { mirroredCount, type EsConfig } from './config.js';
import { perturbation } from './noise.js';
import { centredRanks } from './ranks.js';

/**
 * Everything about an ES run that changes between iterations. Plain JSON data, replaced, never
 * mutated: `canonicalJson(state)` is a complete checkpoint.
 */
export interface EsState {
  /** Current search mean θ (the walker's parameters), length = parameter count. */
  readonly mean: readonly number[];
  /** Adam first-moment average, same length as `mean`. */
  readonly m: readonly number[];
  /** Adam second-moment average, same length as `mean`. */
  readonly v: readonly number[];
  /** Number of updates (`tell`s) done so far. */
  readonly t: number;
  /** State of the stream the per-pair seeds are drawn from. */
  readonly stream: StreamState;
}

/** A fresh state around `mean`, drawing its seeds from `noiseStream` (its current position is saved). */
export function initEsState(mean: ArrayLike<number>, noiseStream: Stream): EsState {
  const n = mean.length;
  return {
    mean: Array.from(mean),
    m: new Array<number>(n).fill(0),
    v: new Array<number>(n).fill(0),
    t: 0,
    stream: noiseStream.state(),
  };
}

/**
 * Draws one uint32 seed per mirrored perturbation (population/2) from the state's stream. Pair i is evaluated at
 * `candidate(state.mean, seeds[i], +1, σ)` and `candidate(state.mean, seeds[i], -1, σ)`.
 * Returns the seeds and the state with its stream advanced (pass that state to `tell`).
 */
export function ask(state: EsState, config: EsConfig): { seeds: number[]; state: EsState } {
  const s = restoreStream(state.stream);
  const seeds: number[] = [];
  for (let i = 0; i < mirroredCount(config); i++) seeds.push(s.uint32());
  return { seeds, state: { ...state, stream: s.state() } };
}

/**
 * The search-gradient estimate g = 1/(2·n·σ) Σ_i (u_i⁺ − u_i⁻) ε_i over n mirrored pairs, where
 * u are the centred ranks of all 2n fitnesses (plus entries first, then minus; the order does
 * not matter since ties share ranks). Points uphill. Length `dim`.
 */
export function estimateGradient(
  seeds: readonly number[], fitnessPlus: readonly number[], fitnessMinus: readonly number[],
  sigma: number, dim: number,
): Float64Array {
  const n = seeds.length;
  if (fitnessPlus.length !== n || fitnessMinus.length !== n) {
    throw new RangeError(`estimateGradient: ${n} seeds but ${fitnessPlus.length}/${fitnessMinus.length} fitnesses`);
  }
  const u = centredRanks([...fitnessPlus, ...fitnessMinus]);
  const g = new Float64Array(dim);
  const eps = new Float64Array(dim);
  const scale = 1 / (2 * n * sigma);
  for (let i = 0; i < n; i++) {
    const w = (u[i] - u[n + i]) * scale;
    if (w === 0) continue;
    perturbation(seeds[i], dim, eps);
    for (let j = 0; j < dim; j++) g[j] += w * eps[j];
  }
  return g;
}

/**
 * Updates the state from the fitnesses of the pairs `ask` returned (larger is better; NaN and
 * other non-finite values rank worst). The ascent direction is the estimated gradient minus
 * weightDecay·mean (an L2 penalty on the objective, passed through Adam like the gradient,
 * not decoupled from it). Returns a new state with t + 1.
 */
export function tell(
  state: EsState, config: EsConfig, seeds: readonly number[],
  fitnessPlus: readonly number[], fitnessMinus: readonly number[],
): EsState {
  if (seeds.length !== mirroredCount(config)) {
    throw new RangeError(`tell: expected ${mirroredCount(config)} seeds (half of config.population), got ${seeds.length}`);
  }
  const dim = state.mean.length;
  const d = estimateGradient(seeds, fitnessPlus, fitnessMinus, config.sigma, dim);
  if (config.weightDecay !== 0) {
    for (let j = 0; j < dim; j++) d[j] -= config.weightDecay * state.mean[j];
  }
  const r = adamAscent(state.mean, state.m, state.v, state.t, d, config);
  return { mean: r.params, m: r.m, v: r.v, t: r.t, stream: state.stream };
}

/** What one synchronous {@link esStep} did. */
export interface EsStepResult {
  /** The state after the update. */
  readonly state: EsState;
  /** Fitness of mean + σ·ε_i for each pair i. */
  readonly fitnessPlus: number[];
  /** Fitness of mean − σ·ε_i for each pair i. */
  readonly fitnessMinus: number[];
}

/**
 * One ask/evaluate/tell iteration in this thread, for tests and simple callers. `evaluate`
 * receives a buffer that is reused between calls: read it, do not keep it.
 */
export function esStep(state: EsState, config: EsConfig, evaluate: (params: Float64Array) => number): EsStepResult {
  const asked = ask(state, config);
  const dim = state.mean.length;
  const eps = new Float64Array(dim);
  const x = new Float64Array(dim);
  const fitnessPlus: number[] = [];
  const fitnessMinus: number[] = [];
  for (const seed of asked.seeds) {
    perturbation(seed, dim, eps);
    for (const [sign, into] of [[1, fitnessPlus], [-1, fitnessMinus]] as const) {
      const step = sign * config.sigma;
      for (let j = 0; j < dim; j++) x[j] = state.mean[j] + step * eps[j];
      into.push(evaluate(x));
    }
  }
  return { state: tell(asked.state, config, asked.seeds, fitnessPlus, fitnessMinus), fitnessPlus, fitnessMinus };
}
