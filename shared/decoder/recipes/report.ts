/**
 * Figures of a training report from cross-validated predictions (REFERENCES.md §5):
 * accuracy, Wilson 95 % interval, binomial chance threshold, AUC, Cohen's kappa, Brier score and
 * Wolpaw ITR, pooled per repeat and averaged over repeats.
 *
 * With R repeats every trial is predicted R times (once per repeat), and those predictions are
 * not independent, so the interval uses the number of trials n: the Wilson interval of
 * x = (mean accuracy)·n correct out of n (x need not be an integer). The chance threshold is
 * the smallest significant accuracy for n trials (Combrisson & Jerbi 2015). AUC, kappa and
 * Brier are computed per repeat on its pooled predictions and averaged.
 */
import { brierScore, cohenKappa, confusionMatrix, rocAuc, wolpawItr } from '../../evaluation/metrics';
import { chanceThreshold, wilsonInterval } from '../../evaluation/stats';
import type { FoldResult } from '../../evaluation/cross-validate';

/** One repeat's outer folds (a full partition of the trials). */
export type RepeatFolds = readonly FoldResult[];

/** Cross-validated figures of one decoder or baseline. */
export interface CvSummary {
  accuracy: number;
  repeatAccuracies: number[];
  /** Every outer fold's accuracy, repeat by repeat. */
  foldAccuracies: number[];
  wilson95: [number, number];
  chanceThreshold95: number;
  auc: number;
  kappa: number;
  brier: number;
  itrBitsPerTrial: number;
  itrBitsPerMin: number;
  /** Pooled P(class 1) per trial of the first repeat (for reliability plots). */
  probabilities: number[];
}

/** Summarises repeats of outer folds (module comment). @param secondsPerTrial T of the ITR */
export function summariseCv(repeats: readonly RepeatFolds[], labels: Uint8Array, secondsPerTrial: number): CvSummary {
  const n = labels.length;
  const per = repeats.map((folds) => {
    const prob = new Float64Array(n).fill(NaN);
    for (const f of folds) f.test.forEach((i, j) => { prob[i] = f.probabilities[j]!; });
    const pred = Uint8Array.from(prob, (p) => (p > 0.5 ? 1 : 0));
    let correct = 0;
    for (let i = 0; i < n; i++) if (pred[i] === labels[i]) correct++;
    return {
      prob, accuracy: correct / n, auc: rocAuc(labels, prob), kappa: cohenKappa(confusionMatrix(labels, pred, 2)),
      brier: brierScore(labels, prob), folds: folds.map((f) => f.accuracy),
    };
  });
  const mean = (f: (r: (typeof per)[number]) => number) => per.reduce((a, r) => a + f(r), 0) / per.length;
  const accuracy = mean((r) => r.accuracy);
  const w = wilsonInterval(accuracy * n, n);
  const itr = wolpawItr(2, accuracy, secondsPerTrial);
  return {
    accuracy, repeatAccuracies: per.map((r) => r.accuracy), foldAccuracies: per.flatMap((r) => r.folds),
    wilson95: [w.lower, w.upper], chanceThreshold95: chanceThreshold(n).accuracyNeeded,
    auc: mean((r) => r.auc), kappa: mean((r) => r.kappa), brier: mean((r) => r.brier),
    itrBitsPerTrial: itr.bitsPerTrial, itrBitsPerMin: itr.bitsPerMin, probabilities: Array.from(per[0]?.prob ?? []),
  };
}

/**
 * Seconds per selection for the ITR: the mean interval between consecutive used cues within
 * each recording (the protocol's cue-to-cue period: cue, task, rest, next cue), or the epoch
 * length when no recording has two cues.
 */
export function cueToCueSeconds(onsetsPerRecording: readonly Float64Array[], epochLengthS: number): number {
  let sum = 0, count = 0;
  for (const onsets of onsetsPerRecording) {
    const s = Float64Array.from(onsets).sort();
    for (let i = 1; i < s.length; i++) { sum += s[i]! - s[i - 1]!; count++; }
  }
  return count > 0 ? sum / count : epochLengthS;
}
