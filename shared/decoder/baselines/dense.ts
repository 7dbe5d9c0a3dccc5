/**
 * Small dense linear algebra on row-major Float64Array matrices for the baselines
 * (feature counts up to a few hundred, channel counts up to ~128).
 */
import { symmetricEig } from '../../linalg/symmetric-eig';
import { ParamError } from '../../types';

/**
 * Cholesky factorisation A = L Lᵀ of a symmetric positive definite n×n matrix (Golub & Van
 * Loan, Matrix Computations, 4th ed., Alg. 4.2.2). Returns the lower factor row-major, or null
 * when A is not numerically positive definite.
 */
export function cholesky(a: Float64Array, n: number): Float64Array | null {
  const l = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    let d = a[j * n + j]!;
    for (let k = 0; k < j; k++) d -= l[j * n + k]! ** 2;
    if (!(d > 0)) return null;
    const ljj = Math.sqrt(d);
    l[j * n + j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = a[i * n + j]!;
      for (let k = 0; k < j; k++) s -= l[i * n + k]! * l[j * n + k]!;
      l[i * n + j] = s / ljj;
    }
  }
  return l;
}

/** Solves L Lᵀ x = b given the lower Cholesky factor. */
export function choleskySolve(l: Float64Array, n: number, b: Float64Array): Float64Array {
  const y = Float64Array.from(b);
  for (let i = 0; i < n; i++) {
    let s = y[i]!;
    for (let k = 0; k < i; k++) s -= l[i * n + k]! * y[k]!;
    y[i] = s / l[i * n + i]!;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i]!;
    for (let k = i + 1; k < n; k++) s -= l[k * n + i]! * y[k]!;
    y[i] = s / l[i * n + i]!;
  }
  return y;
}

/** Eigendecomposition of a symmetric matrix: values descending, vectors as columns (row-major). */
export interface SymEig {
  values: Float64Array; // [n]
  vectors: Float64Array; // [n][n] row-major, column j = eigenvector j
}

/**
 * Symmetric eigendecomposition (cyclic Jacobi, shared/linalg/symmetric-eig.ts, chosen for its
 * high relative accuracy on small eigenvalues of covariance matrices). The matrix is
 * symmetrised ((A + Aᵀ)/2) first to absorb rounding; values descending.
 */
export function symEig(a: Float64Array, n: number): SymEig {
  if (a.length !== n * n) throw new ParamError('a', `expected ${n * n} values, got ${a.length}`);
  const sym = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) sym[i * n + j] = 0.5 * (a[i * n + j]! + a[j * n + i]!);
  const { values, vectors } = symmetricEig(sym, n);
  return { values, vectors };
}

/** Numerically stable log(1 + e^z). */
export function log1pExp(z: number): number {
  return z > 0 ? z + Math.log1p(Math.exp(-z)) : Math.log1p(Math.exp(z));
}

/** Logistic function 1/(1 + e^-z), stable for large |z|. */
export function sigmoid(z: number): number {
  if (z >= 0) return 1 / (1 + Math.exp(-z));
  const e = Math.exp(z);
  return e / (1 + e);
}
