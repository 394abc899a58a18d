/**
 * Adam (Kingma & Ba 2015, "Adam: A Method for Stochastic Optimization", Algorithm 1), written
 * as an ascent step on plain arrays: it returns new arrays and leaves its inputs alone.
 */

/** Adam's hyper-parameters (a subset of EsConfig). */
export interface AdamSettings {
  /** Step size α, parameter units per step. */
  readonly learningRate: number;
  /** First-moment decay β₁ in [0, 1). */
  readonly beta1: number;
  /** Second-moment decay β₂ in [0, 1). */
  readonly beta2: number;
  /** ε > 0 in the denominator. */
  readonly epsilon: number;
}

/** What one Adam step produces. */
export interface AdamResult {
  readonly params: number[];
  readonly m: number[];
  readonly v: number[];
  /** Step count after this step (1 after the first). */
  readonly t: number;
}

/**
 * One step towards larger objective along `direction` (an ascent direction, e.g. an estimated
 * gradient): m ← β₁m + (1−β₁)d, v ← β₂v + (1−β₂)d², m̂ = m/(1−β₁ᵗ), v̂ = v/(1−β₂ᵗ),
 * θ ← θ + α·m̂/(sqrt(v̂) + ε). `t` is the step count before this step.
 */
export function adamAscent(
  params: readonly number[], m: readonly number[], v: readonly number[], t: number,
  direction: ArrayLike<number>, s: AdamSettings,
): AdamResult {
  const t1 = t + 1;
  const c1 = 1 - Math.pow(s.beta1, t1);
  const c2 = 1 - Math.pow(s.beta2, t1);
  const n = params.length;
  const p2 = new Array<number>(n);
  const m2 = new Array<number>(n);
  const v2 = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    const d = direction[i];
    m2[i] = s.beta1 * m[i] + (1 - s.beta1) * d;
    v2[i] = s.beta2 * v[i] + (1 - s.beta2) * d * d;
    p2[i] = params[i] + (s.learningRate * (m2[i] / c1)) / (Math.sqrt(v2[i] / c2) + s.epsilon);
  }
  return { params: p2, m: m2, v: v2, t: t1 };
}
