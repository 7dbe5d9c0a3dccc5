/**
 * Linear discriminant analysis with Ledoit-Wolf shrinkage of the within-class covariance
 * (Ledoit & Wolf 2004, "A well-conditioned estimator for large-dimensional covariance matrices",
 * J Multivar Anal 88(2):365-411; its use for single-trial EEG: Blankertz, Lemm, Treder, Haufe &
 * Müller 2011, NeuroImage 56(2):814-825). Computed as scikit-learn 1.2's
 * LinearDiscriminantAnalysis(solver='lsqr', shrinkage='auto'): each class's features are
 * z-scored, the Ledoit-Wolf intensity is estimated on them and the shrunk covariance scaled
 * back; Σ = Σ_c π_c S_c with priors π_c = n_c/n; a_c = Σ⁻¹μ_c; the binary discriminant is
 * w = a_1 - a_0, b = -½(μ_1ᵀa_1 - μ_0ᵀa_0) + log(π_1/π_0); P(class 1) = σ(wᵀx + b).
 */
import { ParamError, ShapeError } from '../../types';
import {
  checkBinaryLabels, decodeF64, encodeF64, expectArtifact, numberField, registerStageKind,
  type Classifier, type FeatureRows, type Stage, type StageArtifact,
} from '../pipeline';
import { checkRows } from '../stages/feature-rows';
import { cholesky, choleskySolve, sigmoid, symEig } from './dense';

/** 'auto' = Ledoit-Wolf per class on z-scored features; a number in [0, 1] = fixed intensity. */
export type ShrinkageLdaParams = { shrinkage?: 'auto' | number };

export interface FittedShrinkageLda extends Classifier<FeatureRows> {
  readonly coef: Float64Array; // [feature]
  readonly intercept: number;
  /** Shrinkage intensity used for class 0 and class 1. */
  readonly classShrinkage: [number, number];
}

/**
 * Ledoit-Wolf shrunk covariance (1/n normalisation) and its intensity, as scikit-learn's
 * `ledoit_wolf` / `ledoit_wolf_shrinkage` (data centred first unless `assumeCentered`):
 * shrunk = (1 - s)·S + s·μ·I, μ = trace(S)/p, s = min(β, δ)/δ with
 * δ = ‖S - μI‖²_F/p and β = (Σ_i ‖x_i x_iᵀ - S‖²_F / n²)/p (Ledoit & Wolf 2004, Lemma 3.2-3.4).
 * @param x [sample][feature] @returns covariance p×p row-major
 */
export function ledoitWolf(x: FeatureRows, assumeCentered = false): { covariance: Float64Array; shrinkage: number } {
  const p = checkRows(x);
  const n = x.length;
  if (n < 1) throw new ShapeError('x', 'expected at least one sample, got none');
  const mean = new Float64Array(p);
  if (!assumeCentered) for (const r of x) for (let j = 0; j < p; j++) mean[j]! += r[j]! / n;
  const xc = x.map((r) => Float64Array.from(r, (v, j) => v - mean[j]!));
  const s = new Float64Array(p * p);
  for (const r of xc) for (let a = 0; a < p; a++) { const ra = r[a]!; for (let b = 0; b < p; b++) s[a * p + b]! += ra * r[b]!; }
  for (let k = 0; k < s.length; k++) s[k]! /= n;
  if (p === 1) return { covariance: s, shrinkage: 0 };
  let mu = 0;
  for (let j = 0; j < p; j++) mu += s[j * p + j]!;
  mu /= p;
  // beta_ = Σ_ab (Σ_i x_ia² x_ib²) ; delta_ = Σ_ab (Σ_i x_ia x_ib)² / n² = ‖S‖²_F
  let betaSum = 0, deltaSum = 0;
  const sq = xc.map((r) => r.map((v) => v * v));
  for (let a = 0; a < p; a++) {
    for (let b = 0; b < p; b++) {
      let t = 0;
      for (let i = 0; i < n; i++) t += sq[i]![a]! * sq[i]![b]!;
      betaSum += t;
      deltaSum += s[a * p + b]! ** 2;
    }
  }
  let trace = 0;
  for (let j = 0; j < p; j++) trace += s[j * p + j]!;
  let beta = (betaSum / n - deltaSum) / (p * n);
  const delta = (deltaSum - 2 * mu * trace + p * mu * mu) / p;
  beta = Math.min(beta, delta);
  const shrinkage = beta === 0 ? 0 : beta / delta;
  const covariance = Float64Array.from(s, (v) => (1 - shrinkage) * v);
  for (let j = 0; j < p; j++) covariance[j * p + j]! += shrinkage * mu;
  return { covariance, shrinkage };
}

/** Shrunk covariance of one class (see module comment); returns it and the intensity used. */
function classCovariance(xc: FeatureRows, shrinkage: 'auto' | number): { cov: Float64Array; s: number } {
  const p = checkRows(xc), n = xc.length;
  const mean = new Float64Array(p);
  for (const r of xc) for (let j = 0; j < p; j++) mean[j]! += r[j]! / n;
  if (shrinkage !== 'auto') {
    const s = new Float64Array(p * p);
    for (const r of xc) for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) s[a * p + b]! += ((r[a]! - mean[a]!) * (r[b]! - mean[b]!)) / n;
    let mu = 0;
    for (let j = 0; j < p; j++) mu += s[j * p + j]! / p;
    const cov = Float64Array.from(s, (v) => (1 - shrinkage) * v);
    for (let j = 0; j < p; j++) cov[j * p + j]! += shrinkage * mu;
    return { cov, s: shrinkage };
  }
  const scale = new Float64Array(p);
  for (const r of xc) for (let j = 0; j < p; j++) scale[j]! += (r[j]! - mean[j]!) ** 2 / n;
  for (let j = 0; j < p; j++) scale[j] = scale[j]! > 0 ? Math.sqrt(scale[j]!) : 1;
  const z = xc.map((r) => Float64Array.from(r, (v, j) => (v - mean[j]!) / scale[j]!));
  const lw = ledoitWolf(z);
  const cov = Float64Array.from(lw.covariance, (v, k) => v * scale[Math.floor(k / p)]! * scale[k % p]!);
  return { cov, s: lw.shrinkage };
}

