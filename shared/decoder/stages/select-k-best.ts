/**
 * Univariate feature selection by the one-way ANOVA F statistic (Fisher 1925; the statistic of
 * scikit-learn's f_classif): F = [Σ_c n_c (m_c - m)²/(C-1)] / [Σ_c Σ_i (x_i - m_c)²/(n-C)].
 * The k features with the largest F on the TRAINING trials are kept, in ascending index order.
 * Done outside cross-validation this is the textbook leak (Kriegeskorte et al. 2009, Nat
 * Neurosci 12(5):535-540); as a stage it is refitted inside every fold.
 */
import { ParamError } from '../../types';
import {
  checkBinaryLabels, decodeF64, encodeF64, expectArtifact, numberField, registerStageKind,
  type FeatureRows, type Fitted, type Stage, type StageArtifact,
} from '../pipeline';
import { checkRows } from './feature-rows';

export type SelectKBestParams = {
  k: number;
};

/** Which features were kept and every feature's F score. */
export interface FittedSelectKBest extends Fitted<FeatureRows, FeatureRows> {
  readonly indices: Int32Array; // kept feature indices, ascending
  readonly scores: Float64Array; // [feature], F (NaN for features constant within classes and overall)
}

/** One-way ANOVA F per feature for two classes (labels 0/1). */
export function anovaF(x: FeatureRows, labels: Uint8Array): Float64Array {
  const p = checkRows(x);
  checkBinaryLabels(labels, x.length);
  const n = x.length;
  const sum = [new Float64Array(p), new Float64Array(p)], cnt = [0, 0];
  x.forEach((row, i) => { const c = labels[i]!; cnt[c]!++; for (let j = 0; j < p; j++) sum[c]![j]! += row[j]!; });
  const f = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    const m0 = sum[0]![j]! / cnt[0]!, m1 = sum[1]![j]! / cnt[1]!, m = (sum[0]![j]! + sum[1]![j]!) / n;
    let within = 0;
    for (let i = 0; i < n; i++) within += (x[i]![j]! - (labels[i] === 1 ? m1 : m0)) ** 2;
    const between = cnt[0]! * (m0 - m) ** 2 + cnt[1]! * (m1 - m) ** 2;
    f[j] = between / 1 / (within / (n - 2));
  }
  return f;
}

function makeFitted(params: SelectKBestParams, indices: Int32Array, scores: Float64Array): FittedSelectKBest {
  return {
    kind: 'select-k-best', indices, scores,
    transform(x) {
      checkRows(x, 'x', scores.length);
      return x.map((row) => {
        const out = new Float64Array(indices.length);
        for (let t = 0; t < indices.length; t++) out[t] = row[indices[t]!]!;
        return out;
      });
    },
    toArtifact: () => ({ kind: 'select-k-best', version: 1, params: { ...params },
                         learned: { indices: Array.from(indices), scores: encodeF64(scores) } }),
  };
}

/** Stage: keep the k features with the largest ANOVA F on the training trials. */
export function selectKBestStage(params: SelectKBestParams): Stage<FeatureRows, FeatureRows, FittedSelectKBest> {
  if (!Number.isInteger(params.k) || params.k < 1) throw new ParamError('k', `expected an integer >= 1, got ${params.k}`);
  return {
    kind: 'select-k-best', params,
    fit(x, labels) {
      const scores = anovaF(x, checkBinaryLabels(labels, x.length));
      if (params.k > scores.length) throw new ParamError('k', `expected at most ${scores.length} (the feature count), got ${params.k}`);
      const rank = (j: number) => (Number.isNaN(scores[j]!) ? -Infinity : scores[j]!);
      const order = Array.from(scores, (_, j) => j).sort((a, b) => rank(b) - rank(a) || a - b);
      const indices = Int32Array.from(order.slice(0, params.k)).sort();
      return makeFitted(params, indices, scores);
    },
  };
}

/** Rebuilds a fitted selection from its artifact. */
export function selectKBestFromArtifact(a: StageArtifact): FittedSelectKBest {
  expectArtifact(a, 'select-k-best', 1);
  const scores = decodeF64(a.learned.scores, 'learned.scores');
  const indices = Int32Array.from(decodeF64(a.learned.indices, 'learned.indices'));
  return makeFitted({ k: numberField(a.params, 'k', 'params') }, indices, scores);
}

registerStageKind('select-k-best', selectKBestFromArtifact);
