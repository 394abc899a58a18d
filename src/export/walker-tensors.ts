import { UserError } from '../core/index.js';
import { layerSizes, paramCount, parseShape, type PolicyShape } from '../policy/index.js';
import type { Tensor } from './safetensors.js';

/**
 * A flat parameter vector as named tensors: `layer<l>.weight` [out, in] (row-major, as in the
 * flat layout) and `layer<l>.bias` [out], for l = 0 (first hidden or output) upwards.
 */
export function paramsToTensors(shape: PolicyShape, params: ArrayLike<number>): Tensor[] {
  const sizes = layerSizes(shape);
  const out: Tensor[] = [];
  let at = 0;
  for (let l = 1; l < sizes.length; l++) {
    const [inn, o] = [sizes[l - 1], sizes[l]];
    out.push({ name: `layer${l - 1}.weight`, shape: [o, inn], data: Float64Array.from({ length: o * inn }, (_, i) => params[at + i]) });
    at += o * inn;
    out.push({ name: `layer${l - 1}.bias`, shape: [o], data: Float64Array.from({ length: o }, (_, i) => params[at + i]) });
    at += o;
  }
  return out;
}

/** The inverse of `paramsToTensors`, given the shape recorded in the file's metadata. */
export function tensorsToParams(tensors: ReadonlyMap<string, Tensor>, metadata: Record<string, string>, where: string): { shape: PolicyShape; params: Float64Array } {
  let shapeJson: unknown;
  try {
    shapeJson = JSON.parse(metadata.shape ?? 'null');
  } catch {
    throw new UserError(`${where}: __metadata__.shape is not JSON`);
  }
  const shape = parseShape(shapeJson, `${where}: __metadata__.shape`);
  const params = new Float64Array(paramCount(shape));
  const sizes = layerSizes(shape);
  let at = 0;
  for (let l = 1; l < sizes.length; l++) {
    for (const [part, len] of [['weight', sizes[l] * sizes[l - 1]], ['bias', sizes[l]]] as const) {
      const t = tensors.get(`layer${l - 1}.${part}`);
      if (!t || t.data.length !== len) throw new UserError(`${where}: tensor layer${l - 1}.${part} missing or of the wrong size (expected ${len} values)`);
      params.set(t.data, at);
      at += len;
    }
  }
  return { shape, params };
}
