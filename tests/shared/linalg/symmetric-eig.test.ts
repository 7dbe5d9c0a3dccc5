import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { inverseSqrtSpd, symmetricEig } from '../../../shared/linalg/symmetric-eig';
import { createRng } from '../../../shared/linalg/random';
import { ParamError } from '../../../shared/types';
import { expectAllClose } from '../../helpers/all-close';

function randomSpd(n: number, seed: number, samples = 3 * n): Float64Array {
  const rng = createRng(seed);
  const x = Float64Array.from({ length: n * samples }, () => rng.nextNormal());
  const c = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    let acc = 0;
    for (let t = 0; t < samples; t++) acc += x[i * samples + t]! * x[j * samples + t]!;
    c[i * n + j] = acc / samples;
  }
  return c;
}

function matmul(a: Float64Array, b: Float64Array, n: number): Float64Array {
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) {
    const aik = a[i * n + k]!;
    for (let j = 0; j < n; j++) out[i * n + j]! += aik * b[k * n + j]!;
  }
  return out;
}

describe('symmetricEig (cyclic Jacobi)', () => {
  it.each([2, 5, 15, 64])('matches ml-matrix eigenvalues and reconstructs A for n = %i', (n) => {
    const a = randomSpd(n, n);
    const { values, vectors } = symmetricEig(a, n);
    const ref = new EigenvalueDecomposition(new Matrix(Array.from({ length: n }, (_, i) =>
      Array.from(a.subarray(i * n, (i + 1) * n)))), { assumeSymmetric: true });
    // Reference: ml-matrix 6 EigenvalueDecomposition (tridiagonal QL, ascending order).
    expectAllClose(values, [...ref.realEigenvalues].reverse(), { rtol: 1e-11, atol: 1e-13 });
    const vd = vectors.map((x, idx) => x * values[idx % n]!);
    const vt = Float64Array.from({ length: n * n }, (_, idx) => vectors[(idx % n) * n + Math.floor(idx / n)]!);
    // Definition: A = V diag(λ) Vᵀ and VᵀV = I.
    expectAllClose(matmul(vd, vt, n), a, { atol: 1e-12 });
    expectAllClose(matmul(vt, vectors, n), Float64Array.from({ length: n * n }, (_, i) => (i % (n + 1) === 0 ? 1 : 0)), { atol: 1e-13 });
  });

  it('returns an exact zero eigenvalue for a zero row and column (flat channel)', () => {
    const a = randomSpd(4, 3);
    for (let k = 0; k < 4; k++) { a[2 * 4 + k] = 0; a[k * 4 + 2] = 0; }
    const { values, vectors } = symmetricEig(a, 4);
    // Definition: e_3 is an eigenvector with eigenvalue 0 when row and column 3 vanish.
    expect(values[3]).toBe(0);
    expectAllClose([vectors[2 * 4 + 3]!], [1], { atol: 1e-15 });
  });

  it('computes the inverse square root of an SPD matrix', () => {
    const n = 6;
    const a = randomSpd(n, 11);
    const r = inverseSqrtSpd(a, n);
    // Definition: A^(-1/2) A A^(-1/2) = I.
    expectAllClose(matmul(matmul(r, a, n), r, n), Float64Array.from({ length: n * n }, (_, i) => (i % (n + 1) === 0 ? 1 : 0)), { atol: 1e-12 });
    const singular = Float64Array.from([1, 1, 1, 1]);
    // Definition: [[1,1],[1,1]] has eigenvalue 0, so it has no inverse square root.
    expect(() => inverseSqrtSpd(singular, 2)).toThrow(ParamError);
  });

  it('does not modify its input', () => {
    const a = randomSpd(5, 2);
    const copy = Float64Array.from(a);
    symmetricEig(a, 5);
    // Common practice: numeric routines leave their inputs untouched.
    expect(a).toEqual(copy);
  });
});
