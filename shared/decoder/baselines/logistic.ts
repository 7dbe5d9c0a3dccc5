/**
 * L2-regularised logistic regression (le Cessie & van Houwelingen 1992, Appl Stat 41(1):191-201)
 * in scikit-learn's C convention: minimise ½‖w‖² + C·Σ_i log(1 + exp(-s_i (wᵀx_i + b))),
 * s_i = 2y_i - 1; the bias b is not penalised. Solved by Newton's method (iteratively reweighted
 * least squares) with an Armijo backtracking line search; the objective is strictly convex, so
 * the optimum is unique and does not depend on the solver. Meant for up to a few hundred
 * features (one (p+1)×(p+1) Cholesky per iteration).
 * Stopping rule: ‖gradient‖_∞ <= tol·(1 + C·n), or the Newton decrement gᵀH⁻¹g/2 falls to
 * 1e-15·max(1, |objective|) (then one last full Newton step is taken), or `maxIter` iterations
 * (then `converged` is false).
 */
import { ParamError } from '../../types';
import {
  checkBinaryLabels, decodeF64, encodeF64, expectArtifact, numberField, registerStageKind,
  type Classifier, type FeatureRows, type Stage, type StageArtifact,
} from '../pipeline';
import { checkRows } from '../stages/feature-rows';
import { cholesky, choleskySolve, log1pExp, sigmoid } from './dense';

export type LogisticParams = {
  /** Inverse regularisation strength (> 0); larger C, weaker penalty. Default 1. */
  C?: number;
  /** Gradient tolerance, relative to 1 + C·n. Default 1e-10. */
  tol?: number;
  maxIter?: number; // default 100
};

export interface FittedLogistic extends Classifier<FeatureRows> {
  readonly weights: Float64Array; // [feature]
  readonly bias: number;
  readonly iterations: number;
  readonly converged: boolean;
}

/** Solves the problem above; returns weights, bias and convergence information. */
export function fitLogisticL2(x: FeatureRows, labels: Uint8Array, C: number, tol = 1e-10, maxIter = 100): {
  weights: Float64Array; bias: number; iterations: number; converged: boolean;
} {
  const p = checkRows(x);
  const n = x.length;
  checkBinaryLabels(labels, n);
  if (!(C > 0)) throw new ParamError('C', `expected C > 0, got ${C}`);
  const d = p + 1; // theta = [w, b]
  const aug = x.map((r) => { const a = new Float64Array(d); a.set(r); a[p] = 1; return a; }); // [x_i, 1]
  let theta = new Float64Array(d);
  const z = new Float64Array(n);
  const scores = (t: Float64Array, out: Float64Array) => {
    for (let i = 0; i < n; i++) { let s = t[p]!; const r = x[i]!; for (let j = 0; j < p; j++) s += t[j]! * r[j]!; out[i] = s; }
  };
  const objective = (t: Float64Array, zz: Float64Array) => {
    let f = 0;
    for (let j = 0; j < p; j++) f += 0.5 * t[j]! ** 2;
    for (let i = 0; i < n; i++) f += C * log1pExp(labels[i] === 1 ? -zz[i]! : zz[i]!);
    return f;
  };
  scores(theta, z);
  let f = objective(theta, z);
  const gtol = tol * (1 + C * n);
  for (let it = 0; it < maxIter; it++) {
    const g = new Float64Array(d), h = new Float64Array(d * d);
    for (let j = 0; j < p; j++) { g[j] = theta[j]!; h[j * d + j] = 1; }
    for (let i = 0; i < n; i++) {
      const mu = sigmoid(z[i]!), r = aug[i]!, wgt = C * mu * (1 - mu), res = C * (mu - labels[i]!);
      for (let a = 0; a < d; a++) {
        const xa = r[a]!;
        g[a]! += res * xa;
        const wa = wgt * xa, row = a * d;
        for (let b = 0; b <= a; b++) h[row + b]! += wa * r[b]!;
      }
    }
    let gmax = 0;
    for (let a = 0; a < d; a++) gmax = Math.max(gmax, Math.abs(g[a]!));
    if (gmax <= gtol) return { weights: theta.slice(0, p), bias: theta[p]!, iterations: it, converged: true };
    for (let a = 0; a < d; a++) for (let b = a + 1; b < d; b++) h[a * d + b] = h[b * d + a]!;
    const l = cholesky(h, d);
    if (l === null) break;
    const step = choleskySolve(l, d, g);
    let slope = 0;
    for (let a = 0; a < d; a++) slope += g[a]! * step[a]!;
    if (slope / 2 <= 1e-15 * Math.max(1, Math.abs(f))) {
      // Newton decrement at round-off level (Boyd & Vandenberghe 2004, §9.5.1): the objective can
      // no longer resolve progress, so take the pure Newton step and stop.
      theta = Float64Array.from(theta, (v, a) => v - step[a]!);
      return { weights: theta.slice(0, p), bias: theta[p]!, iterations: it + 1, converged: true };
    }
    let t = 1, next = theta, zNext = new Float64Array(n), fNext = f;
    for (let ls = 0; ls < 60; ls++) {
      next = Float64Array.from(theta, (v, a) => v - t * step[a]!);
      scores(next, zNext);
      fNext = objective(next, zNext);
      if (fNext <= f - 1e-4 * t * slope) break;
      t /= 2;
    }
    if (!(fNext <= f)) break; // no progress possible in floating point
    theta = next; z.set(zNext); f = fNext;
  }
  return { weights: theta.slice(0, p), bias: theta[p]!, iterations: maxIter, converged: false };
}

