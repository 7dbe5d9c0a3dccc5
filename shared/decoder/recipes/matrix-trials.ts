/**
 * The data type that flows between the matrix-feature stages of both recipes: per trial one
 * matrix per block (tracenorm-data.ts layout) plus the per-block penalty weights w_k that the
 * upstream stages learned (the plausibility prior of the ICA stage; all 1 otherwise). Carrying
 * w_k with the data keeps each stage's `fit` a function of its training input only.
 */
import { blockLayout, type MatrixFeatures } from '../tracenorm-data';
import { ShapeError } from '../../types';

/** Matrix features of n trials and the block weights w_k (length = number of blocks). */
export interface MatrixTrials {
  features: MatrixFeatures;
  blockWeights: Float64Array; // [block], > 0
}

/** The trials at `indices` (copies of their feature values), same blocks and weights. */
export function subsetTrials(x: MatrixTrials, indices: ArrayLike<number>): MatrixTrials {
  const { dim } = blockLayout(x.features);
  const out = new Float64Array(indices.length * dim);
  for (let i = 0; i < indices.length; i++) {
    const j = indices[i]!;
    if (!(j >= 0 && j < x.features.nTrials)) throw new ShapeError('indices', `index ${j} outside [0, ${x.features.nTrials})`);
    out.set(x.features.x.subarray(j * dim, (j + 1) * dim), i * dim);
  }
  return { features: { nTrials: indices.length, blocks: x.features.blocks, x: out }, blockWeights: x.blockWeights };
}

/** Checks that the data are MatrixTrials (stages receive `unknown` when pipelines mix types). */
export function checkMatrixTrials(x: MatrixTrials, field = 'x'): number {
  if (typeof x !== 'object' || x === null || !('features' in x) || !('blockWeights' in x)) {
    throw new ShapeError(field, 'expected MatrixTrials { features, blockWeights }');
  }
  const { dim } = blockLayout(x.features);
  if (x.blockWeights.length !== x.features.blocks.length) {
    throw new ShapeError(`${field}.blockWeights`, `expected ${x.features.blocks.length} weights, got ${x.blockWeights.length}`);
  }
  return dim;
}
