/**
 * Common spatial patterns (Ramoser, Müller & Pfurtscheller 2000, "Optimal spatial filtering of
 * single trial EEG during imagined hand movement", IEEE Trans Rehabil Eng 8(4):441-446).
 *
 * Fit (training trials only): per trial the trace-normalised spatial covariance
 * C = X Xᵀ / trace(X Xᵀ) (X band-passed, [channel][sample], not re-centred, as in the paper);
 * class means C_0, C_1; composite C_c = C_0 + C_1 = U Λ Uᵀ; whitening P = Λ^{-1/2} Uᵀ (directions
 * with λ <= 1e-10·λ_max are dropped, so rank-deficient data such as common-average-referenced EEG
 * work); P C_0 Pᵀ = B Ψ Bᵀ with ψ descending; filters W = Bᵀ P. Each filter w solves the
 * generalised problem C_0 w = ψ (C_0 + C_1) w with wᵀ(C_0 + C_1)w = 1. The first m filters
 * (largest ψ) maximise class-0 variance relative to class 1, the last m the reverse; m pairs
 * are kept in that order. Spatial patterns (the columns of W⁻¹ = U Λ^{1/2} B, one per filter)
 * are kept for display: pattern k is the scalp projection of source k.
 * Features (transform): f_p = log( var(w_p X) / Σ_q var(w_q X) ) over the 2m kept filters
 * (Ramoser et al. 2000, feature definition), variance with the mean removed.
 */
import { ParamError, ShapeError, type Epochs } from '../../types';
import { checkEpochs } from '../epochs';
import {
  checkBinaryLabels, decodeF64, decodeRows, encodeF64, encodeRows, expectArtifact, numberField, registerStageKind,
  type FeatureRows, type Fitted, type Stage, type StageArtifact,
} from '../pipeline';
import { symEig } from './dense';

export type CspParams = {
  /** Filter pairs m (default 3, giving 6 filters). */
  pairs?: number;
};

export interface FittedCsp extends Fitted<Epochs, FeatureRows> {
  readonly filters: Float64Array[]; // [2m][channel]
  readonly patterns: Float64Array[]; // [2m][channel]
  readonly eigenvalues: Float64Array; // [2m], ψ of each kept filter
}

/**
 * Class-mean trace-normalised covariances (C×C row-major) of class 0 and class 1.
 */
export function classCovariances(epochs: Epochs, labels: Uint8Array): [Float64Array, Float64Array] {
  const { trials, channels: c, samples } = checkEpochs(epochs);
  checkBinaryLabels(labels, trials);
  const sums = [new Float64Array(c * c), new Float64Array(c * c)];
  const counts = [0, 0];
  const cov = new Float64Array(c * c);
  for (let t = 0; t < trials; t++) {
    const x = epochs[t]!;
    let trace = 0;
    for (let a = 0; a < c; a++) {
      const xa = x[a]!;
      for (let b = a; b < c; b++) {
        const xb = x[b]!;
        let s = 0;
        for (let k = 0; k < samples; k++) s += xa[k]! * xb[k]!;
        cov[a * c + b] = s;
        cov[b * c + a] = s;
      }
      trace += cov[a * c + a]!;
    }
    if (!(trace > 0)) throw new ShapeError(`epochs[${t}]`, 'expected a trial with non-zero power, got all zeros (or NaN)');
    const k = labels[t]!;
    const sum = sums[k]!;
    for (let i = 0; i < c * c; i++) sum[i]! += cov[i]! / trace;
    counts[k]!++;
  }
  for (const k of [0, 1]) for (let i = 0; i < c * c; i++) sums[k]![i]! /= counts[k]!;
  return [sums[0]!, sums[1]!];
}

/**
 * Solves the CSP problem for given class covariances (C×C row-major).
 * @returns all filters (rows, ψ descending), their patterns and ψ; rank r <= C rows each
 */
