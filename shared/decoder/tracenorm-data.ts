/**
 * Data layout and the smooth part of the trace-norm logistic regression objective
 * (REFERENCES.md §4): validation, margins, logistic loss and its Bregman divergence, and the Lipschitz bound.
 * The solver (tracenorm.ts) and the path (tracenorm-path.ts) build on these kernels.
 */
import { ParamError, ShapeError } from '../types';

/**
 * Shape of one matrix block of a trial's features. `symmetric`: the block is square and every
 * trial's matrix is symmetric (e.g. a spatial covariance), so the weight stays symmetric (its
 * gradient Σ_i r_i X_ik is symmetric) and the solver's proximal step is eigenvalue
 * soft-thresholding (tracenorm-prox.ts) instead of an SVD; checked by {@link blockLayout}.
 */
export interface BlockShape { rows: number; cols: number; symmetric?: boolean }

/**
 * Matrix-valued features of n trials: each trial has one matrix per block (for example one
 * F×T log-power matrix per ICA component, or one C×C covariance).
 * Layout of `x`: [trial][block][row][col], trial-major; within a block row-major.
 */
export interface MatrixFeatures {
  nTrials: number;
  blocks: ReadonlyArray<BlockShape>;
  x: Float64Array;
}

/** Offsets of each block inside one trial's feature vector, and that vector's length. */
export interface BlockLayout {
  offsets: Int32Array; // [block]
  sizes: Int32Array; // [block], rows*cols
  dim: number; // Σ rows*cols
}

/** Checks the features' shape and returns the block layout. */
export function blockLayout(features: MatrixFeatures): BlockLayout {
  const { nTrials, blocks, x } = features;
  if (!Number.isInteger(nTrials) || nTrials < 1) throw new ShapeError('features.nTrials', `expected a positive integer, got ${nTrials}`);
  if (blocks.length < 1) throw new ShapeError('features.blocks', 'expected at least one block');
  const offsets = new Int32Array(blocks.length);
  const sizes = new Int32Array(blocks.length);
  let dim = 0;
  blocks.forEach((b, k) => {
    if (!Number.isInteger(b.rows) || !Number.isInteger(b.cols) || b.rows < 1 || b.cols < 1) {
      throw new ShapeError(`features.blocks[${k}]`, `expected positive integer rows and cols, got ${b.rows}×${b.cols}`);
    }
    offsets[k] = dim;
    sizes[k] = b.rows * b.cols;
    dim += b.rows * b.cols;
  });
  if (x.length !== nTrials * dim) {
    throw new ShapeError('features.x', `expected ${nTrials} trials × ${dim} values = ${nTrials * dim}, got ${x.length}`);
  }
  for (let j = 0; j < x.length; j++) {
    if (!Number.isFinite(x[j]!)) {
      throw new ParamError('features.x', `non-finite value ${x[j]} at trial ${Math.floor(j / dim)}, element ${j % dim}`);
    }
  }
  blocks.forEach((b, k) => { if (b.symmetric === true) checkSymmetric(x, nTrials, dim, offsets[k]!, b, k); });
  return { offsets, sizes, dim };
}

/** A block flagged symmetric must be square with symmetric matrices (to relative 1e-10) in every trial. */
function checkSymmetric(x: Float64Array, nTrials: number, dim: number, off: number, b: BlockShape, k: number): void {
  if (b.rows !== b.cols) throw new ShapeError(`features.blocks[${k}]`, `a symmetric block must be square, got ${b.rows}×${b.cols}`);
  const n = b.rows;
  for (let i = 0; i < nTrials; i++) {
    const base = i * dim + off;
    for (let r = 1; r < n; r++) for (let c = 0; c < r; c++) {
      const u = x[base + r * n + c]!;
      const v = x[base + c * n + r]!;
      if (Math.abs(u - v) > 1e-10 * (Math.abs(u) + Math.abs(v))) {
        throw new ShapeError('features.x', `block ${k} is flagged symmetric, but trial ${i} has [${r}][${c}] = ${u} and [${c}][${r}] = ${v}`);
      }
    }
  }
}

/** Checks 0/1 labels against the trial count; returns the number of ones. */
export function checkLabels(labels: Uint8Array, nTrials: number, needBoth: boolean): number {
  if (labels.length !== nTrials) throw new ShapeError('labels', `expected ${nTrials} labels, got ${labels.length}`);
  let ones = 0;
  for (let i = 0; i < labels.length; i++) {
    const v = labels[i]!;
    if (v !== 0 && v !== 1) throw new ParamError('labels', `expected 0 or 1, got ${v} at trial ${i}`);
    ones += v;
  }
  if (needBoth && (ones === 0 || ones === nTrials)) {
    throw new ParamError('labels', `both classes are needed, got ${ones} ones among ${nTrials} trials`);
  }
  return ones;
}

/** Per-block penalty weights w_k (default 1); each must be finite and > 0. */
export function checkBlockWeights(weights: Float64Array | undefined, nBlocks: number): Float64Array {
  if (weights === undefined) return new Float64Array(nBlocks).fill(1);
  if (weights.length !== nBlocks) throw new ShapeError('blockWeights', `expected ${nBlocks} weights, got ${weights.length}`);
  weights.forEach((w, k) => {
    if (!(w > 0) || !Number.isFinite(w)) throw new ParamError(`blockWeights[${k}]`, `expected a finite weight > 0, got ${w}`);
  });
  return weights;
}

/**
 * Margins z_i = Σ_k ⟨W_k, X_ik⟩ + b for all trials, skipping blocks flagged inactive (all-zero
 * weights), which is exact and saves most of the work when few blocks are active.
 * @param out length nTrials, overwritten
 */
