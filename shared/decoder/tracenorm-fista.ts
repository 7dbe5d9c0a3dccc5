/**
 * The solver behind fitTraceNorm: monotone FISTA with backtracking for
 *   F(W, b) = Σ_i log(1 + exp(−s_i(Σ_k ⟨W_k, X_ik⟩ + b))) + λ Σ_k w_k ‖W_k‖_* + (α/2) Σ_k ‖W_k‖_F²
 * (REFERENCES.md §4). Smooth part f = logistic loss + L2 term; non-smooth part handled by its
 * proximal operator, block-wise singular value soft-thresholding with τ_k = λ w_k / L.
 *
 * - FISTA: Beck & Teboulle 2009, SIAM J. Imaging Sci. 2(1):183–202; the monotone variant
 *   MFISTA (Beck & Teboulle 2009b, IEEE Trans. Image Process. 18(11):2419–2434) keeps the better
 *   of the prox point z_k and x_{k−1}, so F(x_k) never increases.
 * - Step: starts from the bound L = ¼‖[X, 1]‖₂² + α (or the warm model's last L). Each iteration
 *   first tries 0.8·L and then backtracks (L ← 2L) until f(z) ≤ f(y) + ⟨∇f(y), z − y⟩ +
 *   (L/2)‖z − y‖² (checked in a cancellation-free form); with a changing L the momentum uses
 *   t_{k+1} = (1 + sqrt(1 + 4(L_{k+1}/L_k)t_k²))/2 (Scheinberg, Goldfarb & Bai 2014, Found.
 *   Comput. Math. 14:389–417). Trying a smaller L lets the step follow the actual curvature
 *   Σ p_i(1 − p_i), which falls far below ¼ as the fit becomes confident.
 * - Blocks flagged symmetric (tracenorm-data.ts: square, every trial's matrix symmetric) keep a
 *   symmetric weight, and their prox is eigenvalue soft-thresholding computed from the eigenpairs
 *   beyond the threshold only (tracenorm-prox.ts symmetricSvtInto); other blocks use a
 *   warm-started Jacobi SVD.
 * - Screening (exact, no approximation): a block whose extrapolated point y_k is zero stays zero
 *   after the prox iff ‖∇_k f(y)‖₂ ≤ λ w_k. That is proved without an SVD by a spectral-norm upper
 *   bound (spectralNormUpperBound), or for a symmetric block by its eigenvalues. Between such proofs the block's gradient is not even formed:
 *   ‖∇_k f(y)‖₂ ≤ B_k + ‖X_k‖_F ‖r − r_k‖₂, where B_k is the bound proved at residuals r_k
 *   (r = σ(margins) − labels; ∇_k f = Σ_i r_i X_ik is linear in r, and ‖Σ_i δ_i X_ik‖₂ ≤
 *   ‖X_k‖_F ‖δ‖₂ by Cauchy–Schwarz). Margins skip inactive blocks (exact).
 * - Momentum restart (t ← 1) when z_k is rejected or when (y_k − z_k)ᵀ(z_k − x_{k−1}) > 0
 *   (O'Donoghue & Candès 2015, Found. Comput. Math. 15:715–732): on this project's problems it
 *   cut iterations by a factor of 1.5 to 100 (measured in bench/solver.ts and the tests).
 * - Stopping rule: stop when the new prox point z_k is within tol of x_{k−1} in both senses,
 *   |F(x_{k−1}) − F(z_k)|/max(1, |F(z_k)|) ≤ tol and ‖z_k − x_{k−1}‖/max(1, ‖z_k‖) ≤ tol
 *   (weights and bias together), returning the better of the two; otherwise stop at maxIter
 *   with converged = false.
 */
import { createPartialEigWorkspace, type PartialEigWorkspace } from '../linalg/symmetric-eig-partial';
import { createSvdWorkspace, svd, type SvdWorkspace } from '../linalg/svd';
import { ParamError } from '../types';
import { type BlockLayout, type MatrixFeatures, logisticBregman, logisticLoss, margins } from './tracenorm-data';
import { addSymmetricMargins, packSymmetricBlocks, symmetricGradient } from './tracenorm-packed';
import { type Point, blockFrobenius, copyPoint, newPoint, sqNorm, symmetrizeBlock } from './tracenorm-point';
import { spectralNormUpperBound, svtInto, symmetricEigenvalues, symmetricSpectralNorm, symmetricSvtInto } from './tracenorm-prox';