export function cspFromCovariances(c0: Float64Array, c1: Float64Array, channels: number): {
  filters: Float64Array[]; patterns: Float64Array[]; eigenvalues: Float64Array;
} {
  const c = channels;
  const comp = Float64Array.from(c0, (v, i) => v + c1[i]!);
  const { values: lam, vectors: u } = symEig(comp, c);
  const keep: number[] = [];
  for (let j = 0; j < c; j++) if (lam[j]! > 1e-10 * lam[0]!) keep.push(j);
  const r = keep.length;
  // P = Λ^{-1/2} Uᵀ (r×C); Pinv = U Λ^{1/2} (C×r)
  const p = keep.map((j) => Float64Array.from({ length: c }, (_, i) => u[i * c + j]! / Math.sqrt(lam[j]!)));
  // S = P C0 Pᵀ (r×r)
  const pc0 = p.map((row) => {
    const out = new Float64Array(c);
    for (let b = 0; b < c; b++) { let s = 0; for (let a = 0; a < c; a++) s += row[a]! * c0[a * c + b]!; out[b] = s; }
    return out;
  });
  const s = new Float64Array(r * r);
  for (let i = 0; i < r; i++) for (let j = 0; j < r; j++) {
    let v = 0;
    for (let a = 0; a < c; a++) v += pc0[i]![a]! * p[j]![a]!;
    s[i * r + j] = v;
  }
  const { values: psi, vectors: bm } = symEig(s, r);
  const filters: Float64Array[] = [], patterns: Float64Array[] = [];
  for (let k = 0; k < r; k++) {
    const w = new Float64Array(c), pat = new Float64Array(c);
    for (let i = 0; i < r; i++) {
      const bik = bm[i * r + k]!;
      for (let a = 0; a < c; a++) w[a]! += bik * p[i]![a]!;
      const sq = Math.sqrt(lam[keep[i]!]!);
      for (let a = 0; a < c; a++) pat[a]! += u[a * c + keep[i]!]! * sq * bik;
    }
    filters.push(w);
    patterns.push(pat);
  }
  return { filters, patterns, eigenvalues: psi };
}

/** Normalised log-variance features of the given filters (module comment). */
export function logVarianceFeatures(epochs: Epochs, filters: readonly Float64Array[]): FeatureRows {
  const c = filters[0]?.length ?? 0;
  const { samples } = checkEpochs(epochs, 'epochs', c);
  const z = new Float64Array(samples);
  return epochs.map((x) => {
    const v = new Float64Array(filters.length);
    let total = 0;
    filters.forEach((w, f) => {
      z.fill(0);
      for (let a = 0; a < c; a++) { const wa = w[a]!, xa = x[a]!; for (let k = 0; k < samples; k++) z[k]! += wa * xa[k]!; }
      let mean = 0;
      for (let k = 0; k < samples; k++) mean += z[k]!;
      mean /= samples;
      let s = 0;
      for (let k = 0; k < samples; k++) s += (z[k]! - mean) ** 2;
      v[f] = s / samples;
      total += v[f]!;
    });
    return v.map((vf) => Math.log(vf / total));
  });
}

function makeFitted(pairs: number, filters: Float64Array[], patterns: Float64Array[], eigenvalues: Float64Array): FittedCsp {
  return {
    kind: 'csp', filters, patterns, eigenvalues,
    transform: (x) => logVarianceFeatures(x, filters),
    toArtifact: () => ({ kind: 'csp', version: 1, params: { pairs },
                         learned: { filters: encodeRows(filters), patterns: encodeRows(patterns), eigenvalues: encodeF64(eigenvalues) } }),
  };
}

/** Stage: CSP log-variance features from band-passed epochs (fit on training trials only). */
export function cspStage(params: CspParams = {}): Stage<Epochs, FeatureRows, FittedCsp> {
  const pairs = params.pairs ?? 3;
  if (!Number.isInteger(pairs) || pairs < 1) throw new ParamError('pairs', `expected an integer >= 1, got ${pairs}`);
  return {
    kind: 'csp', params: { pairs },
    fit(x, labels) {
      const { channels } = checkEpochs(x);
      const [c0, c1] = classCovariances(x, checkBinaryLabels(labels, x.length));
      const all = cspFromCovariances(c0, c1, channels);
      const r = all.filters.length;
      if (2 * pairs > r) throw new ParamError('pairs', `expected at most ${Math.floor(r / 2)} pairs for rank ${r} data, got ${pairs}`);
      const idx = [...Array.from({ length: pairs }, (_, k) => k), ...Array.from({ length: pairs }, (_, k) => r - pairs + k)];
      return makeFitted(pairs, idx.map((k) => all.filters[k]!), idx.map((k) => all.patterns[k]!),
                        Float64Array.from(idx, (k) => all.eigenvalues[k]!));
    },
  };
}

/** Rebuilds a fitted CSP from its artifact. */
export function cspFromArtifact(a: StageArtifact): FittedCsp {
  expectArtifact(a, 'csp', 1);
  return makeFitted(numberField(a.params, 'pairs', 'params'), decodeRows(a.learned.filters, 'learned.filters'),
                    decodeRows(a.learned.patterns, 'learned.patterns'), decodeF64(a.learned.eigenvalues, 'learned.eigenvalues'));
}

registerStageKind('csp', cspFromArtifact);
