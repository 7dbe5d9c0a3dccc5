import { describe, expect, it } from 'vitest';
import {
  type MatrixFeatures, blockFactors, decisionFunction, fitTraceNorm, lambdaMax, lipschitzBound, predictProba, svt,
} from '../../../shared/decoder/tracenorm';
import { ParamError, ShapeError } from '../../../shared/types';
import { expectAllClose, expectClose } from '../../helpers/all-close';
import fixture from '../../fixtures/tracenorm/tracenorm.json';

const { XA, XB, y } = fixture.tiny;
/** The tiny dataset of REFERENCES.md §4: 10 trials, blocks A and B of 2×2, trial-major. */
const tiny: MatrixFeatures = {
  nTrials: 10,
  blocks: [{ rows: 2, cols: 2 }, { rows: 2, cols: 2 }],
  x: Float64Array.from(XA.flatMap((a, i) => [...a.flat(), ...XB[i]!.flat()])),
};
const labels = Uint8Array.from(y);
const lamMax = fixture.lambdaMax.lambdaMax;

describe('svt', () => {
  it.each(fixture.svt)('matches the worked singular value thresholding example %#', (c) => {
    const rows = c.m.length;
    const cols = c.m[0]!.length;
    const r = svt(Float64Array.from(c.m.flat()), rows, cols, c.tau);
    // Reference: tests/fixtures/tracenorm/tracenorm.json (NumPy SVD; REFERENCES.md §4, Cai et al. 2010 Thm 2.1).
    expectAllClose(r.out, c.out.flat(), { rtol: 1e-12, atol: 1e-14 });
    if ('singularValues' in c) {
      // Same fixture: singular values of the output are max(σ − τ, 0).
      expectAllClose(r.singularValues, c.singularValues as number[], { rtol: 1e-12, atol: 1e-14 });
      // Same fixture: τ was chosen just below σ₂, so the rank is 2.
      expect(r.rank).toBe(2);
    }
  });

  it('returns exactly zero when τ ≥ σ_max and rejects a negative τ', () => {
    const r = svt(Float64Array.from([3, 0, 0, 1]), 2, 2, 3);
    // Cai, Candès & Shen 2010, Thm 2.1: all singular values ≤ τ are set to zero.
    expect(Array.from(r.out)).toEqual([0, 0, 0, 0]);
    expect(r.rank).toBe(0);
    // Common practice: a threshold is non-negative.
    expect(() => svt(Float64Array.from([1]), 1, 1, -1)).toThrow(ParamError);
  });
});

describe('lambdaMax and the step bound', () => {
  it('computes L = ¼‖[X, 1]‖₂² + α', () => {
    // Reference: REFERENCES.md §4 table (L = 5.133242603219355 for α = 1) and tracenorm.json.
    expectClose(lipschitzBound(tiny, 1), fixture.lipschitzAlpha1, { rtol: 1e-13 });
  });

  it('computes λ_max exactly from the per-block gradients at zero', () => {
    // Reference: REFERENCES.md §4 (λ_max = 3.745396052339894 = ‖G_A‖₂).
    expectClose(lambdaMax(tiny, labels), 3.745396052339894, { rtol: 1e-13 });
    // Same source: ‖G_B‖₂ = 2.8640008626508697, so a weight of 2 on A makes B the binding block.
    expectClose(lambdaMax(tiny, labels, Float64Array.from([2, 1])), fixture.lambdaMax.normGB, { rtol: 1e-13 });
  });

  it('rejects labels with a single class', () => {
    // REFERENCES.md §4: b0 = log(n1/n0) needs both classes.
    expect(() => lambdaMax(tiny, new Uint8Array(10))).toThrow(ParamError);
  });
});

