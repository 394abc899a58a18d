import type { Stream } from '../core/index.js';
import { layerSizes, paramCount, type PolicyShape } from './shape.js';

/** Options of {@link initParams}. */
export interface InitOptions {
  /**
   * Factor on the output layer's weights, ≥ 0 (dimensionless). Default 0.1.
   *
   * Why small: with full-size output weights the initial actions are large and often saturate
   * the tanh, so the first walker flails and the perturbations σ·ε change little once the
   * output is saturated. Starting near zero action (a still walker holding its neutral pose)
   * keeps every output in tanh's steep range, where evolution strategies see a clear signal.
   * Shrinking the last layer at initialisation is common practice for policy networks.
   */
  readonly outputScale?: number;
}

/**
 * Fresh parameters for `shape` in the layout documented on {@link paramCount}, deterministic
 * from `stream` (its draws are consumed in layout order: layer by layer, weights row by row).
 *
 * Weights are N(0, 1)·sqrt(1 / in_l), the fan-in scaling that keeps pre-activations of order
 * one (common practice); the output layer's weights are further multiplied by
 * `options.outputScale`. Biases start at 0.
 */
export function initParams(shape: PolicyShape, stream: Stream, options: InitOptions = {}): Float64Array {
  const outputScale = options.outputScale ?? 0.1;
  if (!(outputScale >= 0) || !Number.isFinite(outputScale)) {
    throw new RangeError(`initParams: outputScale must be a finite number ≥ 0, got ${outputScale}`);
  }
  const sizes = layerSizes(shape);
  const params = new Float64Array(paramCount(shape));
  let k = 0;
  for (let l = 1; l < sizes.length; l++) {
    const nIn = sizes[l - 1];
    const nOut = sizes[l];
    const scale = Math.sqrt(1 / nIn) * (l === sizes.length - 1 ? outputScale : 1);
    for (let j = 0; j < nOut * nIn; j++) params[k++] = stream.normal() * scale;
    k += nOut; // biases stay 0
  }
  return params;
}
