/**
 * The numbers a decoding report shows, from pooled per-trial outputs (REFERENCES.md §5):
 * accuracy with its Wilson 95 % interval, the binomial chance threshold for the trial count,
 * AUC, Cohen's kappa, Brier score, log-loss, confusion matrix, Wolpaw ITR, and a per-fold table.
 */
import { ShapeError } from '../types';
import type { FoldResult } from './cross-validate';
import { brierScore, cohenKappa, confusionMatrix, logLoss, rocAuc, wolpawItr } from './metrics';
import { chanceThreshold, wilsonInterval, type ChanceThreshold } from './stats';

export interface DecodingSummary {
  trials: number;
  correct: number;
  accuracy: number;
  wilson95: [number, number];
  /** Combrisson & Jerbi 2015 threshold at α = 0.05 for this many trials. */
  chanceThreshold95: ChanceThreshold;
  /** True when correct >= chanceThreshold95.minCorrect (one-sided binomial p < 0.05). */
  aboveChance: boolean;
  auc: number;
  kappa: number;
  brier: number;
  logLoss: number;
  confusion: number[][]; // rows true class, columns predicted
  /** Wolpaw ITR at the observed accuracy; null without secondsPerTrial. */
  itr: { bitsPerTrial: number; bitsPerMin: number } | null;
}

/**
 * Summary of binary decoding results.
 * @param labels true class 0/1 per trial
 * @param probabilities P(class 1) per trial (prediction = 1 when > 0.5)
 * @param secondsPerTrial time per selection for the ITR (e.g. cue-to-cue interval), s
 */
export function summarizeDecoding(labels: ArrayLike<number>, probabilities: ArrayLike<number>,
                                  secondsPerTrial?: number): DecodingSummary {
  if (labels.length !== probabilities.length) {
    throw new ShapeError('probabilities', `expected ${labels.length} values, got ${probabilities.length}`);
  }
  if (labels.length === 0) throw new ShapeError('labels', 'expected at least one trial, got none');
  const predictions = Array.from(probabilities, (p) => (p > 0.5 ? 1 : 0));
  const confusion = confusionMatrix(labels, predictions, 2);
  const correct = confusion[0]![0]! + confusion[1]![1]!;
  const n = labels.length;
  const w = wilsonInterval(correct, n);
  const threshold = chanceThreshold(n, 2, 0.05);
  return {
    trials: n, correct, accuracy: correct / n, wilson95: [w.lower, w.upper],
    chanceThreshold95: threshold, aboveChance: correct >= threshold.minCorrect,
    auc: rocAuc(labels, probabilities), kappa: cohenKappa(confusion),
    brier: brierScore(labels, probabilities), logLoss: logLoss(labels, probabilities), confusion,
    itr: secondsPerTrial === undefined ? null : wolpawItr(2, correct / n, secondsPerTrial),
  };
}

/** One row of a per-fold table. */
export interface FoldRow {
  fold: number;
  trials: number;
  correct: number;
  accuracy: number;
  auc: number; // NaN when the fold's test set holds one class only
  seconds: number;
}

/** Per-fold table from fold results (labels indexed like the full data set). */
export function foldTable(results: readonly FoldResult[], labels: Uint8Array): FoldRow[] {
  return results.map((r) => ({
    fold: r.fold, trials: r.test.length, correct: r.correct, accuracy: r.accuracy,
    auc: rocAuc(Array.from(r.test, (i) => labels[i]!), r.probabilities), seconds: r.seconds,
  }));
}