describe('fitTraceNorm on the REFERENCES §4 dataset', () => {
  it('gives exactly zero weights and b = log(n1/n0) for λ ≥ λ_max', () => {
    const m = fitTraceNorm(tiny, labels, { lambda: 1.0001 * lamMax });
    // REFERENCES.md §4: W_A = W_B = 0 exactly, b = 0 (= log(5/5)).
    expect(m.weights.every((w) => w.every((x) => x === 0))).toBe(true);
    expect(m.bias).toBe(fixture.lambdaMax.b0);
    expect(m.activeBlocks).toEqual([]);
    expect(m.converged).toBe(true);
  });

  it('gives zero weights and the class-prior bias for unbalanced classes too', () => {
    const six = Uint8Array.from(y.map((v, i) => (i === 9 ? 1 : v)));
    const m = fitTraceNorm(tiny, six, { lambda: 1.0001 * lambdaMax(tiny, six), alpha: 0.5 });
    // REFERENCES.md §4: for λ ≥ λ_max, W = 0 exactly (the α term does not change it) and b0 = log(n1/n0).
    expect(m.weights.every((w) => w.every((v) => v === 0))).toBe(true);
    expectClose(m.bias, Math.log(6 / 4), { rtol: 1e-14 });
  });

  it('matches scikit-learn for λ = 0, α = 1', () => {
    const m = fitTraceNorm(tiny, labels, { lambda: 0, alpha: 1, tol: 1e-12, maxIter: 100000 });
    // Reference: tracenorm.json ridge.sklearnCoef (LogisticRegression C = 1, lbfgs); REFERENCES §4 tolerance 1e-5.
    expectAllClose([...m.weights[0]!, ...m.weights[1]!], fixture.ridge.sklearnCoef, { atol: 1e-5 });
    expectClose(m.bias, fixture.ridge.sklearnIntercept, { atol: 1e-5 });
    // Same fixture: scikit-learn's newton-cholesky solution (gradient ~1e-15) supports a tight tolerance.
    expectAllClose([...m.weights[0]!, ...m.weights[1]!], fixture.ridge.newtonCoef, { rtol: 0, atol: 1e-9 });
    expectClose(m.bias, fixture.ridge.newtonIntercept, { rtol: 0, atol: 1e-9 });
    // Same fixture: objective of the converged reference FISTA.
    expectClose(m.objective, fixture.ridge.objective, { rtol: 1e-12 });
  });

  it('keeps block A only at λ = 0.9 λ_max', () => {
    const m = fitTraceNorm(tiny, labels, { lambda: 0.9 * lamMax, tol: 1e-12, maxIter: 100000 });
    // Reference: REFERENCES.md §4 (‖W_A‖_F = 0.2062, W_B = 0, b = −0.0430855) and tracenorm.json lam09.
    expectClose(Math.hypot(...m.weights[0]!), fixture.lam09.normWA, { rtol: 1e-6 });
    expect(m.weights[1]!.every((x) => x === 0)).toBe(true);
    expectClose(m.bias, fixture.lam09.b, { atol: 1e-7 });
    expect(m.activeBlocks).toEqual([0]);
    // Same fixture: objective at the reference solution.
    expectClose(m.objective, fixture.lam09.objective, { rtol: 1e-10 });
  });

  it('matches the reference solution at λ = 0.3 λ_max, α = 0.1', () => {
    const m = fitTraceNorm(tiny, labels, { lambda: fixture.lam03.lambda, alpha: 0.1, tol: 1e-13, maxIter: 100000 });
    // Reference: REFERENCES.md §4 table and tracenorm.json lam03 (FISTA, 50000 iterations); 1e-6 as asked.
    expectAllClose(m.weights[0]!, fixture.lam03.WA, { atol: 1e-6 });
    expectAllClose(m.weights[1]!, fixture.lam03.WB, { atol: 1e-6 });
    expectClose(m.bias, fixture.lam03.b, { atol: 1e-6 });
    expectClose(m.objective, fixture.lam03.objective, { atol: 1e-6 });
    // Same source: both blocks rank 1.
    expect(m.ranks).toEqual([1, 1]);
    expect(m.activeBlocks).toEqual([0, 1]);
  });

  it('never increases the objective (MFISTA) at any iteration count', () => {
    let prev = Infinity;
    for (const maxIter of [1, 2, 3, 5, 8, 13, 21, 34, 55, 89]) {
      const m = fitTraceNorm(tiny, labels, { lambda: fixture.lam03.lambda, alpha: 0.1, tol: 1e-15, maxIter });
      // Beck & Teboulle 2009b (MFISTA): F(x_k) is non-increasing in k.
      expect(m.objective).toBeLessThanOrEqual(prev);
      prev = m.objective;
    }
  });

  it('drops the block with a large weight first', () => {
    const m = fitTraceNorm(tiny, labels, { lambda: 0.3 * lamMax, alpha: 0.1, blockWeights: Float64Array.from([10, 1]) });
    // REFERENCES.md §4: λ_max with w = (10, 1) is ‖G_B‖₂ = 2.864 > 0.3 λ_max = 1.12 > ‖G_A‖₂/10 = 0.37, so A leaves, B stays.
    expect(m.activeBlocks).toEqual([1]);
  });
});

