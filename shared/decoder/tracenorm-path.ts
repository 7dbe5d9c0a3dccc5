/**
 * Regularisation path of trace-norm logistic regression: fits from λ_max (all blocks zero)
 * down a decreasing sequence of λ, each fit warm-started from the previous one (the pathwise
 * strategy of Friedman, Hastie & Tibshirani 2010, J. Stat. Softw. 33(1), applied to the
 * trace-norm problem of Tomioka & Aihara 2007). Warm starts make the whole path cost little
 * more than its last, hardest fit, and as λ falls blocks enter one by one.
 */
import { ParamError } from '../types';
import type { MatrixFeatures } from './tracenorm-data';
import { type TraceNormModel, fitTraceNorm, lambdaMax } from './tracenorm';

/** Either explicit λ values, or `count` values spaced geometrically from λ_max to minRatio·λ_max. */
export interface TraceNormPathOptions {
  /** Explicit λ values (≥ 0); they are fitted in decreasing order. */
  lambdas?: ArrayLike<number>;
  /** Number of λ values when `lambdas` is absent; default 10. */
  count?: number;
  /** Smallest λ as a fraction of λ_max when `lambdas` is absent; default 0.05. */
  minRatio?: number;
  alpha?: number;
  maxIter?: number;
  tol?: number;
  blockWeights?: Float64Array;
}

/** The fitted path: models[j] belongs to lambdas[j]; lambdas decrease. */
export interface TraceNormPath {
  lambdaMax: number;
  lambdas: Float64Array;
  models: TraceNormModel[];
}

/**
 * Fits the λ path with warm starts (see module comment).
 * Default grid: 10 values λ_max·minRatio^(j/(count−1)), j = 0..count−1, minRatio 0.05
 * (common practice for a log-spaced grid; the first value gives the all-zero model).
 */
export function traceNormPath(features: MatrixFeatures, labels: Uint8Array,
                              options: TraceNormPathOptions = {}): TraceNormPath {
  const lamMax = lambdaMax(features, labels, options.blockWeights);
  const lambdas = options.lambdas !== undefined ? explicitGrid(options.lambdas) : geometricGrid(lamMax, options);
  const models: TraceNormModel[] = [];
  let warm: TraceNormModel | undefined;
  for (const lambda of lambdas) {
    warm = fitTraceNorm(features, labels, {
      lambda, alpha: options.alpha, maxIter: options.maxIter, tol: options.tol, blockWeights: options.blockWeights,
    }, warm);
    models.push(warm);
  }
  return { lambdaMax: lamMax, lambdas, models };
}

function explicitGrid(values: ArrayLike<number>): Float64Array {
  const grid = Float64Array.from(values);
  if (grid.length < 1) throw new ParamError('lambdas', 'expected at least one value');
  grid.forEach((v, j) => {
    if (!(v >= 0) || !Number.isFinite(v)) throw new ParamError(`lambdas[${j}]`, `expected a finite value ≥ 0, got ${v}`);
  });
  return grid.sort().reverse();
}

function geometricGrid(lamMax: number, options: TraceNormPathOptions): Float64Array {
  const { count = 10, minRatio = 0.05 } = options;
  if (!Number.isInteger(count) || count < 1) throw new ParamError('count', `expected an integer ≥ 1, got ${count}`);
  if (!(minRatio > 0 && minRatio <= 1)) throw new ParamError('minRatio', `expected a value in (0, 1], got ${minRatio}`);
  return Float64Array.from({ length: count }, (_, j) => (count === 1 ? lamMax : lamMax * minRatio ** (j / (count - 1))));
}
