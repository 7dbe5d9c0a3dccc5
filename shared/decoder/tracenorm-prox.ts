/**
 * Proximal operator of the (weighted) trace norm: singular value soft-thresholding (SVT),
 * prox_{τ‖·‖_*}(V) = U diag(max(σ_i − τ, 0)) Vᵀ (Cai, Candès & Shen 2010, SIAM J. Optim.
 * 20(4):1956–1982, Theorem 2.1), plus the certificate that lets a zero block skip its SVD.
 */
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
