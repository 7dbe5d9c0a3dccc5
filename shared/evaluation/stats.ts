/**
 * Distributions and significance tests for decoding results (REFERENCES.md §5).
 *
 * jstat is used where it was verified exact enough against SciPy 1.10
 * (tests/fixtures/evaluation/stats.json): its normal CDF (|error| ~1e-16 absolute for |x| < 3)
 * and its normal quantile as a starting point. Not used, with reasons: jstat's binomial CDF
 * rounds its result to 1e-10, so exact binomial probabilities are summed here instead; its
 * upper normal tail is 1 - CDF, which loses all relative accuracy beyond ~8 sigma, so the tail
 * uses the Laplace continued fraction for Mills' ratio.
 */
// @ts-ignore -- jstat ships no type declarations; the subset used here is typed just below.
import jStatModule from 'jstat';
import { ParamError } from '../types';

interface JStatSubset {
  normal: { cdf(x: number, mean: number, sd: number): number; inv(p: number, mean: number, sd: number): number };
}
const jStat = jStatModule as unknown as JStatSubset;

const INV_SQRT_2PI = 0.3989422804014327;

/** Standard normal density φ(x). */
export function normalPdf(x: number): number {
  return INV_SQRT_2PI * Math.exp(-0.5 * x * x);
}

/**
 * Upper tail Q(x) = P(Z > x) of the standard normal. For x >= 3: φ(x) times Laplace's continued
 * fraction for Mills' ratio, 1/(x + 1/(x + 2/(x + 3/(x + ...)))) (Abramowitz & Stegun 1964,
 * 26.2.14), 100 terms, relative accuracy ~1e-15; otherwise 1 - jstat's CDF.
 */
export function normalSf(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x >= 3) {
    if (x === Infinity) return 0;
    let f = x;
    for (let k = 100; k >= 1; k--) f = x + k / f;
    return normalPdf(x) / f;
  }
  if (x <= -3) return 1 - normalSf(-x);
  return 1 - jStat.normal.cdf(x, 0, 1);
}

/** Standard normal CDF Φ(x), accurate in the lower tail as well (Φ(x) = Q(-x)). */
export function normalCdf(x: number): number {
  if (x <= -3) return normalSf(-x);
  if (x >= 3) return 1 - normalSf(x);
  return jStat.normal.cdf(x, 0, 1);
}

/**
 * Standard normal quantile Φ⁻¹(p): jstat's estimate polished by up to three Newton steps on the
 * accurate CDF/tail above (working on whichever tail is smaller).
 */
export function normalPpf(p: number): number {
  if (!(p >= 0 && p <= 1)) throw new ParamError('p', `expected a probability in [0, 1], got ${p}`);
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  let x = jStat.normal.inv(p, 0, 1);
  for (let it = 0; it < 3; it++) {
    const step = (p < 0.5 ? normalCdf(x) - p : (1 - p) - normalSf(x)) / normalPdf(x);
    x -= step;
    if (Math.abs(step) <= 1e-15 * Math.abs(x)) break;
  }
  return x;
}

/**
 * Binomial probability mass for k = 0..n, Bin(n, p). Ratios of successive terms are taken from
 * the mode outwards and normalised, so no factorials or gamma functions are needed; each term
 * has relative accuracy ~n·1e-16 (terms below ~1e-300 of the mode underflow to 0).
 */
export function binomialPmf(n: number, p: number): Float64Array {
  if (!Number.isInteger(n) || n < 0) throw new ParamError('n', `expected an integer >= 0, got ${n}`);
  if (!(p >= 0 && p <= 1)) throw new ParamError('p', `expected a probability in [0, 1], got ${p}`);
  const w = new Float64Array(n + 1);
  if (p === 0 || p === 1) { w[p === 0 ? 0 : n] = 1; return w; }
  const mode = Math.min(n, Math.floor((n + 1) * p));
  const odds = p / (1 - p);
  w[mode] = 1;
  for (let k = mode + 1; k <= n; k++) w[k] = w[k - 1]! * ((n - k + 1) / k) * odds;
  for (let k = mode - 1; k >= 0; k--) w[k] = w[k + 1]! * ((k + 1) / (n - k)) / odds;
  let s = 0;
  for (let k = 0; k <= n; k++) s += w[k]!;
  for (let k = 0; k <= n; k++) w[k]! /= s;
  return w;
}

/** P(X <= k) for X ~ Bin(n, p), summed from the small end (accurate in the lower tail). */
export function binomialCdf(k: number, n: number, p: number): number {
  if (k < 0) return 0;
  if (k >= n) return 1;
  const w = binomialPmf(n, p);
  let s = 0;
  for (let j = 0; j <= Math.floor(k); j++) s += w[j]!;
  return Math.min(1, s);
}

/** P(X > k) for X ~ Bin(n, p), summed from n downwards (accurate in the upper tail). */
export function binomialSf(k: number, n: number, p: number): number {
  if (k < 0) return 1;
  if (k >= n) return 0;
  const w = binomialPmf(n, p);
  let s = 0;
  for (let j = n; j > Math.floor(k); j--) s += w[j]!;
  return Math.min(1, s);
}

/** Result of `chanceThreshold`. */
export interface ChanceThreshold {
  /** binoinv(1-α, n, 1/c): smallest k with P(X <= k) >= 1-α. */
  k0: number;
  /** Combrisson & Jerbi's St(α) = k0/n, as a fraction. */
  thresholdAccuracy: number;
  /** k0 + 1: the fewest correct trials that are significant at level α. */
  minCorrect: number;
  /** minCorrect / n (above 1 when no result can reach significance). */
  accuracyNeeded: number;
  /** Exact one-sided p of minCorrect: P(X >= k0+1) <= α. */
  exactP: number;
}

