/**
 * The matrix logarithm of a symmetric positive (semi)definite matrix, log S = V diag(log λ) Vᵀ
 * from its eigendecomposition (Householder tridiagonalisation + implicit QL, tridiagonal-eig.ts;
 * Higham, Functions of Matrices, SIAM 2008, §11: for a symmetric matrix the eigendecomposition
 * route is the standard and stable one).
 *
 * Eigenvalues below `floor` × (mean eigenvalue) are raised to it before the logarithm, so a
 * rank-deficient estimate (fewer samples than dimensions, or a re-referenced montage) gives
 * finite values instead of −∞; the default floor 1e-9 leaves every well-conditioned matrix
 * untouched. Used for the covariance recipe's tangent-space map (recipes/covariance.ts).
 */
import { createSymmetricEigWorkspace, symmetricEigInto, type SymmetricEigWorkspace } from './tridiagonal-eig';

/** Reusable buffers of {@link spdLogInto}. */
export interface SpdLogWorkspace { eig: SymmetricEigWorkspace; scaled: Float64Array }

export function createSpdLogWorkspace(n: number): SpdLogWorkspace {
  return { eig: createSymmetricEigWorkspace(n), scaled: new Float64Array(n * n) };
}

/**
 * log S for the symmetric n×n block s[offset .. offset + n²) (row-major; lower triangle read),
 * written to out[outOffset .. outOffset + n²) exactly symmetric. No input checks.
 */
export function spdLogInto(s: Float64Array, offset: number, out: Float64Array, outOffset: number, ws: SpdLogWorkspace, floor = 1e-9): void {
  const { eig, scaled } = ws;
  const n = eig.n;
  symmetricEigInto(s, offset, eig);
  const { values, vectors } = eig;
  let mean = 0;
  for (let k = 0; k < n; k++) mean += values[k]! / n;
  const low = Math.max(floor * mean, Number.MIN_VALUE);
  // scaled = V · diag(log λ), then out = scaled · Vᵀ (upper triangle, mirrored).
  for (let k = 0; k < n; k++) {
    const l = Math.log(Math.max(values[k]!, low));
    for (let i = 0; i < n; i++) scaled[i * n + k] = vectors[i * n + k]! * l;
  }
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      let acc = 0;
      for (let k = 0; k < n; k++) acc += scaled[i * n + k]! * vectors[j * n + k]!;
      out[outOffset + i * n + j] = acc;
      out[outOffset + j * n + i] = acc;
    }
  }
}

/** log S of a symmetric positive definite n×n matrix (module comment); allocates its buffers. */
export function spdLog(s: Float64Array, n: number, floor = 1e-9): Float64Array {
  const out = new Float64Array(n * n);
  spdLogInto(s, 0, out, 0, createSpdLogWorkspace(n), floor);
  return out;
}
