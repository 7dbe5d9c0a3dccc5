/**
 * Interval and summary helpers of the gap review, on top of shared/evaluation/stats.ts.
 */
import { ParamError } from '../types';
import { wilsonInterval } from '../evaluation/stats';

/** Result of `newcombeDifference`: p1 - p2 and its interval. */
export interface DifferenceInterval {
  difference: number;
  lower: number;
  upper: number;
}

/**
 * Interval for the difference p1 - p2 of two independent proportions by Newcombe's hybrid score
 * method (Newcombe 1998, "Interval estimation for the difference between independent
 * proportions: comparison of eleven methods", Stat Med 17:873-890, method 10): with (l_i, u_i)
 * the Wilson score limits of each proportion (Wilson 1927),
 *   lower = d - sqrt((p1 - l1)² + (u2 - p2)²),  upper = d + sqrt((u1 - p1)² + (p2 - l2)²).
 * Counts may be fractional (a cross-validated accuracy averaged over repeats times its trials).
 * @param x1 successes of sample 1 (0..n1), @param n1 its size (> 0); likewise x2, n2
 * @param level two-sided confidence level, 0.95 by default
 */
export function newcombeDifference(x1: number, n1: number, x2: number, n2: number, level = 0.95): DifferenceInterval {
  if (!(n1 > 0 && n2 > 0)) throw new ParamError('n', `expected n1, n2 > 0, got ${n1}, ${n2}`);
  const p1 = x1 / n1, p2 = x2 / n2;
  const w1 = wilsonInterval(x1, n1, level), w2 = wilsonInterval(x2, n2, level);
  const d = p1 - p2;
  return {
    difference: d,
    lower: d - Math.sqrt((p1 - w1.lower) ** 2 + (w2.upper - p2) ** 2),
    upper: d + Math.sqrt((w1.upper - p1) ** 2 + (p2 - w2.lower) ** 2),
  };
}

/**
 * Sample quantile by linear interpolation between order statistics (Hyndman & Fan 1996,
 * Am Stat 50(4):361-365, definition 7; NumPy's default): h = (n-1)q, x[⌊h⌋] + (h-⌊h⌋)(x[⌊h⌋+1]-x[⌊h⌋]).
 * NaN for no values. @param q in [0, 1]
 */
export function quantile(values: ArrayLike<number>, q: number): number {
  if (!(q >= 0 && q <= 1)) throw new ParamError('q', `expected 0 <= q <= 1, got ${q}`);
  const s = Float64Array.from(values).sort();
  if (s.length === 0) return NaN;
  const h = (s.length - 1) * q, lo = Math.floor(h);
  const hi = Math.min(lo + 1, s.length - 1);
  return s[lo]! + (h - lo) * (s[hi]! - s[lo]!);
}

/** Mean and sample standard deviation (n - 1 denominator; NaN below two values). */
export function meanSd(values: readonly number[]): { mean: number; sd: number; n: number } {
  const n = values.length;
  const mean = n > 0 ? values.reduce((a, v) => a + v, 0) / n : NaN;
  const sd = n > 1 ? Math.sqrt(values.reduce((a, v) => a + (v - mean) ** 2, 0) / (n - 1)) : NaN;
  return { mean, sd, n };
}
