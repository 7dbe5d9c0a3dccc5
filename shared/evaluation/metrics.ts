/**
 * Scores of a binary decoder's per-trial outputs (REFERENCES.md §5). Labels are class indices
 * 0/1; probabilities are P(class 1); all arrays are [trial].
 */
import { ParamError, ShapeError } from '../types';

function sameLength(a: ArrayLike<number>, b: ArrayLike<number>, field: string): void {
  if (a.length !== b.length) throw new ShapeError(field, `expected ${a.length} values (one per trial), got ${b.length}`);
}

/** Fraction of trials where prediction equals label (NaN for no trials). */
export function accuracy(labels: ArrayLike<number>, predictions: ArrayLike<number>): number {
  sameLength(labels, predictions, 'predictions');
  let c = 0;
  for (let i = 0; i < labels.length; i++) if (labels[i] === predictions[i]) c++;
  return labels.length > 0 ? c / labels.length : NaN;
}

/** Confusion counts: rows true class, columns predicted class, classes 0..classes-1. */
export function confusionMatrix(labels: ArrayLike<number>, predictions: ArrayLike<number>,
                                classes = 2): number[][] {
  sameLength(labels, predictions, 'predictions');
  const m = Array.from({ length: classes }, () => new Array<number>(classes).fill(0));
  for (let i = 0; i < labels.length; i++) {
    const t = labels[i]!, p = predictions[i]!;
    if (!(t >= 0 && t < classes && p >= 0 && p < classes)) {
      throw new ShapeError(`labels[${i}]`, `expected classes 0..${classes - 1}, got true ${t}, predicted ${p}`);
    }
    m[t]![p]!++;
  }
  return m;
}

/**
 * Cohen's kappa (Cohen 1960, Educ Psychol Meas 20(1):37-46): (p_o - p_e)/(1 - p_e) with
 * p_o = trace(C)/n and p_e = Σ_k row_k·col_k/n². NaN when p_e = 1 (one class only).
 * @param confusion rows true class, columns predicted
 */
export function cohenKappa(confusion: readonly (readonly number[])[]): number {
  const k = confusion.length;
  let n = 0, diag = 0;
  const rows = new Array<number>(k).fill(0), cols = new Array<number>(k).fill(0);
  confusion.forEach((row, i) => {
    if (row.length !== k) throw new ShapeError(`confusion[${i}]`, `expected ${k} columns, got ${row.length}`);
    row.forEach((v, j) => { n += v; rows[i]! += v; cols[j]! += v; if (i === j) diag += v; });
  });
  const po = diag / n;
  let pe = 0;
  for (let i = 0; i < k; i++) pe += rows[i]! * cols[i]!;
  pe /= n * n;
  return pe === 1 ? NaN : (po - pe) / (1 - pe);
}

/**
 * Area under the ROC curve as the Mann-Whitney U statistic (Hanley & McNeil 1982, Radiology
 * 143(1):29-36): U/(n1·n0) from mid-ranks of the scores, so tied scores count one half.
 * NaN when one class is absent.
 * @param scores higher means class 1 (probabilities or decision values)
 */
export function rocAuc(labels: ArrayLike<number>, scores: ArrayLike<number>): number {
  sameLength(labels, scores, 'scores');
  const n = labels.length;
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => scores[a]! - scores[b]!);
  let rankSum1 = 0, n1 = 0;
  for (let i = 0; i < n;) {
    let j = i;
    while (j + 1 < n && scores[order[j + 1]!] === scores[order[i]!]) j++;
    const midRank = (i + j) / 2 + 1; // ranks are 1-based
    for (let t = i; t <= j; t++) if (labels[order[t]!] === 1) { rankSum1 += midRank; n1++; }
    i = j + 1;
  }
  const n0 = n - n1;
  if (n1 === 0 || n0 === 0) return NaN;
  return (rankSum1 - (n1 * (n1 + 1)) / 2) / (n1 * n0);
}