describe('prediction and interpretation', () => {
  it('matches scikit-learn decision values on a larger problem', () => {
    const L = fixture.ridgeLarger;
    const feats: MatrixFeatures = { nTrials: L.y.length, blocks: L.blocks.map(([rows, cols]) => ({ rows: rows!, cols: cols! })), x: Float64Array.from(L.x) };
    const m = fitTraceNorm(feats, Uint8Array.from(L.y), { lambda: 0, alpha: L.alpha, tol: 1e-12, maxIter: 100000 });
    // Reference: tracenorm.json ridgeLarger (LogisticRegression C = 2 = 1/α, newton-cholesky, gradient ~1e-15).
    expectAllClose([...m.weights[0]!, ...m.weights[1]!], L.sklearnCoef, { rtol: 0, atol: 1e-8 });
    expectClose(m.bias, L.sklearnIntercept, { rtol: 0, atol: 1e-8 });
    const z = decisionFunction(m, feats);
    const p = predictProba(m, feats);
    const zRef = L.y.map((_, i) => L.sklearnIntercept + L.sklearnCoef.reduce((a, c, j) => a + c * L.x[i * 22 + j]!, 0));
    // Same fixture: decision values X coefᵀ + intercept.
    expectAllClose(z, zRef, { rtol: 0, atol: 1e-7 });
    // Definition of the logistic function.
    expectAllClose(p, zRef.map((v) => 1 / (1 + Math.exp(-v))), { rtol: 0, atol: 1e-7 });
  });

  it('predicts without overflow for huge decision values', () => {
    const m = fitTraceNorm(tiny, labels, { lambda: 0.3 * lamMax, alpha: 0.1 });
    const big: MatrixFeatures = { ...tiny, x: tiny.x.map((v) => v * 1e308 / 10) };
    const p = predictProba(m, big);
    // Common practice: a stable sigmoid maps ±huge to exactly 1 or 0, never NaN.
    expect(p.every((v) => v >= 0 && v <= 1)).toBe(true);
  });

  it('returns the rank-1 factors of an active block', () => {
    const m = fitTraceNorm(tiny, labels, { lambda: fixture.lam03.lambda, alpha: 0.1, tol: 1e-13, maxIter: 100000 });
    const f = blockFactors(m, 0);
    // Reference: tracenorm.json lam03.svWA (σ₁ = 1.8405722461, rank 1).
    expectAllClose(f.singularValues, [fixture.lam03.svWA[0]!], { rtol: 1e-6 });
    const wa = fixture.lam03.WA;
    const rebuilt = [0, 1].flatMap((i) => [0, 1].map((j) => f.singularValues[0]! * f.left[0]![i]! * f.right[0]![j]!));
    // Definition of the SVD: σ u vᵀ rebuilds a rank-1 matrix; sign convention makes u's largest entry positive.
    expectAllClose(rebuilt, wa, { atol: 1e-6 });
    expect(f.left[0]![0]!).toBeGreaterThan(0);
  });

  it('rejects features whose blocks differ from the model and leaves inputs untouched', () => {
    const copy = Float64Array.from(tiny.x);
    const m = fitTraceNorm(tiny, labels, { lambda: 0.5 * lamMax });
    // STYLE.md §3: a shape mismatch is a ShapeError.
    expect(() => decisionFunction(m, { nTrials: 10, blocks: [{ rows: 4, cols: 2 }], x: tiny.x })).toThrow(ShapeError);
    // Common practice: inputs are not modified.
    expect(tiny.x).toEqual(copy);
  });
});