/**
 * Solves Σ a = b for symmetric Σ: Cholesky when positive definite, otherwise the minimum-norm
 * least-squares solution through the eigendecomposition (cut-off p·ε·λ_max, like LAPACK gelsd).
 */
function solveSymmetric(sigma: Float64Array, p: number, b: Float64Array): Float64Array {
  const l = cholesky(sigma, p);
  if (l !== null) return choleskySolve(l, p, b);
  const { values, vectors } = symEig(sigma, p);
  const cut = p * 2.220446049250313e-16 * Math.abs(values[0]!);
  const out = new Float64Array(p);
  for (let k = 0; k < p; k++) {
    if (!(values[k]! > cut)) continue;
    let proj = 0;
    for (let i = 0; i < p; i++) proj += vectors[i * p + k]! * b[i]!;
    proj /= values[k]!;
    for (let i = 0; i < p; i++) out[i]! += proj * vectors[i * p + k]!;
  }
  return out;
}

/** Fits the discriminant; also returns the pooled covariance Σ (p×p row-major). */
export function fitShrinkageLda(x: FeatureRows, labels: Uint8Array, shrinkage: 'auto' | number = 'auto'): {
  coef: Float64Array; intercept: number; covariance: Float64Array; classShrinkage: [number, number];
} {
  const p = checkRows(x);
  checkBinaryLabels(labels, x.length);
  const groups: FeatureRows[] = [[], []];
  x.forEach((r, i) => groups[labels[i]!]!.push(r));
  const n = x.length;
  const sigma = new Float64Array(p * p);
  const means: Float64Array[] = [], shr: number[] = [];
  for (const g of groups) {
    const m = new Float64Array(p);
    for (const r of g) for (let j = 0; j < p; j++) m[j]! += r[j]! / g.length;
    means.push(m);
    const { cov, s } = classCovariance(g, shrinkage);
    shr.push(s);
    for (let k = 0; k < sigma.length; k++) sigma[k]! += (g.length / n) * cov[k]!;
  }
  const a0 = solveSymmetric(sigma, p, means[0]!), a1 = solveSymmetric(sigma, p, means[1]!);
  const coef = Float64Array.from(a1, (v, j) => v - a0[j]!);
  let q0 = 0, q1 = 0;
  for (let j = 0; j < p; j++) { q0 += means[0]![j]! * a0[j]!; q1 += means[1]![j]! * a1[j]!; }
  const intercept = -0.5 * (q1 - q0) + Math.log(groups[1]!.length / groups[0]!.length);
  return { coef, intercept, covariance: sigma, classShrinkage: [shr[0]!, shr[1]!] };
}

function makeFitted(params: { shrinkage: 'auto' | number }, coef: Float64Array, intercept: number,
                    classShrinkage: [number, number]): FittedShrinkageLda {
  const decision = (x: FeatureRows) => {
    checkRows(x, 'x', coef.length);
    return Float64Array.from(x, (r) => { let s = intercept; for (let j = 0; j < coef.length; j++) s += coef[j]! * r[j]!; return s; });
  };
  return {
    kind: 'shrinkage-lda', coef, intercept, classShrinkage,
    transform: decision,
    predictProba: (x) => decision(x).map(sigmoid),
    toArtifact: () => ({ kind: 'shrinkage-lda', version: 1, params: { ...params },
                         learned: { coef: encodeF64(coef), intercept, classShrinkage: [...classShrinkage] } }),
  };
}

function checkParams(params: ShrinkageLdaParams): { shrinkage: 'auto' | number } {
  const s = params.shrinkage ?? 'auto';
  if (s !== 'auto' && !(typeof s === 'number' && s >= 0 && s <= 1)) {
    throw new ParamError('shrinkage', `expected 'auto' or a number in [0, 1], got ${String(s)}`);
  }
  return { shrinkage: s };
}

/** Stage: shrinkage LDA on feature rows (e.g. CSP log-variances). */
export function shrinkageLdaStage(params: ShrinkageLdaParams = {}): Stage<FeatureRows, Float64Array, FittedShrinkageLda> {
  const full = checkParams(params);
  return {
    kind: 'shrinkage-lda', params: full,
    fit(x, labels) {
      const r = fitShrinkageLda(x, checkBinaryLabels(labels, x.length), full.shrinkage);
      return makeFitted(full, r.coef, r.intercept, r.classShrinkage);
    },
  };
}

/** Rebuilds a fitted shrinkage LDA from its artifact. */
export function shrinkageLdaFromArtifact(a: StageArtifact): FittedShrinkageLda {
  expectArtifact(a, 'shrinkage-lda', 1);
  const s = a.params.shrinkage;
  const params = checkParams({ shrinkage: s === 'auto' ? 'auto' : numberField(a.params, 'shrinkage', 'params') });
  const cs = decodeF64(a.learned.classShrinkage, 'learned.classShrinkage');
  return makeFitted(params, decodeF64(a.learned.coef, 'learned.coef'), numberField(a.learned, 'intercept', 'learned'),
                    [cs[0] ?? NaN, cs[1] ?? NaN]);
}

registerStageKind('shrinkage-lda', shrinkageLdaFromArtifact);