/** Brier score (Brier 1950, Mon Weather Rev 78(1):1-3), binary form: mean (p_i - y_i)², in [0, 1]. */
export function brierScore(labels: ArrayLike<number>, probabilities: ArrayLike<number>): number {
  sameLength(labels, probabilities, 'probabilities');
  let s = 0;
  for (let i = 0; i < labels.length; i++) s += (probabilities[i]! - labels[i]!) ** 2;
  return s / labels.length;
}

/**
 * Mean negative log-likelihood in nats, probabilities clipped to [1e-15, 1 - 1e-15] (the usual
 * convention, e.g. scikit-learn's log_loss in 1.2).
 */
export function logLoss(labels: ArrayLike<number>, probabilities: ArrayLike<number>): number {
  sameLength(labels, probabilities, 'probabilities');
  let s = 0;
  for (let i = 0; i < labels.length; i++) {
    const p = Math.min(1 - 1e-15, Math.max(1e-15, probabilities[i]!));
    s -= labels[i] === 1 ? Math.log(p) : Math.log(1 - p);
  }
  return s / labels.length;
}

/** Points of a reliability diagram; only non-empty bins appear. */
export interface ReliabilityCurve {
  probPred: number[]; // mean predicted probability per bin (x)
  probTrue: number[]; // observed fraction of class 1 per bin (y)
  counts: number[]; // trials per bin
  binIndex: number[]; // which of the `bins` uniform bins
}

/**
 * Reliability diagram (Murphy & Winkler 1977, Appl Stat 26(1):41-47) on `bins` uniform bins of
 * [0, 1]. Edges are i/bins; a probability equal to an inner edge falls in the LOWER bin (the
 * binning of scikit-learn's calibration_curve, strategy 'uniform', in 1.2).
 */
export function reliabilityCurve(labels: ArrayLike<number>, probabilities: ArrayLike<number>,
                                 bins = 10): ReliabilityCurve {
  sameLength(labels, probabilities, 'probabilities');
  if (!Number.isInteger(bins) || bins < 1) throw new ParamError('bins', `expected an integer >= 1, got ${bins}`);
  const step = 1 / bins;
  const sumP = new Float64Array(bins), sumY = new Float64Array(bins), cnt = new Float64Array(bins);
  for (let i = 0; i < labels.length; i++) {
    const p = probabilities[i]!;
    let b = 0;
    while (b < bins - 1 && p > (b + 1) * step) b++;
    sumP[b]! += p; sumY[b]! += labels[i]!; cnt[b]!++;
  }
  const out: ReliabilityCurve = { probPred: [], probTrue: [], counts: [], binIndex: [] };
  for (let b = 0; b < bins; b++) {
    if (cnt[b] === 0) continue;
    out.probPred.push(sumP[b]! / cnt[b]!);
    out.probTrue.push(sumY[b]! / cnt[b]!);
    out.counts.push(cnt[b]!);
    out.binIndex.push(b);
  }
  return out;
}

/**
 * Wolpaw information transfer rate (Wolpaw et al. 2002, Clin Neurophysiol 113(6):767-791):
 * B = log2 N + P log2 P + (1-P) log2((1-P)/(N-1)) bits per trial, bits/min = 60 B / T.
 * Assumes equiprobable classes and evenly spread errors. Conventions: B = log2 N at P = 1,
 * B = 0 for P <= 1/N.
 * @param classes N, @param p accuracy P, @param secondsPerTrial T (s per selection)
 */
export function wolpawItr(classes: number, p: number, secondsPerTrial: number): {
  bitsPerTrial: number; bitsPerMin: number;
} {
  if (!Number.isInteger(classes) || classes < 2) throw new ParamError('classes', `expected an integer >= 2, got ${classes}`);
  if (!(p >= 0 && p <= 1)) throw new ParamError('p', `expected an accuracy in [0, 1], got ${p}`);
  if (!(secondsPerTrial > 0)) throw new ParamError('secondsPerTrial', `expected > 0, got ${secondsPerTrial}`);
  let bits: number;
  if (p <= 1 / classes) bits = 0;
  else if (p === 1) bits = Math.log2(classes);
  else bits = Math.log2(classes) + p * Math.log2(p) + (1 - p) * Math.log2((1 - p) / (classes - 1));
  return { bitsPerTrial: bits, bitsPerMin: (bits * 60) / secondsPerTrial };
}
