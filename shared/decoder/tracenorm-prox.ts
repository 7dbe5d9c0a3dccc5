/**
 * Proximal operator of the (weighted) trace norm: singular value soft-thresholding (SVT),
 * prox_{τ‖·‖_*}(V) = U diag(max(σ_i − τ, 0)) Vᵀ (Cai, Candès & Shen 2010, SIAM J. Optim.
 * 20(4):1956–1982, Theorem 2.1), its symmetric form (eigenvalue soft-thresholding), plus the
 * certificate that lets a zero block skip its SVD.
 *
 * Symmetric form: for symmetric M = Σ_j μ_j v_j v_jᵀ the singular values are |μ_j| with
 * u_j = v_j and right vectors sign(μ_j) v_j, so SVT keeps the eigenvectors and shrinks the
 * eigenvalues towards zero: prox(M) = Σ_j sign(μ_j) max(|μ_j| − τ, 0) v_j v_jᵀ, symmetric again.
 * Only the eigenpairs with |μ_j| > τ are needed (symmetric-eig-partial.ts).
 */
import { type PartialEigWorkspace, createPartialEigWorkspace, eigenpairsBeyond } from '../linalg/symmetric-eig-partial';
import { type SvdWorkspace, createSvdWorkspace, svdInto } from '../linalg/svd';
import { ParamError, ShapeError } from '../types';

/** Result of singular value soft-thresholding. */
export interface SvtResult {
  /** The thresholded matrix, rows×cols row-major. */
  out: Float64Array;
  /** Number of singular values above τ (the rank of `out`). */
  rank: number;
  /** Singular values of `out`, i.e. max(σ_i − τ, 0), descending, length min(rows, cols). */
  singularValues: Float64Array;
}

/**
 * Singular value soft-thresholding (Cai, Candès & Shen 2010, Theorem 2.1): the minimiser of
 * τ‖W‖_* + ½‖W − M‖_F².
 * @param m rows×cols row-major (not modified)
 * @param tau threshold ≥ 0
 */
export function svt(m: Float64Array, rows: number, cols: number, tau: number): SvtResult {
  if (m.length !== rows * cols) throw new ShapeError('m', `expected ${rows}×${cols} = ${rows * cols} values, got ${m.length}`);
  if (!(tau >= 0) || !Number.isFinite(tau)) throw new ParamError('tau', `expected a finite threshold ≥ 0, got ${tau}`);
  m.forEach((x, i) => {
    if (!Number.isFinite(x)) throw new ParamError('m', `entry ${i} is ${x}`);
  });
  const out = new Float64Array(rows * cols);
  const ws = createSvdWorkspace(rows, cols);
  const rank = svtInto(m, 0, tau, out, 0, ws, false);
  const singularValues = ws.s.map((x) => Math.max(x - tau, 0));
  return { out, rank, singularValues };
}

/**
 * SVT of the block m[src .. src + rows*cols) (shape from the workspace) written to
 * dst[dstOff ..]. Afterwards ws.s holds the input's singular values, descending; the result's
 * are max(ws.s − τ, 0). With `warm`, the SVD starts from ws.rotation (left by the previous SVD
 * of this block), which only changes the speed.
 * @returns the rank of the result
 */
export function svtInto(m: Float64Array, src: number, tau: number, dst: Float64Array, dstOff: number,
                        ws: SvdWorkspace, warm: boolean): number {
  svdInto(m, src, ws, warm ? ws.rotation : null);
  const { rows, cols, k, u, s, v } = ws;
  let rank = 0;
  while (rank < k && s[rank]! > tau) rank++;
  for (let i = 0; i < rows; i++) {
    for (let c = 0; c < cols; c++) {
      let acc = 0;
      for (let j = 0; j < rank; j++) acc += u[i * k + j]! * (s[j]! - tau) * v[c * k + j]!;
      dst[dstOff + i * cols + c] = acc;
    }
  }
  return rank;
}

/**
 * Eigenvalue soft-thresholding (module comment): the minimiser of τ‖W‖_* + ½‖W − M‖_F² for
 * symmetric M, equal to {@link svt} of M.
 * @param m n×n row-major, symmetric (only the lower triangle is read; not modified)
 * @returns the result (exactly symmetric), its rank and its non-zero eigenvalues
 *   sign(μ)(|μ| − τ) in ascending order of μ
 */
export function symmetricSvt(m: Float64Array, n: number, tau: number): { out: Float64Array; rank: number; eigenvalues: Float64Array } {
  if (!Number.isInteger(n) || n < 1 || m.length !== n * n) throw new ShapeError('m', `expected ${n}×${n} = ${n * n} values, got ${m.length}`);
  if (!(tau >= 0) || !Number.isFinite(tau)) throw new ParamError('tau', `expected a finite threshold ≥ 0, got ${tau}`);
  m.forEach((x, i) => {
    if (!Number.isFinite(x)) throw new ParamError('m', `entry ${i} is ${x}`);
  });
  const out = new Float64Array(n * n);
  const ws = createPartialEigWorkspace(n);
  const rank = symmetricSvtInto(m, 0, tau, out, 0, ws);
  return { out, rank, eigenvalues: ws.selected.slice(0, rank).map((mu) => Math.sign(mu) * (Math.abs(mu) - tau)) };
}