/**
 * Binomial chance threshold for a finite number of trials (Combrisson & Jerbi 2015, J Neurosci
 * Methods 250:126-136): under chance, correct ~ Bin(n, 1/classes); a result is significant at
 * level α when correct > k0. Assumes independent trials; pooled cross-validated accuracy is only
 * approximately binomial.
 * @param n number of trials, @param classes number of equiprobable classes, @param alpha one-sided level
 */
export function chanceThreshold(n: number, classes = 2, alpha = 0.05): ChanceThreshold {
  if (!Number.isInteger(n) || n < 1) throw new ParamError('n', `expected an integer >= 1, got ${n}`);
  if (!Number.isInteger(classes) || classes < 2) throw new ParamError('classes', `expected an integer >= 2, got ${classes}`);
  if (!(alpha > 0 && alpha < 1)) throw new ParamError('alpha', `expected 0 < alpha < 1, got ${alpha}`);
  const w = binomialPmf(n, 1 / classes);
  // sf[k] = P(X > k), summed from the top; k0 is the first k with P(X > k) <= α.
  const sf = new Float64Array(n + 1);
  for (let k = n - 1; k >= 0; k--) sf[k] = sf[k + 1]! + w[k + 1]!;
  let k0 = 0;
  while (k0 < n && sf[k0]! > alpha) k0++;
  return { k0, thresholdAccuracy: k0 / n, minCorrect: k0 + 1, accuracyNeeded: (k0 + 1) / n, exactP: sf[k0]! };
}

/**
 * Wilson score interval for a proportion (Wilson 1927, JASA 22:209-212; Newcombe 1998, Stat Med
 * 17:857-872, method 3): centre (p̂ + z²/2n)/(1 + z²/n), half-width
 * z/(1 + z²/n)·sqrt(p̂(1-p̂)/n + z²/4n²), z = Φ⁻¹(1 - (1-level)/2). Clamped to [0, 1].
 */
export function wilsonInterval(correct: number, n: number, level = 0.95): { lower: number; upper: number } {
  if (!(n > 0)) throw new ParamError('n', `expected n > 0, got ${n}`);
  if (!(correct >= 0 && correct <= n)) throw new ParamError('correct', `expected 0..${n}, got ${correct}`);
  if (!(level > 0 && level < 1)) throw new ParamError('level', `expected 0 < level < 1, got ${level}`);
  const z = normalPpf(1 - (1 - level) / 2);
  const p = correct / n, z2 = z * z;
  const centre = (p + z2 / (2 * n)) / (1 + z2 / n);
  const half = (z / (1 + z2 / n)) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  return { lower: Math.max(0, centre - half), upper: Math.min(1, centre + half) };
}

/** Upper tail of χ² with 1 degree of freedom: P(χ²₁ > x) = 2·Q(√x). */
export function chi2Sf1(x: number): number {
  return x <= 0 ? 1 : 2 * normalSf(Math.sqrt(x));
}

/**
 * McNemar's test for paired accuracies (McNemar 1947, Psychometrika 12(2):153-157): b = trials
 * only decoder A got right, c = only decoder B. χ² = (b-c)²/(b+c); the continuity-corrected
 * form (Edwards 1948) uses max(0, |b-c|-1)²; exact p = min(1, 2·P(Bin(b+c, ½) <= min(b, c))).
 * With b + c = 0 there is no evidence: statistics 0, p values 1.
 */
export function mcnemar(b: number, c: number): {
  chi2: number; p: number; chi2Corrected: number; pCorrected: number; exactP: number;
} {
  for (const [name, v] of [['b', b], ['c', c]] as const) {
    if (!Number.isInteger(v) || v < 0) throw new ParamError(name, `expected a count >= 0, got ${v}`);
  }
  const m = b + c;
  if (m === 0) return { chi2: 0, p: 1, chi2Corrected: 0, pCorrected: 1, exactP: 1 };
  const chi2 = (b - c) ** 2 / m;
  const chi2Corrected = Math.max(0, Math.abs(b - c) - 1) ** 2 / m;
  return { chi2, p: chi2Sf1(chi2), chi2Corrected, pCorrected: chi2Sf1(chi2Corrected),
           exactP: Math.min(1, 2 * binomialCdf(Math.min(b, c), m, 0.5)) };
}

/**
 * Pooled two-proportion z test for accuracies on DIFFERENT trials (e.g. Fleiss, Levin & Paik
 * 2003, Statistical Methods for Rates and Proportions): z = (p1-p2)/sqrt(p̄(1-p̄)(1/n1+1/n2)),
 * two-sided p = 2·Q(|z|). For paired trials use `mcnemar`. When p̄ is 0 or 1: z = 0, p = 1.
 */
export function twoProportionZ(x1: number, n1: number, x2: number, n2: number): { z: number; p: number } {
  if (!(n1 > 0 && n2 > 0)) throw new ParamError('n', `expected n1, n2 > 0, got ${n1}, ${n2}`);
  const pbar = (x1 + x2) / (n1 + n2);
  const se = Math.sqrt(pbar * (1 - pbar) * (1 / n1 + 1 / n2));
  if (se === 0) return { z: 0, p: 1 };
  const z = (x1 / n1 - x2 / n2) / se;
  return { z, p: Math.min(1, 2 * normalSf(Math.abs(z))) };
}
