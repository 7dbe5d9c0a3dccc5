/**
 * Trace-norm (nuclear-norm) regularised logistic regression on matrix-valued features
 * (Tomioka & Aihara 2007, "Classifying matrices with a spectral regularization", ICML;
 * Tomioka & Müller 2010, NeuroImage 49(1):415–432): each trial carries one matrix per block
 * (an ICA component's F×T time-frequency matrix, or a spatial covariance), and the weight of
 * each block is pushed towards low rank, with a per-block weight w_k so whole blocks drop out.
 *
 * Objective (sum form, REFERENCES.md §4; labels y ∈ {0,1}, s = 2y − 1, bias unpenalised):
 *   F(W, b) = Σ_i log(1 + exp(−s_i(Σ_k ⟨W_k, X_ik⟩ + b))) + λ Σ_k w_k ‖W_k‖_* + (α/2) Σ_k ‖W_k‖_F²
 * Solved by monotone FISTA with backtracking and singular value soft-thresholding, or eigenvalue
 * soft-thresholding for blocks flagged symmetric (tracenorm-fista.ts states the algorithm and
 * stopping rule).
 */
import { createPartialEigWorkspace } from '../linalg/symmetric-eig-partial';
import { svd } from '../linalg/svd';
import { ParamError, ShapeError } from '../types';
import {
  type BlockShape, type MatrixFeatures, blockLayout, checkBlockWeights, checkLabels, lipschitzBound, margins, sigmoid,
} from './tracenorm-data';
import { runFista } from './tracenorm-fista';
import { symmetricSpectralNorm } from './tracenorm-prox';

export type { BlockShape, MatrixFeatures } from './tracenorm-data';
export { lipschitzBound } from './tracenorm-data';
export { svt, symmetricSvt, type SvtResult } from './tracenorm-prox';

/** Hyperparameters of one fit. */
export interface TraceNormParams {
  /** λ ≥ 0, in the units of the sum-form loss (compare with {@link lambdaMax}). */
  lambda: number;
  /** α ≥ 0, optional ridge term (α/2)‖W‖_F²; default 0. */
  alpha?: number;
  /** Iteration cap; default 5000. */
  maxIter?: number;
  /** Relative tolerance of the stopping rule; default 1e-6. */
  tol?: number;
  /** w_k > 0 per block; default all 1. */
  blockWeights?: Float64Array;
}

/** A fitted trace-norm logistic regression. Plain data: JSON-safe once arrays are converted. */
export interface TraceNormModel {
  blocks: BlockShape[];
  /** W_k per block, rows×cols row-major. */
  weights: Float64Array[];
  bias: number;
  lambda: number;
  alpha: number;
  blockWeights: Float64Array;
  iterations: number;
  converged: boolean;
  /** F(W, b) at the returned point. */
  objective: number;
  /** rank(W_k) per block (number of singular values left by the last thresholding). */
  ranks: number[];
  /** Indices of blocks with W_k ≠ 0, ascending. */
  activeBlocks: number[];
  /** Last step constant L (reused when this model warm-starts another fit). */
  lipschitz: number;
}

/**
 * λ_max = max_k ‖Σ_i (y_i − ȳ) X_ik‖₂ / w_k: the smallest λ at which every W_k = 0 (then the
 * optimal bias is log(n₁/n₀)); derived from the optimality condition at W = 0 with the spectral
 * norm as the dual of the trace norm (REFERENCES.md §4; Recht, Fazel & Parrilo 2010). Exact
 * (largest singular value by SVD; for a symmetric block the largest |eigenvalue|). The α term
 * does not change it.
 */
export function lambdaMax(features: MatrixFeatures, labels: Uint8Array, blockWeights?: Float64Array): number {
  const layout = blockLayout(features);
  const ones = checkLabels(labels, features.nTrials, true);
  const bw = checkBlockWeights(blockWeights, features.blocks.length);
  const ybar = ones / features.nTrials;
  const { dim, offsets, sizes } = layout;
  const g = new Float64Array(dim);
  for (let i = 0; i < features.nTrials; i++) {
    const r = labels[i]! - ybar;
    for (let j = 0; j < dim; j++) g[j]! += r * features.x[i * dim + j]!;
  }
  let best = 0;
  features.blocks.forEach((b, k) => {
    let s: number;
    if (b.symmetric === true) { // ‖G‖₂ = max |eigenvalue| of the symmetric gradient
      s = symmetricSpectralNorm(g, offsets[k]!, createPartialEigWorkspace(b.rows));
    } else {
      s = svd(g.subarray(offsets[k]!, offsets[k]! + sizes[k]!), b.rows, b.cols).s[0]!;
    }
    best = Math.max(best, s / bw[k]!);
  });
  return best;
}

/**
 * Fits the model by MFISTA (tracenorm-fista.ts). A `warm` model of the same block shapes is
 * the starting point (used along a λ path); otherwise W = 0, b = log(n₁/n₀).
 * Inputs are not modified.
 */
