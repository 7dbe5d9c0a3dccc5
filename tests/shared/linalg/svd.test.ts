import { describe, expect, it } from 'vitest';
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { svd } from '../../../shared/linalg/svd';
import { createRng } from '../../../shared/linalg/random';
import { ShapeError } from '../../../shared/types';
import { expectAllClose } from '../../helpers/all-close';

function randomMatrix(rows: number, cols: number, seed: number): Float64Array {
  const rng = createRng(seed);
  return Float64Array.from({ length: rows * cols }, () => rng.nextNormal());
}

function reconstruct(u: Float64Array, s: Float64Array, v: Float64Array, rows: number, cols: number, k: number) {
  const out = new Float64Array(rows * cols);
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) {
      let acc = 0;
      for (let l = 0; l < k; l++) acc += u[i * k + l]! * s[l]! * v[j * k + l]!;
      out[i * cols + j] = acc;
    }
  }
  return out;
}

function gram(q: Float64Array, n: number, k: number): Float64Array {
  const g = new Float64Array(k * k);
  for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) {
    let acc = 0;
    for (let i = 0; i < n; i++) acc += q[i * k + a]! * q[i * k + b]!;
    g[a * k + b] = acc;
  }
  return g;
}

const identity = (k: number) => Float64Array.from({ length: k * k }, (_, i) => (i % (k + 1) === 0 ? 1 : 0));

describe('svd (one-sided Jacobi)', () => {
  it.each([[16, 18], [18, 16], [7, 7], [1, 5], [5, 1], [30, 3]])('matches ml-matrix singular values for %i×%i', (rows, cols) => {
    const a = randomMatrix(rows, cols, rows * 100 + cols);
    const { s, u, v, k } = svd(a, rows, cols);
    const ref = new SingularValueDecomposition(new Matrix(Array.from({ length: rows }, (_, i) =>
      Array.from(a.subarray(i * cols, (i + 1) * cols)))), { autoTranspose: true });
    // Reference: ml-matrix 6 SingularValueDecomposition (Golub–Kahan, an outside implementation).
    expectAllClose(s, ref.diagonal, { rtol: 1e-12, atol: 1e-13 });
    // Definition of the SVD: A = U diag(s) Vᵀ.
    expectAllClose(reconstruct(u, s, v, rows, cols, k), a, { rtol: 0, atol: 1e-13 });
    // Definition: orthonormal singular vectors.
    expectAllClose(gram(u, rows, k), identity(k), { atol: 1e-13 });
    expectAllClose(gram(v, cols, k), identity(k), { atol: 1e-13 });
  });

  it('decomposes a rank-deficient matrix with exact zero singular values', () => {
    // A = x yᵀ + 2 p qᵀ with orthonormal x ⟂ p and y ⟂ q: singular values 2, 1, 0, 0.
    const x = [0.5, 0.5, 0.5, 0.5];
    const p = [0.5, -0.5, 0.5, -0.5];
    const y = [0.6, 0.8, 0, 0, 0];
    const q = [0, 0, 1, 0, 0];
    const a = Float64Array.from({ length: 20 }, (_, i) => x[Math.floor(i / 5)]! * y[i % 5]! + 2 * p[Math.floor(i / 5)]! * q[i % 5]!);
    const { s } = svd(a, 4, 5);
    // Definition of singular values of an orthogonal rank-2 sum (computed by hand above).
    expectAllClose(s, [2, 1, 0, 0], { atol: 1e-15 });
  });

  it('converges in fewer sweeps from the rotation of a nearby matrix, to the same result', () => {
    const a = randomMatrix(16, 18, 5);
    const first = svd(a, 16, 18);
    const b = a.map((x, i) => x + 1e-3 * Math.sin(i));
    const cold = svd(b, 16, 18);
    const warm = svd(b, 16, 18, { warmStart: first.rotation });
    // Common practice (Jacobi converges quadratically near a diagonalising rotation).
    expect(warm.sweeps).toBeLessThan(cold.sweeps);
    // Singular values do not depend on the starting rotation.
    expectAllClose(warm.s, cold.s, { rtol: 1e-13 });
    expectAllClose(reconstruct(warm.u, warm.s, warm.v, 16, 18, 16), b, { atol: 1e-13 });
  });

  it('does not modify its input and rejects a wrong length', () => {
    const a = randomMatrix(3, 4, 9);
    const copy = Float64Array.from(a);
    svd(a, 3, 4);
    // Common practice: numeric routines leave their inputs untouched.
    expect(a).toEqual(copy);
    // STYLE.md §3: a wrong shape is a ShapeError.
    expect(() => svd(a, 4, 4)).toThrow(ShapeError);
  });
});
