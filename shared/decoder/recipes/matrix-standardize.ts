/**
 * Per-feature standardisation of matrix features, learned on the training trials (z-scoring each
 * entry of each block with its training mean and population standard deviation, as a standard
 * scaler does; an entry constant in training keeps scale 1). The block structure and the block
 * weights pass through unchanged.
 */
import { decodeF64, encodeF64, expectArtifact, registerStageKind, type Fitted, type Stage, type StageArtifact } from '../pipeline';
import { blockLayout } from '../tracenorm-data';
import { ShapeError } from '../../types';
import { checkMatrixTrials, type MatrixTrials } from './matrix-trials';

/** What standardisation learned: per feature (trial layout) mean and scale. */
export interface FittedMatrixStandardize extends Fitted<MatrixTrials, MatrixTrials> {
  readonly mean: Float64Array; // [feature]
  readonly scale: Float64Array; // [feature]
}

function makeFitted(mean: Float64Array, scale: Float64Array): FittedMatrixStandardize {
  return {
    kind: 'matrix-standardize', mean, scale,
    transform(x) {
      const dim = checkMatrixTrials(x);
      if (dim !== mean.length) throw new ShapeError('x.features', `expected ${mean.length} values per trial, got ${dim}`);
      const src = x.features.x;
      const out = new Float64Array(src.length);
      for (let i = 0; i < x.features.nTrials; i++) {
        const o = i * dim;
        for (let j = 0; j < dim; j++) out[o + j] = (src[o + j]! - mean[j]!) / scale[j]!;
      }
      return { features: { nTrials: x.features.nTrials, blocks: x.features.blocks, x: out }, blockWeights: x.blockWeights };
    },
    toArtifact: () => ({ kind: 'matrix-standardize', version: 1, params: {}, learned: { mean: encodeF64(mean), scale: encodeF64(scale) } }),
  };
}

/** Stage: per-feature z-scoring fitted on training trials (module comment). */
export function matrixStandardizeStage(): Stage<MatrixTrials, MatrixTrials> {
  return {
    kind: 'matrix-standardize', params: {},
    fit(x) {
      const dim = checkMatrixTrials(x);
      const n = x.features.nTrials;
      blockLayout(x.features);
      const mean = new Float64Array(dim), sq = new Float64Array(dim);
      const v = x.features.x;
      for (let i = 0; i < n; i++) for (let j = 0; j < dim; j++) mean[j]! += v[i * dim + j]! / n;
      for (let i = 0; i < n; i++) for (let j = 0; j < dim; j++) sq[j]! += (v[i * dim + j]! - mean[j]!) ** 2 / n;
      const scale = sq.map((s) => (s > 0 ? Math.sqrt(s) : 1));
      return makeFitted(mean, scale);
    },
  };
}

/** Rebuilds the fitted stage from its artifact. */
export function matrixStandardizeFromArtifact(a: StageArtifact): FittedMatrixStandardize {
  expectArtifact(a, 'matrix-standardize', 1);
  return makeFitted(decodeF64(a.learned.mean, 'learned.mean'), decodeF64(a.learned.scale, 'learned.scale'));
}

registerStageKind('matrix-standardize', matrixStandardizeFromArtifact);