function makeFitted(params: Required<LogisticParams>, weights: Float64Array, bias: number,
                    iterations: number, converged: boolean): FittedLogistic {
  const decision = (x: FeatureRows) => {
    checkRows(x, 'x', weights.length);
    return Float64Array.from(x, (r) => { let s = bias; for (let j = 0; j < weights.length; j++) s += weights[j]! * r[j]!; return s; });
  };
  return {
    kind: 'logreg-l2', weights, bias, iterations, converged,
    transform: decision,
    predictProba: (x) => decision(x).map(sigmoid),
    toArtifact: () => ({ kind: 'logreg-l2', version: 1, params: { ...params },
                         learned: { weights: encodeF64(weights), bias, iterations, converged } }),
  };
}

function withDefaults(params: LogisticParams): Required<LogisticParams> {
  const p = { C: params.C ?? 1, tol: params.tol ?? 1e-10, maxIter: params.maxIter ?? 100 };
  if (!(p.C > 0 && Number.isFinite(p.C))) throw new ParamError('C', `expected a finite C > 0, got ${p.C}`);
  if (!(p.tol > 0)) throw new ParamError('tol', `expected tol > 0, got ${p.tol}`);
  if (!Number.isInteger(p.maxIter) || p.maxIter < 1) throw new ParamError('maxIter', `expected an integer >= 1, got ${p.maxIter}`);
  return p;
}

/**
 * Stage: L2 logistic regression on feature rows. Choose C by inner CV with
 * `nestedCrossValidate((C) => [..., logisticStage({ C })], [0.01, 0.1, 1, 10, 100], ...)`
 * (grid from strongest to weakest penalty, so ties pick the stronger penalty).
 */
export function logisticStage(params: LogisticParams = {}): Stage<FeatureRows, Float64Array, FittedLogistic> {
  const full = withDefaults(params);
  return {
    kind: 'logreg-l2', params: full,
    fit(x, labels) {
      const r = fitLogisticL2(x, checkBinaryLabels(labels, x.length), full.C, full.tol, full.maxIter);
      return makeFitted(full, r.weights, r.bias, r.iterations, r.converged);
    },
  };
}

/** Rebuilds a fitted logistic regression from its artifact. */
export function logisticFromArtifact(a: StageArtifact): FittedLogistic {
  expectArtifact(a, 'logreg-l2', 1);
  const params = withDefaults({ C: numberField(a.params, 'C', 'params'), tol: numberField(a.params, 'tol', 'params'),
                                maxIter: numberField(a.params, 'maxIter', 'params') });
  return makeFitted(params, decodeF64(a.learned.weights, 'learned.weights'), numberField(a.learned, 'bias', 'learned'),
                    numberField(a.learned, 'iterations', 'learned'), a.learned.converged === true);
}

registerStageKind('logreg-l2', logisticFromArtifact);