/**
 * Symmetric SVT of the n×n block m[src ..] (n from the workspace, lower triangle read) written
 * to dst[dstOff ..] as an exactly symmetric matrix. Afterwards ws.selected[0 .. rank) holds the
 * input's eigenvalues with |μ| > τ; the result's nuclear norm is Σ (|μ| − τ) over them.
 * @returns the rank of the result
 */
export function symmetricSvtInto(m: Float64Array, src: number, tau: number, dst: Float64Array, dstOff: number,
                                 ws: PartialEigWorkspace): number {
  const rank = eigenpairsBeyond(m, src, tau, ws);
  const { n, selected, vectors } = ws;
  for (let a = 0; a < n; a++) {
    for (let b = 0; b <= a; b++) {
      let acc = 0;
      for (let j = 0; j < rank; j++) {
        const mu = selected[j]!;
        acc += (mu > 0 ? mu - tau : mu + tau) * vectors[j * n + a]! * vectors[j * n + b]!;
      }
      dst[dstOff + a * n + b] = acc;
      dst[dstOff + b * n + a] = acc;
    }
  }
  return rank;
}

/** ‖M‖₂ = max |μ| of the symmetric n×n block m[src ..] (lower triangle read). */
export function symmetricSpectralNorm(m: Float64Array, src: number, ws: PartialEigWorkspace): number {
  const v = symmetricEigenvalues(m, src, ws);
  return Math.max(Math.abs(v[0]!), Math.abs(v[ws.n - 1]!));
}

/** All eigenvalues of the symmetric n×n block m[src ..], ascending (in ws.values); ‖M‖₂ = max(|first|, |last|). */
export function symmetricEigenvalues(m: Float64Array, src: number, ws: PartialEigWorkspace): Float64Array {
  eigenpairsBeyond(m, src, Infinity, ws);
  return ws.values;
}

/**
 * An upper bound on the spectral norm ‖G‖₂ of the block g[off .. off + rows*cols), used to
 * prove that SVT of a zero block is exactly zero (‖G‖₂ ≤ λw_k) without an SVD.
 * Bounds: ‖G‖₂ ≤ ‖G‖_F; then, with H the smaller Gram matrix (GGᵀ or GᵀG) and s its order,
 * ‖G‖₂² = λ_max(H) ≤ tr(H^m)^(1/m) for m = 2, 4, ..., 32 by repeated squaring (the trace of a
 * PSD power bounds its largest eigenvalue; each step tightens the bound towards λ_max, within
 * a factor s^(1/m)). Gives up early, returning the current bound, once the lower bound
 * (tr(H^m)/s)^(1/m) ≤ λ_max shows ‖G‖₂ > `giveUpAbove`. Computed on H/tr(H) so powers cannot
 * overflow.
 * @param work scratch of at least 2·min(rows, cols)² values
 */
export function spectralNormUpperBound(g: Float64Array, off: number, rows: number, cols: number,
                                       giveUpAbove: number, work: Float64Array): number {
  let fro2 = 0;
  for (let j = off; j < off + rows * cols; j++) fro2 += g[j]! * g[j]!;
  if (fro2 === 0) return 0;
  const s = Math.min(rows, cols);
  if (s === 1) return Math.sqrt(fro2);
  let a = work.subarray(0, s * s);
  let b = work.subarray(s * s, 2 * s * s);
  const long = rows >= cols ? rows : cols;
  for (let p = 0; p < s; p++) {
    for (let q = p; q < s; q++) {
      let acc = 0;
      if (rows >= cols) for (let i = 0; i < long; i++) acc += g[off + i * cols + p]! * g[off + i * cols + q]!;
      else for (let j = 0; j < long; j++) acc += g[off + p * cols + j]! * g[off + q * cols + j]!;
      a[p * s + q] = acc / fro2;
      a[q * s + p] = acc / fro2;
    }
  }
  // Eigenvalues of a = H/‖G‖_F² are σ_i²/‖G‖_F²; the bound on σ_max is ‖G‖_F · λ_max(a)^(1/2).
  let best = 1;
  const giveUp = (giveUpAbove * giveUpAbove) / fro2;
  let m = 1;
  for (let pow = 1; pow <= 5; pow++) {
    let tr = 0;
    for (let p = 0; p < s; p++) {
      for (let q = p; q < s; q++) {
        let acc = 0;
        for (let r = 0; r < s; r++) acc += a[p * s + r]! * a[r * s + q]!;
        b[p * s + q] = acc;
        b[q * s + p] = acc;
      }
      tr += b[p * s + p]!;
    }
    m *= 2;
    best = Math.min(best, tr ** (1 / m));
    if ((tr / s) ** (1 / m) > giveUp) break;
    const tmp = a; a = b; b = tmp;
  }
  // Relative margin 1e-12 for rounding in the Gram matrix and its powers.
  return Math.sqrt(fro2 * best) * (1 + 1e-12);
}
