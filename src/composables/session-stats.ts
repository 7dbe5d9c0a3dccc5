/**
 * Figures the console derives from the trial list. The statistics themselves come from
 * shared/evaluation (Wilson 1927 interval, Combrisson & Jerbi 2015 chance threshold); this file
 * only accumulates trials and arranges the results for the charts.
 */
import { chanceThreshold, wilsonInterval } from '@shared/evaluation/stats';
import type { Trial } from '@shared/api/sessions';

/** A trial counts toward accuracy when its true class is known and it is not excluded (flagged or marked bad). */
export function isScored(t: Trial): boolean {
  return !t.excluded && t.correct !== null;
}

export interface AccuracyPoint {
  /** Scored trials so far. */
  n: number;
  correct: number;
  accuracy: number;
  /** Wilson 95 % interval. */
  lower: number;
  upper: number;
  /** Accuracy needed for p < 0.05 against chance with n trials: (k0 + 1) / n. */
  needed: number;
  /** Fewest correct trials that are significant at 0.05. */
  minCorrect: number;
}

/** Accuracy after `correct` of `n` scored trials, with its Wilson 95 % band and chance threshold. */
export function accuracyPoint(correct: number, n: number, classes: number): AccuracyPoint {
  const w = wilsonInterval(correct, n, 0.95);
  const c = chanceThreshold(n, classes, 0.05);
  return { n, correct, accuracy: correct / n, lower: w.lower, upper: w.upper, needed: c.accuracyNeeded, minCorrect: c.minCorrect };
}

/** Running accuracy after each scored trial, in trial order (for the chart). */
export interface RunningAccuracy {
  n: Float64Array; // [point] 1..N
  accuracy: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
  needed: Float64Array;
  /** The newest point, or null before the first scored trial. */
  last: AccuracyPoint | null;
}

export function runningAccuracy(trials: readonly Trial[], classes: number): RunningAccuracy {
  const scored = trials.filter(isScored);
  const N = scored.length;
  const out: RunningAccuracy = {
    n: new Float64Array(N), accuracy: new Float64Array(N), lower: new Float64Array(N),
    upper: new Float64Array(N), needed: new Float64Array(N), last: null,
  };
  let correct = 0;
  for (let i = 0; i < N; i++) {
    if (scored[i]!.correct) correct++;
    const p = accuracyPoint(correct, i + 1, classes);
    out.n[i] = p.n;
    out.accuracy[i] = p.accuracy;
    out.lower[i] = p.lower;
    out.upper[i] = p.upper;
    out.needed[i] = p.needed;
    out.last = p;
  }
  return out;
}

/**
 * The q-th quantile (0..1) of `values` by linear interpolation between order statistics
 * (Hyndman & Fan 1996, Am Stat 50(4):361-365, definition 7; NumPy's default). NaN when empty.
 */
export function quantile(values: ArrayLike<number>, q: number): number {
  const n = values.length;
  if (n === 0) return NaN;
  const sorted = Float64Array.from(values).sort();
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}

export interface LatencyHistogram {
  /** Left bin edges, ms. */
  edgesMs: Float64Array;
  counts: Float64Array;
  binMs: number;
  p50: number;
  p99: number;
  max: number;
  n: number;
}

/**
 * Histogram of total prediction latency (ms after the epoch's last sample arrived) with p50 and
 * p99. Bin width is a 1-2-5 step chosen for about `bins` bins up to the maximum.
 */
export function latencyHistogram(trials: readonly Trial[], bins = 24): LatencyHistogram {
  const ms = trials.map((t) => t.latency.totalMs).filter((v) => Number.isFinite(v) && v >= 0);
  const max = ms.length ? Math.max(...ms) : 0;
  const raw = Math.max(max, 1) / bins;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const binMs = [1, 2, 5, 10].map((m) => m * mag).find((w) => w >= raw) ?? 10 * mag;
  const count = Math.max(1, Math.floor(max / binMs) + 1);
  const edgesMs = new Float64Array(count);
  const counts = new Float64Array(count);
  for (let i = 0; i < count; i++) edgesMs[i] = i * binMs;
  for (const v of ms) counts[Math.min(count - 1, Math.floor(v / binMs))]!++;
  return { edgesMs, counts, binMs, p50: quantile(ms, 0.5), p99: quantile(ms, 0.99), max, n: ms.length };
}

/** Colour class of a trial in charts and the table. */
export type TrialOutcome = 'correct' | 'incorrect' | 'flagged' | 'unscored';

export function trialOutcome(t: Trial): TrialOutcome {
  if (t.excluded) return 'flagged';
  if (t.correct === null) return 'unscored';
  return t.correct ? 'correct' : 'incorrect';
}
