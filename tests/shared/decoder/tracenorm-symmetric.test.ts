import { describe, expect, it } from 'vitest';
import { fitTraceNorm, lambdaMax, svt, symmetricSvt, type MatrixFeatures } from '../../../shared/decoder/tracenorm';
import { ShapeError } from '../../../shared/types';
import { expectAllClose, expectClose } from '../../helpers/all-close';
import fixture from '../../fixtures/linalg/symmetric_eig.json';

const withProx = fixture.eig.filter((c): c is typeof c & { prox: number[] } => 'prox' in c && Array.isArray((c as { prox?: unknown }).prox));
const tn = fixture.traceNorm;
const labels = Uint8Array.from(tn.labels);
const p = tn.side;

function features(symmetric: boolean): MatrixFeatures {
  return { nTrials: tn.nTrials, blocks: [{ rows: p, cols: p, symmetric }], x: Float64Array.from(tn.x) };
}

describe('symmetric proximal step (eigenvalue soft-thresholding)', () => {
  it.each(withProx.map((c) => [c.name, c] as const))('matches the NumPy eigh-based prox on %s', (_, c) => {
    const r = symmetricSvt(Float64Array.from(c.a), c.n, c.tau);
    // Reference: tests/fixtures/linalg/symmetric_eig.json (V diag(sign(μ) max(|μ| − τ, 0)) Vᵀ from numpy.linalg.eigh).
    expectAllClose(r.out, c.prox, { atol: 1e-11 * Math.max(1, c.tau) });
    // Same fixture: rank and the shrunk eigenvalues.
    expect(r.rank).toBe(c.proxRank);
    expectAllClose(r.eigenvalues, c.proxEigenvalues, { atol: 1e-11 * Math.max(1, c.tau) });
    for (let i = 0; i < c.n; i++) for (let j = 0; j < i; j++) {
      // Definition: the result is symmetric (bit for bit, by construction).
      expect(r.out[i * c.n + j]).toBe(r.out[j * c.n + i]);
    }
  });

  it('equals singular value thresholding of the same symmetric matrix', () => {
    const c = withProx.find((x) => x.name === 'n16-rank6')!;
    // Cai, Candès & Shen 2010 Thm 2.1 (SVT) vs the eigenvalue form: both are the prox of τ‖·‖_*; fixture as reference.
    expectAllClose(svt(Float64Array.from(c.a), c.n, c.n, c.tau).out, c.prox, { atol: 1e-10 });
  });
});

describe('trace-norm logistic regression on a symmetric block', () => {
  it('computes λ_max from the eigenvalues of the symmetric gradient', () => {
    // Reference: tests/fixtures/linalg/symmetric_eig.json (max |eigvalsh(Σ (y_i − ȳ) X_i)|, REFERENCES.md §4).
    expectClose(lambdaMax(features(true), labels), tn.lambdaMax, { rtol: 1e-12 });
    // Same reference: the SVD route (unflagged block) gives the same λ_max.
    expectClose(lambdaMax(features(false), labels), tn.lambdaMax, { rtol: 1e-10 });
  });

  it.each(tn.solves.map((s, i) => [i, s] as const))('matches the NumPy FISTA solution %#', (_, s) => {
    const m = fitTraceNorm(features(true), labels, { lambda: s.lambda, tol: 1e-12, maxIter: 20000 });
    // Reference: tests/fixtures/linalg/symmetric_eig.json (plain FISTA with the eigh prox, run to 1e-15 steps).
    expectClose(m.objective, s.objective, { rtol: 1e-9 });
    expectAllClose(m.weights[0]!, s.weights, { atol: 1e-6 });
    expectClose(m.bias, s.bias, { atol: 1e-6 });
    // Same fixture: rank of W.
    expect(m.ranks[0]).toBe(s.rank);
    const w = m.weights[0]!;
    for (let i = 0; i < p; i++) for (let j = 0; j < i; j++) {
      // Definition: the weight of a symmetric block stays symmetric (bit for bit).
      expect(w[i * p + j]).toBe(w[j * p + i]);
    }
    // Same fixture: the unflagged (SVD) solver reaches the same optimum.
    const general = fitTraceNorm(features(false), labels, { lambda: s.lambda, tol: 1e-12, maxIter: 20000 });
    expectClose(general.objective, s.objective, { rtol: 1e-9 });
  });

  it('refuses a block flagged symmetric whose matrices are not', () => {
    const f = features(true);
    f.x[1] = f.x[1]! + 0.5; // entry [0][1] of trial 0 only
    // Common practice: a declared structure the data lack is an input error, not silently used.
    expect(() => fitTraceNorm(f, labels, { lambda: 1 })).toThrow(ShapeError);
    // Common practice: a non-square block cannot be symmetric.
    expect(() => lambdaMax({ nTrials: 2, blocks: [{ rows: 2, cols: 3, symmetric: true }], x: new Float64Array(12) }, Uint8Array.of(0, 1))).toThrow(ShapeError);
  });
});