export function margins(x: Float64Array, nTrials: number, layout: BlockLayout, w: Float64Array, b: number,
                        active: Uint8Array | null, out: Float64Array): Float64Array {
  const { offsets, sizes, dim } = layout;
  for (let i = 0; i < nTrials; i++) {
    let acc = b;
    const base = i * dim;
    for (let k = 0; k < offsets.length; k++) {
      if (active !== null && active[k] === 0) continue;
      const o = offsets[k]!;
      const end = o + sizes[k]!;
      let s = 0;
      for (let j = o; j < end; j++) s += x[base + j]! * w[j]!;
      acc += s;
    }
    out[i] = acc;
  }
  return out;
}

/**
 * Logistic loss Σ_i log(1 + exp(−s_i z_i)), s_i = 2y_i − 1, computed stably; writes the
 * residuals r_i = σ(z_i) − y_i (the loss derivative with respect to z_i) into `resid`.
 */
export function logisticLoss(z: Float64Array, labels: Uint8Array, resid: Float64Array | null): number {
  let loss = 0;
  for (let i = 0; i < z.length; i++) {
    const m = labels[i] === 1 ? z[i]! : -z[i]!;
    // log(1 + e^(−m)) = max(−m, 0) + log1p(e^(−|m|))
    loss += (m < 0 ? -m : 0) + Math.log1p(Math.exp(-Math.abs(m)));
    if (resid !== null) resid[i] = sigmoid(z[i]!) - labels[i]!;
  }
  return loss;
}

/**
 * Bregman divergence of the logistic loss along one margin, ℓ(z + δ) − ℓ(z) − ℓ'(z)δ with
 * ℓ = softplus (the same for either label, since the labels only add a linear term), computed
 * without cancellation: a fifth-order Taylor series for |δ| < 0.01, otherwise the difference of
 * log1p terms after reflecting to z ≥ 0 (D(z, δ) = D(−z, −δ)). Used by the backtracking test,
 * where f(z) − f(y) would lose all digits near convergence.
 */
export function logisticBregman(z: number, delta: number): number {
  if (z < 0) { z = -z; delta = -delta; }
  const e = Math.exp(-z);
  const p = 1 / (1 + e);
  const q = e / (1 + e);
  if (Math.abs(delta) < 0.01) {
    const pq = p * q;
    const d2 = delta * delta;
    return pq * d2 * (0.5 + delta * ((1 - 2 * p) / 6 + delta * ((1 - 6 * pq) / 24 + delta * (1 - 2 * p) * (1 - 12 * pq) / 120)));
  }
  const u = z + delta;
  const first = u >= 0 ? q * delta : -z - p * delta;
  return first + Math.log1p(Math.exp(-Math.abs(u))) - Math.log1p(e);
}

/** Logistic function 1/(1 + e^(−z)) without overflow for any finite z. */
export function sigmoid(z: number): number {
  if (z >= 0) return 1 / (1 + Math.exp(-z));
  const e = Math.exp(z);
  return e / (1 + e);
}

/**
 * Lipschitz constant of the smooth part's gradient: L = ¼‖[X, 1]‖₂² + α (the logistic Hessian
 * is bounded by ¼ X̃ᵀX̃; REFERENCES.md §4, [cp]). ‖X̃‖₂² is the largest eigenvalue of the
 * smaller Gram matrix (X̃X̃ᵀ, n×n, or X̃ᵀX̃), found by power iteration to relative change 1e-15
 * (the Rayleigh quotient converges from below; FISTA's backtracking absorbs any shortfall).
 */
export function lipschitzBound(features: MatrixFeatures, alpha = 0): number {
  const { dim } = blockLayout(features);
  const n = features.nTrials;
  const x = features.x;
  const byTrials = n <= dim + 1;
  const size = byTrials ? n : dim + 1;
  const g = new Float64Array(size * size);
  if (byTrials) {
    for (let i = 0; i < n; i++) {
      for (let j = i; j < n; j++) {
        let acc = 1; // the bias column of ones
        for (let c = 0; c < dim; c++) acc += x[i * dim + c]! * x[j * dim + c]!;
        g[i * n + j] = acc;
        g[j * n + i] = acc;
      }
    }
  } else {
    for (let i = 0; i < n; i++) {
      const base = i * dim;
      for (let a = 0; a <= dim; a++) {
        const xa = a < dim ? x[base + a]! : 1;
        if (xa === 0) continue;
        for (let c = 0; c <= dim; c++) g[a * size + c]! += xa * (c < dim ? x[base + c]! : 1);
      }
    }
  }
  return 0.25 * largestEigenvaluePsd(g, size) + alpha;
}

/** Largest eigenvalue of a PSD matrix by power iteration with the Rayleigh quotient. */
function largestEigenvaluePsd(g: Float64Array, n: number): number {
  let v = new Float64Array(n).fill(1 / Math.sqrt(n));
  let w = new Float64Array(n);
  let lambda = 0;
  for (let it = 0; it < 10000; it++) {
    for (let i = 0; i < n; i++) {
      let acc = 0;
      for (let j = 0; j < n; j++) acc += g[i * n + j]! * v[j]!;
      w[i] = acc;
    }
    let rq = 0;
    let nrm = 0;
    for (let i = 0; i < n; i++) { rq += v[i]! * w[i]!; nrm += w[i]! * w[i]!; }
    nrm = Math.sqrt(nrm);
    if (nrm === 0) return 0;
    for (let i = 0; i < n; i++) w[i] = w[i]! / nrm;
    [v, w] = [w, v];
    if (Math.abs(rq - lambda) <= 1e-15 * rq) return rq;
    lambda = rq;
  }
  return lambda;
}