const L_DOWN = 0.8;
const L_UP = 2;
const SKIP = 0; // proved zero: no gradient, no SVD
const ZERO = 1; // gradient formed, proved zero: no SVD
const SVD = 2; // gradient formed, SVT by SVD

/** What the solver needs besides the data. */
export interface FistaSettings {
  lambda: number;
  alpha: number;
  maxIter: number;
  tol: number;
  blockWeights: Float64Array;
  lipschitz: number;
  start: { w: Float64Array; b: number };
}

/** What it returns (weights in the trial layout) and work counters for benchmarks. */
export interface FistaResult {
  w: Float64Array;
  b: number;
  iterations: number;
  converged: boolean;
  objective: number;
  ranks: Int32Array;
  lipschitz: number;
  /** Prox evaluations (iterations plus backtracking retries). */
  proxCount: number;
  svdCount: number;
  skippedSvdCount: number;
  skippedGradientCount: number;
}

/** Runs MFISTA (see module comment) on validated inputs. */
export function runFista(features: MatrixFeatures, labels: Uint8Array, layout: BlockLayout, s: FistaSettings): FistaResult {
  const { nTrials: n, blocks, x } = features;
  const { offsets, sizes, dim } = layout;
  const nb = blocks.length;
  const { lambda, alpha, tol, blockWeights } = s;
  const work = new Float64Array(2 * blocks.reduce((m, bl) => Math.max(m, Math.min(bl.rows, bl.cols) ** 2), 0));
  const svdWork: Array<SvdWorkspace | null> = blocks.map((bl) => (bl.symmetric === true ? null : createSvdWorkspace(bl.rows, bl.cols)));
  const eigWork: Array<PartialEigWorkspace | null> = blocks.map((bl) => (bl.symmetric === true ? createPartialEigWorkspace(bl.rows) : null));
  const warm = new Uint8Array(nb); // 1 once a block's workspace holds a rotation to start from
  // Symmetric blocks: margins and gradients from packed lower triangles (tracenorm-packed.ts).
  const packed = packSymmetricBlocks(x, n, layout, blocks);
  const sym = packed.side;
  const hasSym = sym.some((v) => v > 0);
  const actOther = new Uint8Array(nb);
  const counters = { svd: 0, skippedSvd: 0, skippedGradient: 0, prox: 0 };

  // Screening state: ‖X_k‖_F, and per block the last proved bound B_k at residuals r_k.
  const xNorm = blockFrobenius(x, n, layout);
  const proved = new Float64Array(nb).fill(Infinity);
  const provedAt = blocks.map(() => new Float64Array(n));
  const status = new Uint8Array(nb);

  let xp = newPoint(dim, n, nb);
  let xc = newPoint(dim, n, nb);
  let zc = newPoint(dim, n, nb);
  const y = newPoint(dim, n, nb);
  const g = new Float64Array(dim);
  const v = new Float64Array(dim);
  const resid = new Float64Array(n);

  startPoint();
  let fx = objective(xc, logisticLoss(xc.z, labels, null) + 0.5 * alpha * sqNorm(xc.w));
  copyPoint(xc, xp);
  copyPoint(xc, y);

  let L = s.lipschitz;
  let t = 1;
  let iterations = 0;
  let converged = false;
  for (let it = 1; it <= s.maxIter; it++) {
    iterations = it;
    logisticLoss(y.z, labels, resid);
    let gb = 0;
    for (let i = 0; i < n; i++) gb += resid[i]!;
    classifyBlocks();
    const Lprev = L;
    L *= L_DOWN;
    for (;;) {
      proxStep(L, gb);
      allMargins(zc);
      // Backtracking test f(z) ≤ Q_L(z, y) (Beck & Teboulle 2009, eq. 2.5) in the cancellation-free
      // form f(z) − f(y) − ⟨∇f(y), z − y⟩ ≤ (L/2)‖z − y‖², the left side being
      // Σ_i D_logistic(margin_i(y), Δmargin_i) + (α/2)‖Δw‖².
      let sqW = 0;
      for (let j = 0; j < dim; j++) { const d = zc.w[j]! - y.w[j]!; sqW += d * d; }
      let breg = 0.5 * alpha * sqW;
      for (let i = 0; i < n; i++) breg += logisticBregman(y.z[i]!, zc.z[i]! - y.z[i]!);
      const sq = sqW + (zc.b - y.b) ** 2;
      if (sq === 0 || breg <= 0.5 * L * sq * (1 + 1e-10)) break;
      L *= L_UP;
      if (!Number.isFinite(L)) throw new ParamError('features', 'backtracking diverged: non-finite loss or margins');
    }
    const fz = objective(zc, logisticLoss(zc.z, labels, null) + 0.5 * alpha * sqNorm(zc.w));
    const accepted = fz <= fx;
    let dx = (zc.b - xc.b) ** 2;
    let ip = (y.b - zc.b) * (zc.b - xc.b);
    for (let j = 0; j < dim; j++) {
      const d = zc.w[j]! - xc.w[j]!;
      dx += d * d;
      ip += (y.w[j]! - zc.w[j]!) * d;
    }
    const relX = Math.sqrt(dx) / Math.max(1, Math.sqrt(sqNorm(zc.w) + zc.b * zc.b));
    const dF = Math.abs(fx - fz) / Math.max(1, Math.abs(fz));
    // Restart the momentum (t ← 1, y ← x_k) when z_k is rejected (MFISTA) or when the step
    // opposes the gradient mapping, (y_k − z_k)ᵀ(z_k − x_{k−1}) > 0 (O'Donoghue & Candès 2015,
    // Found. Comput. Math. 15:715–732, gradient scheme). Otherwise
    // y_{k+1} = x_k + (t_k/t_{k+1})(z_k − x_k) + ((t_k − 1)/t_{k+1})(x_k − x_{k−1})  (MFISTA).
    const tNext = (1 + Math.sqrt(1 + 4 * (L / Lprev) * t * t)) / 2;
    if (!accepted || ip > 0) {
      combine(accepted ? zc : xc, zc, xc, 0, 0);
      t = 1;
    } else {
      combine(zc, zc, xc, t / tNext, (t - 1) / tNext);
      t = tNext;
    }
    if (accepted) {
      // Rotate buffers: x_{k−1} ← x_k, x_k ← z_k; the old x_{k−1} becomes scratch for z.
      const old = xp;
      xp = xc;
      xc = zc;
      zc = old;
      fx = fz;
    } else {
      copyPoint(xc, xp);
    }
    if (dF <= tol && relX <= tol) { converged = true; break; }
  }
  return {
    w: xc.w, b: xc.b, iterations, converged, objective: fx, ranks: xc.rank, lipschitz: L,
    proxCount: counters.prox, svdCount: counters.svd, skippedSvdCount: counters.skippedSvd, skippedGradientCount: counters.skippedGradient,
  };

  /** x_0 from the settings: activity, ranks and nuclear norms from one SVD per non-zero block. */
  function startPoint(): void {
    xc.w.set(s.start.w);
    xc.b = s.start.b;
    for (let k = 0; k < nb; k++) {
      const o = offsets[k]!;
      symmetrizeBlock(xc.w, o, sym[k]!); // a symmetric block's start is made symmetric
      if (!xc.w.subarray(o, o + sizes[k]!).some((c) => c !== 0)) continue;
      const ew = eigWork[k];
      // Singular values: |eigenvalues| for a symmetric block, else by SVD.
      const sv = ew ? symmetricEigenvalues(xc.w, o, ew).map(Math.abs) : svd(xc.w.subarray(o, o + sizes[k]!), blocks[k]!.rows, blocks[k]!.cols).s;
      const top = sv.reduce((a, c) => Math.max(a, c), 0);
      xc.act[k] = 1;
      xc.nuc[k] = sv.reduce((a, c) => a + c, 0);
      xc.rank[k] = sv.filter((c) => c > 1e-12 * top).length;
    }
    allMargins(xc);
  }

  /** p.z = margins of p.w, p.b (symmetric blocks from their packed triangles). */
  function allMargins(p: Point): void {
    if (!hasSym) { margins(x, n, layout, p.w, p.b, p.act, p.z); return; }
    for (let k = 0; k < nb; k++) actOther[k] = sym[k]! > 0 ? 0 : p.act[k]!;
    margins(x, n, layout, p.w, p.b, actOther, p.z);
    addSymmetricMargins(packed, layout, p.w, p.act, n, p.z);
  }

  function objective(p: Point, smooth: number): number {
    let pen = 0;
    for (let k = 0; k < nb; k++) pen += blockWeights[k]! * p.nuc[k]!;
    return smooth + lambda * pen;
  }

  /** Sets status[k] (SKIP / ZERO / SVD) and forms ∇_k f(y) for the blocks that need it. */
  function classifyBlocks(): void {
    for (let k = 0; k < nb; k++) {
      status[k] = SVD;
      if (lambda === 0 || y.act[k] === 1 || proved[k] === Infinity) continue;
      let dr = 0;
      const r0 = provedAt[k]!;
      for (let i = 0; i < n; i++) { const d = resid[i]! - r0[i]!; dr += d * d; }
      if (proved[k]! + xNorm[k]! * Math.sqrt(dr) <= lambda * blockWeights[k]!) status[k] = SKIP;
    }
    for (let k = 0; k < nb; k++) {
      const o = offsets[k]!;
      const end = o + sizes[k]!;
      if (status[k] === SKIP) { counters.skippedGradient++; continue; }
      g.fill(0, o, end);
      const side = sym[k]!;
      if (side > 0) { // symmetric: packed lower triangle, mirrored (exactly symmetric gradient)
        symmetricGradient(packed, k, o, resid, g);
      } else {
        for (let i = 0; i < n; i++) {
          const r = resid[i]!;
          if (r === 0) continue;
          const base = i * dim;
          for (let j = o; j < end; j++) g[j]! += r * x[base + j]!;
        }
      }
      if (alpha !== 0) for (let j = o; j < end; j++) g[j]! += alpha * y.w[j]!;
      if (lambda === 0 || y.act[k] === 1) continue;
      const thr = lambda * blockWeights[k]!;
      const ew = eigWork[k];
      // Symmetric block: ‖G‖₂ = max |eigenvalue| (cheaper than the bound; 1e-12 relative margin
      // for the eigenvalues' rounding, ≤ a small multiple of ε‖G‖).
      const bound = ew ? symmetricSpectralNorm(g, o, ew) * (1 + 1e-12)
        : spectralNormUpperBound(g, o, blocks[k]!.rows, blocks[k]!.cols, thr, work);
      if (bound <= thr) {
        status[k] = ZERO;
        proved[k] = bound;
        provedAt[k]!.set(resid);
      }
    }
  }

  /** z = prox_{λ/L}(y − ∇f(y)/L), block by block; zero blocks proved by classifyBlocks. */
  function proxStep(step: number, gb: number): void {
    counters.prox++;
    zc.b = y.b - gb / step;
    for (let k = 0; k < nb; k++) {
      const o = offsets[k]!;
      const end = o + sizes[k]!;
      const { rows, cols } = blocks[k]!;
      if (status[k] !== SVD) {
        counters.skippedSvd++;
        zc.w.fill(0, o, end);
        zc.act[k] = 0; zc.rank[k] = 0; zc.nuc[k] = 0;
        continue;
      }
      for (let j = o; j < end; j++) v[j] = y.w[j]! - g[j]! / step;
      if (lambda === 0) {
        zc.w.set(v.subarray(o, end), o);
        zc.act[k] = 1; zc.rank[k] = Math.min(rows, cols); zc.nuc[k] = 0;
        continue;
      }
      counters.svd++;
      const tau = (lambda * blockWeights[k]!) / step;
      const ew = eigWork[k];
      let nuc = 0;
      let rank: number;
      if (ew) {
        rank = symmetricSvtInto(v, o, tau, zc.w, o, ew);
        for (let j = 0; j < rank; j++) nuc += Math.abs(ew.selected[j]!) - tau;
      } else {
        const ws = svdWork[k]!;
        rank = svtInto(v, o, tau, zc.w, o, ws, warm[k] === 1);
        warm[k] = 1;
        for (let j = 0; j < rank; j++) nuc += ws.s[j]! - tau;
      }
      zc.rank[k] = rank;
      zc.act[k] = rank > 0 ? 1 : 0;
      zc.nuc[k] = nuc;
    }
  }

  /** y ← xNew + c1 (z − xNew) + c2 (xNew − xOld), weights, bias and margins alike (exact: linear). */
  function combine(xNew: Point, z: Point, xOld: Point, c1: number, c2: number): void {
    const lin = (a: number, zz: number, o: number) => a + c1 * (zz - a) + c2 * (a - o);
    for (let j = 0; j < dim; j++) y.w[j] = lin(xNew.w[j]!, z.w[j]!, xOld.w[j]!);
    y.b = lin(xNew.b, z.b, xOld.b);
    for (let i = 0; i < n; i++) y.z[i] = lin(xNew.z[i]!, z.z[i]!, xOld.z[i]!);
    if (c1 === 0 && c2 === 0) y.act.set(xNew.act);
    else for (let k = 0; k < nb; k++) y.act[k] = xNew.act[k]! | z.act[k]! | xOld.act[k]!;
  }
}
