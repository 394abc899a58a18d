import { stream } from './rng.js';

/** Label of the per-seed stream a perturbation is drawn from. */
export const NOISE_LABEL = 'es-noise';

/**
 * The perturbation ε ~ N(0, I) of length `dim` for `seed`: standard normal draws from the core
 * stream `stream(seed, 'es-noise')`. Pure in (seed, dim), so a worker rebuilds it from the seed
 * alone instead of receiving the vector. Writes into `out` when given (length ≥ dim).
 */
export function perturbation(seed: number, dim: number, out?: Float64Array): Float64Array {
  const eps = out ?? new Float64Array(dim);
  const s = stream(seed, NOISE_LABEL);
  for (let i = 0; i < dim; i++) eps[i] = s.normal();
  return eps;
}

/**
 * The candidate mean + sign·σ·ε(seed), length `mean.length`. The two signs of one seed are the
 * mirrored pair: the same ε added and subtracted. Writes into `out` when given; `out` may not
 * alias `mean`.
 */
export function candidate(
  mean: ArrayLike<number>, seed: number, sign: 1 | -1, sigma: number, out?: Float64Array,
): Float64Array {
  const x = perturbation(seed, mean.length, out);
  const step = sign * sigma;
  for (let i = 0; i < mean.length; i++) x[i] = mean[i] + step * x[i];
  return x;
}