export function fitTraceNorm(features: MatrixFeatures, labels: Uint8Array, params: TraceNormParams,
                             warm?: TraceNormModel): TraceNormModel {
  const layout = blockLayout(features);
  const ones = checkLabels(labels, features.nTrials, true);
  const bw = checkBlockWeights(params.blockWeights, features.blocks.length);
  const { lambda, alpha = 0, maxIter = 5000, tol = 1e-6 } = params;
  if (!(lambda >= 0) || !Number.isFinite(lambda)) throw new ParamError('lambda', `expected a finite value ≥ 0, got ${lambda}`);
  if (!(alpha >= 0) || !Number.isFinite(alpha)) throw new ParamError('alpha', `expected a finite value ≥ 0, got ${alpha}`);
  if (!Number.isInteger(maxIter) || maxIter < 1) throw new ParamError('maxIter', `expected an integer ≥ 1, got ${maxIter}`);
  if (!(tol > 0)) throw new ParamError('tol', `expected a value > 0, got ${tol}`);
  const start = { w: new Float64Array(layout.dim), b: Math.log(ones / (features.nTrials - ones)) };
  let lipschitz = 0;
  if (warm) {
    checkSameBlocks(warm.blocks, features.blocks);
    warm.weights.forEach((wk, k) => start.w.set(wk, layout.offsets[k]!));
    start.b = warm.bias;
    if (warm.alpha === alpha && warm.lipschitz > 0) lipschitz = warm.lipschitz;
  }
  if (lipschitz === 0) lipschitz = lipschitzBound(features, alpha);
  const r = runFista(features, labels, layout, { lambda, alpha, maxIter, tol, blockWeights: bw, lipschitz, start });
  const weights = features.blocks.map((_, k) => r.w.slice(layout.offsets[k]!, layout.offsets[k]! + layout.sizes[k]!));
  const ranks = Array.from(r.ranks);
  if (lambda === 0) {
    // No thresholding happened; count singular values above rounding level instead.
    weights.forEach((wk, k) => {
      const s = svd(wk, features.blocks[k]!.rows, features.blocks[k]!.cols).s;
      ranks[k] = s.filter((x) => x > 1e-12 * (s[0] ?? 0)).length;
    });
  }
  const activeBlocks = weights.flatMap((wk, k) => (wk.some((x) => x !== 0) ? [k] : []));
  return {
    blocks: features.blocks.map((b) => (b.symmetric === true ? { rows: b.rows, cols: b.cols, symmetric: true } : { rows: b.rows, cols: b.cols })),
    weights, bias: r.b, lambda, alpha, blockWeights: Float64Array.from(bw),
    iterations: r.iterations, converged: r.converged, objective: r.objective,
    ranks, activeBlocks, lipschitz: r.lipschitz,
  };
}

function checkSameBlocks(a: ReadonlyArray<BlockShape>, b: ReadonlyArray<BlockShape>): void {
  const same = a.length === b.length && a.every((x, k) => x.rows === b[k]!.rows && x.cols === b[k]!.cols);
  if (!same) {
    const fmt = (s: ReadonlyArray<BlockShape>) => `[${s.map((x) => `${x.rows}×${x.cols}`).join(', ')}]`;
    throw new ShapeError('blocks', `model has ${fmt(a)}, features have ${fmt(b)}`);
  }
}

/** Decision values z_i = Σ_k ⟨W_k, X_ik⟩ + b (log-odds of class 1), one per trial. */
export function decisionFunction(model: TraceNormModel, features: MatrixFeatures): Float64Array {
  const layout = blockLayout(features);
  checkSameBlocks(model.blocks, features.blocks);
  const w = new Float64Array(layout.dim);
  model.weights.forEach((wk, k) => w.set(wk, layout.offsets[k]!));
  const act = Uint8Array.from(model.weights, (wk) => (wk.some((x) => x !== 0) ? 1 : 0));
  return margins(features.x, features.nTrials, layout, w, model.bias, act, new Float64Array(features.nTrials));
}

/** P(class 1) per trial: the logistic function of the decision value, overflow-free. */
export function predictProba(model: TraceNormModel, features: MatrixFeatures): Float64Array {
  return decisionFunction(model, features).map(sigmoid);
}

/** Rank-1 factors of one block's weight, for interpretation. */
export interface BlockFactors {
  /** Singular values of W_k above 1e-12 × the largest, descending. */
  singularValues: Float64Array;
  /** Left singular vectors (length rows: e.g. a frequency profile), one per singular value. */
  left: Float64Array[];
  /** Right singular vectors (length cols: e.g. a time course), one per singular value. */
  right: Float64Array[];
}

/**
 * Leading singular triplets of W_k = Σ_j σ_j u_j v_jᵀ (Tomioka & Müller 2010 read u as the
 * row profile and v as the column profile). Sign convention: each u_j has its largest-magnitude
 * entry positive (v_j flips with it, so σ_j u_j v_jᵀ is unchanged).
 * @param count at most this many triplets (default all non-zero)
 */
export function blockFactors(model: TraceNormModel, k: number, count = Infinity): BlockFactors {
  const shape = model.blocks[k];
  const wk = model.weights[k];
  if (shape === undefined || wk === undefined) throw new ParamError('k', `expected a block index in [0, ${model.blocks.length}), got ${k}`);
  const d = svd(wk, shape.rows, shape.cols);
  const top = d.s[0] ?? 0;
  const r = Math.min(count, d.s.filter((x) => top > 0 && x > 1e-12 * top).length);
  const left: Float64Array[] = [];
  const right: Float64Array[] = [];
  for (let j = 0; j < r; j++) {
    const u = Float64Array.from({ length: shape.rows }, (_, i) => d.u[i * d.k + j]!);
    const v = Float64Array.from({ length: shape.cols }, (_, i) => d.v[i * d.k + j]!);
    let big = 0;
    for (const x of u) if (Math.abs(x) > Math.abs(big)) big = x;
    if (big < 0) { u.forEach((x, i) => { u[i] = -x; }); v.forEach((x, i) => { v[i] = -x; }); }
    left.push(u);
    right.push(v);
  }
  return { singularValues: d.s.slice(0, r), left, right };
}
