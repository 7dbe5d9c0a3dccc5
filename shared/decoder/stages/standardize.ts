/**
 * Per-feature z-scoring learned on training trials (the usual "standard scaler"; population
 * standard deviation, ddof 0, as scikit-learn's StandardScaler). A feature that is constant in
 * training keeps scale 1, so it maps to 0 rather than NaN.
 */
import {
  decodeF64, encodeF64, expectArtifact, registerStageKind,
  type FeatureRows, type Fitted, type Stage, type StageArtifact,
} from '../pipeline';
import { checkRows } from './feature-rows';

/** Learned means and scales, one per feature. */
export interface FittedStandardize extends Fitted<FeatureRows, FeatureRows> {
  readonly mean: Float64Array; // [feature]
  readonly scale: Float64Array; // [feature]
}

function makeFitted(mean: Float64Array, scale: Float64Array): FittedStandardize {
  return {
    kind: 'standardize', mean, scale,
    transform(x) {
      checkRows(x, 'x', mean.length);
      return x.map((row) => {
        const out = new Float64Array(row.length);
        for (let j = 0; j < row.length; j++) out[j] = (row[j]! - mean[j]!) / scale[j]!;
        return out;
      });
    },
    toArtifact: () => ({ kind: 'standardize', version: 1, params: {},
                         learned: { mean: encodeF64(mean), scale: encodeF64(scale) } }),
  };
}

/** Stage: z-score each feature with the training trials' mean and standard deviation. */
export function standardizeStage(): Stage<FeatureRows, FeatureRows, FittedStandardize> {
  return {
    kind: 'standardize', params: {},
    fit(x) {
      const p = checkRows(x);
      const n = x.length;
      const mean = new Float64Array(p), scale = new Float64Array(p);
      for (const row of x) for (let j = 0; j < p; j++) mean[j]! += row[j]! / n;
      for (const row of x) for (let j = 0; j < p; j++) scale[j]! += (row[j]! - mean[j]!) ** 2 / n;
      for (let j = 0; j < p; j++) scale[j] = scale[j]! > 0 ? Math.sqrt(scale[j]!) : 1;
      return makeFitted(mean, scale);
    },
  };
}

/** Rebuilds a fitted standardize stage from its artifact. */
export function standardizeFromArtifact(a: StageArtifact): FittedStandardize {
  expectArtifact(a, 'standardize', 1);
  return makeFitted(decodeF64(a.learned.mean, 'learned.mean'), decodeF64(a.learned.scale, 'learned.scale'));
}

registerStageKind('standardize', standardizeFromArtifact);
