import { describe, expect, it } from 'vitest';
import { createPartialEigWorkspace, eigenpairsBeyond } from '../../../shared/linalg/symmetric-eig-partial';
import { symmetricEigQl } from '../../../shared/linalg/tridiagonal-eig';
import { ParamError } from '../../../shared/types';
import { expectAllClose, expectClose } from '../../helpers/all-close';
import fixture from '../../fixtures/linalg/symmetric_eig.json';

type Case = (typeof fixture.eig)[number] & { vectors?: number[] };
const cases = fixture.eig as Case[];

/** Column j of a row-major n×n matrix, sign fixed so its largest-magnitude entry is positive. */
function column(m: ArrayLike<number>, n: number, j: number): number[] {
  const c = Array.from({ length: n }, (_, i) => m[i * n + j]!);
  const big = c.reduce((a, x) => (Math.abs(x) > Math.abs(a) ? x : a), 0);
  return big < 0 ? c.map((x) => -x) : c;
}

/** max_i |(A x)_i − μ x_i| for a unit vector x. */
function residual(a: ArrayLike<number>, n: number, x: ArrayLike<number>, mu: number): number {
  let worst = 0;
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let k = 0; k < n; k++) s += a[i * n + k]! * x[k]!;
    worst = Math.max(worst, Math.abs(s - mu * x[i]!));
  }
  return worst;
}

function normInf(a: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]!));
  return m;
}

describe('symmetricEigQl (Householder tridiagonalisation + implicit QL)', () => {
  it.each(cases.map((c) => [c.name, c] as const))('matches numpy.linalg.eigh on %s', (_, c) => {
    const { n } = c;
    const a = Float64Array.from(c.a);
    const { values, vectors } = symmetricEigQl(a, n);
    const scale = Math.max(1, normInf(c.values));
    // Reference: tests/fixtures/linalg/symmetric_eig.json (numpy.linalg.eigh, ascending; ours descending).
    expectAllClose(values, [...c.values].reverse(), { atol: 1e-12 * scale });
    for (let j = 0; j < n; j++) {
      const x = column(vectors, n, j);
      // Definition of an eigenpair: A x = μ x, to rounding (backward stable, ~ε‖A‖).
      expect(residual(a, n, x, values[j]!)).toBeLessThan(1e-12 * scale);
      const gap = Math.min(...Array.from(values).filter((_, l) => l !== j).map((v) => Math.abs(v - values[j]!)), Infinity);
      if (c.vectors && gap > 1e-6 * scale) {
        // Same fixture: eigenvectors of simple eigenvalues (gap > 1e-6‖A‖) agree up to sign.
        expectAllClose(x, column(c.vectors, n, n - 1 - j), { atol: 1e-10 });
      }
    }
  });

  it('rejects non-symmetric and non-finite input', () => {
    // Common practice: the routine reads one triangle, so asymmetric input is refused, not silently symmetrised.
    expect(() => symmetricEigQl(Float64Array.of(1, 2, 3, 4), 2)).toThrow(ParamError);
    // Common practice: NaN entries are refused.
    expect(() => symmetricEigQl(Float64Array.of(1, NaN, NaN, 4), 2)).toThrow(ParamError);
  });
});

describe('eigenpairsBeyond (eigenpairs with |μ| > τ only)', () => {
  it.each(cases.map((c) => [c.name, c] as const))('selects the eigenpairs of numpy.linalg.eigh beyond τ on %s', (_, c) => {
    const { n } = c;
    const a = Float64Array.from(c.a);
    const ws = createPartialEigWorkspace(n);
    const count = eigenpairsBeyond(a, 0, c.tau, ws);
    const scale = Math.max(1, normInf(c.values));
    // Reference: tests/fixtures/linalg/symmetric_eig.json, the eigenvalues with |μ| > τ (ascending).
    expect(count).toBe(c.proxRank);
    expectAllClose(ws.selected.subarray(0, count), c.selectedValues, { atol: 1e-12 * scale });
    for (let j = 0; j < count; j++) {
      const x = ws.vectors.subarray(j * n, (j + 1) * n);
      // Definition of an eigenpair: A x = μ x.
      expect(residual(a, n, x, ws.selected[j]!)).toBeLessThan(1e-11 * scale);
      for (let l = 0; l <= j; l++) {
        let dot = 0;
        for (let i = 0; i < n; i++) dot += x[i]! * ws.vectors[l * n + i]!;
        // Definition: eigenvectors of a symmetric matrix are orthonormal (also within the repeated cluster).
        expectClose(dot, l === j ? 1 : 0, { atol: 1e-12 });
      }
    }
  });

  it('returns all eigenvalues when τ = Infinity and none beyond a threshold above ‖A‖₂', () => {
    const c = cases.find((x) => x.name === 'n64')!;
    const ws = createPartialEigWorkspace(c.n);
    // Reference: tests/fixtures/linalg/symmetric_eig.json (numpy.linalg.eigh).
    expect(eigenpairsBeyond(Float64Array.from(c.a), 0, Infinity, ws)).toBe(0);
    expectAllClose(ws.values, c.values, { atol: 1e-12 * normInf(c.values) });
    // Same fixture: no eigenvalue exceeds the largest |μ|.
    expect(eigenpairsBeyond(Float64Array.from(c.a), 0, normInf(c.values) * (1 + 1e-9), ws)).toBe(0);
  });

  it('reads the block at an offset', () => {
    const c = cases.find((x) => x.name === 'n5')!;
    const padded = new Float64Array(3 + c.a.length);
    padded.set(c.a, 3);
    const ws = createPartialEigWorkspace(c.n);
    eigenpairsBeyond(padded, 3, c.tau, ws);
    // Reference: tests/fixtures/linalg/symmetric_eig.json.
    expectAllClose(ws.selected.subarray(0, ws.count), c.selectedValues, { atol: 1e-12 });
  });
});
