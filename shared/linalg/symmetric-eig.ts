/**
 * Eigendecomposition of small dense symmetric matrices on typed arrays, and the functions of an
 * SPD matrix built on it (inverse square root for whitening and symmetric decorrelation).
 *
 * Method: cyclic Jacobi rotations (Jacobi 1846; stable rotation formulas of Rutishauser 1966;
 * Golub & Van Loan, Matrix Computations, 4th ed., Algorithms 8.5.2–8.5.3). Jacobi is chosen over
 * tridiagonal QR because it computes small eigenvalues of positive definite matrices to high
 * relative accuracy (Demmel & Veselić 1992, SIAM J. Matrix Anal. Appl. 13(4):1204–1245) and is
 * short; it is meant for n up to a few hundred (channel covariances, ICA rotations).
 */
import { ParamError, ShapeError } from '../types';

const EPS = 2.220446049250313e-16;

/** Eigenvalues in descending order and the matching orthonormal eigenvectors. */
export interface SymmetricEig {
  /** Eigenvalues, largest first. */
  values: Float64Array; // [n]
  /** Eigenvectors as columns: `vectors[i * n + j]` is entry i of eigenvector j. */
  vectors: Float64Array; // [n][n] row-major
  /** Number of Jacobi sweeps used. */
  sweeps: number;
}

/**
 * Eigendecomposition A = V diag(values) Vᵀ of a symmetric matrix by cyclic Jacobi (see module
 * comment). The full matrix is read and must be symmetric up to rounding (relative 1e-8); the
 * input is not modified. Sweeps stop when no off-diagonal entry exceeds ε·sqrt(|a_pp a_qq|)
 * (relative criterion) or 1e-3·ε·‖A‖_F (absolute floor).
 * @param a row-major n×n symmetric matrix
 * @returns values descending; eigenvector j in column j; sign fixed so its largest-magnitude
 *   entry is positive (deterministic output)
 */
export function symmetricEig(a: Float64Array, n: number): SymmetricEig {
  if (!Number.isInteger(n) || n < 1 || a.length !== n * n) {
    throw new ShapeError('a', `expected a square matrix of ${n}×${n} = ${n * n} values, got ${a.length}`);
  }
  const w = Float64Array.from(a);
  const v = new Float64Array(n * n);
  let normF = 0;
  for (let i = 0; i < n; i++) {
    v[i * n + i] = 1;
    for (let j = 0; j < n; j++) {
      const x = w[i * n + j]!;
      if (!Number.isFinite(x)) throw new ParamError('a', `entry [${i}][${j}] is ${x}`);
      if (j > i && Math.abs(x - w[j * n + i]!) > 1e-8 * (Math.abs(x) + Math.abs(w[j * n + i]!)) + 1e-300) {
        throw new ParamError('a', `not symmetric at [${i}][${j}]: ${x} vs ${w[j * n + i]}`);
      }
      normF += x * x;
    }
  }
  normF = Math.sqrt(normF);
  // Off-diagonal entries below this are treated as zero (they move eigenvalues by < ε·‖A‖).
  const absFloor = 1e-3 * EPS * normF;
  let sweeps = 0;
  for (; sweeps < 60; sweeps++) {
    let rotated = false;
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = w[p * n + q]!;
        const app = w[p * n + p]!;
        const aqq = w[q * n + q]!;
        if (Math.abs(apq) <= absFloor || Math.abs(apq) <= EPS * Math.sqrt(Math.abs(app * aqq))) continue;
        rotated = true;
        // Rutishauser: t = tan θ, the smaller root of t² + 2tζ − 1 = 0, ζ = (a_qq − a_pp)/(2a_pq).
        const zeta = (aqq - app) / (2 * apq);
        const t = (zeta >= 0 ? 1 : -1) / (Math.abs(zeta) + Math.sqrt(1 + zeta * zeta));
        const c = 1 / Math.sqrt(1 + t * t);
        const s = c * t;
        for (let k = 0; k < n; k++) {          // columns p, q: A ← A J
          const akp = w[k * n + p]!;
          const akq = w[k * n + q]!;
          w[k * n + p] = c * akp - s * akq;
          w[k * n + q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {          // rows p, q: A ← Jᵀ A
          const apk = w[p * n + k]!;
          const aqk = w[q * n + k]!;
          w[p * n + k] = c * apk - s * aqk;
          w[q * n + k] = s * apk + c * aqk;
        }
        w[p * n + p] = app - t * apq;
        w[q * n + q] = aqq + t * apq;
        w[p * n + q] = 0;
        w[q * n + p] = 0;
        for (let k = 0; k < n; k++) {          // V ← V J
          const vkp = v[k * n + p]!;
          const vkq = v[k * n + q]!;
          v[k * n + p] = c * vkp - s * vkq;
          v[k * n + q] = s * vkp + c * vkq;
        }
      }
    }
    if (!rotated) break;
  }
  return sortedEig(w, v, n, sweeps);
}

function sortedEig(w: Float64Array, v: Float64Array, n: number, sweeps: number): SymmetricEig {
  const order = Array.from({ length: n }, (_, i) => i).sort((i, j) => w[j * n + j]! - w[i * n + i]! || i - j);
  const values = new Float64Array(n);
  const vectors = new Float64Array(n * n);
  order.forEach((src, dst) => {
    values[dst] = w[src * n + src]!;
    let big = 0;
    for (let k = 0; k < n; k++) if (Math.abs(v[k * n + src]!) > Math.abs(big)) big = v[k * n + src]!;
    const sign = big < 0 ? -1 : 1;
    for (let k = 0; k < n; k++) vectors[k * n + dst] = sign * v[k * n + src]!;
  });
  return { values, vectors, sweeps };
}

/**
 * A^(−1/2) = V diag(λ^(−1/2)) Vᵀ of a symmetric positive definite matrix (the symmetric, ZCA
 * form; used for W ← (W Wᵀ)^(−1/2) W in FastICA, Hyvärinen 1999).
 * @param a row-major n×n SPD matrix (not modified)
 * @throws ParamError when an eigenvalue is not above `relFloor` × the largest one
 */
export function inverseSqrtSpd(a: Float64Array, n: number, relFloor = 1e-13): Float64Array {
  const { values, vectors } = symmetricEig(a, n);
  const top = values[0]!;
  const scale = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const lam = values[j]!;
    if (!(lam > relFloor * top) || !(top > 0)) {
      throw new ParamError('a', `not positive definite: eigenvalue ${lam} (largest ${top})`);
    }
    scale[j] = 1 / Math.sqrt(lam);
  }
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let k = i; k < n; k++) {
      let acc = 0;
      for (let j = 0; j < n; j++) acc += vectors[i * n + j]! * scale[j]! * vectors[k * n + j]!;
      out[i * n + k] = acc;
      out[k * n + i] = acc;
    }
  }
  return out;
}
