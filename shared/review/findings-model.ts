/**
 * Findings of the gap review about the decoder and the participant over time: non-stationarity
 * (accuracy over the session, drift of the decision values, class bias) and over-fitting (spread
 * of the offline fold accuracies, calibration-set size). Thresholds marked "rule of thumb" are
 * this review's own choices, not published cut-offs.
 */
import type { GapReview, ReviewFigure, ReviewFinding } from '../api/review';
import { mcnemar, normalSf, wilsonInterval } from '../evaluation/stats';
import { pctText, plural, pointsRangeText, pointsText, pText } from './format';
import { meanSd, newcombeDifference } from './intervals';
import { isClean, type ReviewInput, type ReviewTrial } from './types';

/** Rule of thumb: calibration sets below this many trials give wide, fold-dependent estimates. */
export const SMALL_CALIBRATION_TRIALS = 100;
/** Rule of thumb: a standard deviation of fold accuracies from which the estimate depends much on the split. */
export const WIDE_FOLD_SD = 0.1;
/** Number of blocks the session's clean trials are cut into for the accuracy-over-time figures. */
export const DRIFT_BLOCKS = 4;
/** Probabilities are clipped to [ε, 1-ε] before taking log-odds. */
const LOGIT_EPS = 1e-6;

/** Natural log-odds of class 1 against class 0 of a binary decoder's probabilities. */
export function logOdds(probabilities: readonly number[]): number {
  const clip = (p: number) => Math.min(1 - LOGIT_EPS, Math.max(LOGIT_EPS, p));
  return Math.log(clip(probabilities[1] ?? NaN) / clip(probabilities[0] ?? NaN));
}

/**
 * Change of the mean of two independent samples, b - a, with Welch's standard error
 * sqrt(s_a²/n_a + s_b²/n_b) and a two-sided normal-approximation p (Welch 1947, Biometrika
 * 34:28-35); null when either sample has fewer than two values.
 */
export function meanShift(a: readonly number[], b: readonly number[]): { first: number; second: number; shift: number; p: number } | null {
  const x = meanSd(a), y = meanSd(b);
  if (x.n < 2 || y.n < 2) return null;
  const se = Math.sqrt(x.sd ** 2 / x.n + y.sd ** 2 / y.n);
  const shift = y.mean - x.mean;
  const p = se > 0 ? Math.min(1, 2 * normalSf(Math.abs(shift) / se)) : (shift === 0 ? 1 : 0);
  return { first: x.mean, second: y.mean, shift, p };
}

const correctOf = (ts: readonly ReviewTrial[]) => ts.filter((t) => t.predictedClass === t.trueClass).length;

/** (e) Non-stationarity: accuracy by halves and blocks, drift of mean log-odds per true class, class bias. */
export function driftFinding(input: ReviewInput): ReviewFinding {
  const clean = input.trials.filter(isClean);
  const title = 'Change over the session';
  const n = clean.length;
  if (n < 4) {
    return { key: 'drift', title, verdict: 'possible', figures: [{ label: 'Clean trials', value: n, unit: 'count' }],
      text: `Only ${plural(n, 'clean trial')}: too few to compare the start of the session with its end.` };
  }
  const half = Math.floor(n / 2);
  const first = clean.slice(0, half), second = clean.slice(half);
  const c1 = correctOf(first), c2 = correctOf(second);
  const d = newcombeDifference(c2, second.length, c1, first.length);
  const figures: ReviewFigure[] = [
    { label: 'Accuracy, first half', value: c1 / first.length, unit: 'fraction', interval: wilsonPair(c1, first.length) },
    { label: 'Accuracy, second half', value: c2 / second.length, unit: 'fraction', interval: wilsonPair(c2, second.length) },
    { label: 'Second minus first half', value: d.difference, unit: 'difference', interval: [d.lower, d.upper] },
  ];
  if (n >= 2 * DRIFT_BLOCKS) {
    for (let b = 0; b < DRIFT_BLOCKS; b++) {
      const blk = clean.slice(Math.round((b * n) / DRIFT_BLOCKS), Math.round(((b + 1) * n) / DRIFT_BLOCKS));
      const c = correctOf(blk);
      figures.push({ label: `Accuracy, block ${b + 1} of ${DRIFT_BLOCKS} (${blk.length} trials)`, value: c / blk.length, unit: 'fraction',
        interval: wilsonPair(c, blk.length) });
    }
  }
  const sentences = [`Over ${plural(n, 'clean trial')}, accuracy went from ${pctText(c1 / first.length)} in the first half to `
    + `${pctText(c2 / second.length)} in the second (${pointsText(d.difference)}, 95 % ${pointsRangeText([d.lower, d.upper])}).`];
  const halvesDiffer = d.lower > 0 || d.upper < 0;
  let driftSignificant = 0, sameDirection = false;
  let biasP = 1;
  if (input.classes.length === 2) {
    const shifts = [0, 1].map((k) => meanShift(first.filter((t) => t.trueClass === k).map((t) => logOdds(t.probabilities)),
      second.filter((t) => t.trueClass === k).map((t) => logOdds(t.probabilities))));
    const parts: string[] = [];
    shifts.forEach((s, k) => {
      const name = input.classes[k]!;
      if (!s) { parts.push(`too few ${name} trials in a half to compare`); return; }
      figures.push({ label: `Mean log-odds (${input.classes[1]} vs ${input.classes[0]}), true ${name}, first half`, value: s.first, unit: 'logit' });
      figures.push({ label: `Mean log-odds, true ${name}, second half`, value: s.second, unit: 'logit' });
      figures.push({ label: `Drift p, true ${name}`, value: s.p, unit: 'p' });
      if (s.p < 0.05) driftSignificant++;
      parts.push(`for true ${name} trials the mean log-odds moved from ${s.first.toFixed(2)} to ${s.second.toFixed(2)} (${pText(s.p)})`);
    });
    sameDirection = shifts.every((s) => s !== null && s.p < 0.05) && Math.sign(shifts[0]!.shift) === Math.sign(shifts[1]!.shift);
    sentences.push(`Decision values: ${parts.join('; ')}.${sameDirection ? ' Both classes moved the same way, the pattern of a shift of '
      + 'the whole signal rather than of the class difference.' : ''}`);
    // Class bias: errors one way (true 0 -> predicted 1) against the other; McNemar's test of
    // marginal homogeneity asks whether the predicted share differs from the true share.
    const b = clean.filter((t) => t.trueClass === 0 && t.predictedClass === 1).length;
    const c = clean.filter((t) => t.trueClass === 1 && t.predictedClass === 0).length;
    biasP = mcnemar(b, c).exactP;
    const truePer = [0, 1].map((k) => clean.filter((t) => t.trueClass === k).length / n);
    const predPer = [0, 1].map((k) => clean.filter((t) => t.predictedClass === k).length / n);
    input.classes.forEach((name, k) => {
      figures.push({ label: `Predicted as ${name}`, value: predPer[k]!, unit: 'fraction' });
      figures.push({ label: `Truly ${name}`, value: truePer[k]!, unit: 'fraction' });
    });
    figures.push({ label: 'Class bias p (McNemar, exact)', value: biasP, unit: 'p' });
    sentences.push(`${pctText(predPer[1]!)} of clean trials were predicted as ${input.classes[1]} against ${pctText(truePer[1]!)} truly `
      + `${input.classes[1]}; errors went ${b} one way and ${c} the other (${pText(biasP)}).`);
  }
  const verdict = halvesDiffer || sameDirection ? 'likely' : driftSignificant > 0 || biasP < 0.05 ? 'possible' : 'unlikely';
  sentences.push(verdict === 'unlikely'
    ? 'None of these changes is beyond what chance gives at the 5 % level; that does not rule out a slow change these trials cannot resolve.'
    : 'Several comparisons are made here, so a single p just below 0.05 is weak evidence; a change within the session means the '
      + 'calibration data no longer describe the participant\'s signals well.');
  return { key: 'drift', title, verdict, figures, text: sentences.join(' ') };
}

function wilsonPair(correct: number, n: number): [number, number] {
  const w = wilsonInterval(correct, n);
  return [w.lower, w.upper];
}

/** (f) Over-fitting: how stable the offline estimate was across folds and how many trials it rests on. */
export function overfittingFinding(input: ReviewInput, core: Pick<GapReview, 'online' | 'offline'>): ReviewFinding {
  const title = 'Over-fitting and calibration size';
  const off = input.offline;
  if (!off || !core.offline) {
    return { key: 'overfitting', title, verdict: 'possible', figures: [],
      text: 'The decoder came without a cross-validated estimate, so how well it generalises was never measured.' };
  }
  const folds = meanSd([...off.foldAccuracies]);
  const figures: ReviewFigure[] = [
    { label: 'Calibration trials', value: off.trials, unit: 'count' },
    { label: 'Outer folds', value: folds.n, unit: 'count' },
    { label: 'Fold accuracy, mean', value: Number.isFinite(folds.mean) ? folds.mean : null, unit: 'fraction' },
    { label: 'Fold accuracy, SD', value: Number.isFinite(folds.sd) ? folds.sd : null, unit: 'fraction' },
    { label: 'Fold accuracy, lowest', value: folds.n > 0 ? Math.min(...off.foldAccuracies) : null, unit: 'fraction' },
    { label: 'Fold accuracy, highest', value: folds.n > 0 ? Math.max(...off.foldAccuracies) : null, unit: 'fraction' },
  ];
  const small = off.trials < SMALL_CALIBRATION_TRIALS;
  const wide = Number.isFinite(folds.sd) && folds.sd >= WIDE_FOLD_SD;
  const w = core.offline.wilson95;
  const spread = folds.n > 1
    ? `Across ${folds.n} outer folds the accuracy ranged from ${pctText(Math.min(...off.foldAccuracies))} to `
      + `${pctText(Math.max(...off.foldAccuracies))} (SD ${pctText(folds.sd)}). `
    : 'The report holds no per-fold accuracies. ';
  return { key: 'overfitting', title, verdict: small || wide ? 'possible' : 'unlikely', figures,
    text: `The offline estimate rests on ${plural(off.trials, 'calibration trial')} (95 % ${pctText(w[0])} to ${pctText(w[1])}). ${spread}`
      + 'Nested cross-validation keeps the choice of λ out of the estimate (Varma & Simon 2006), so the figure is not inflated by tuning; '
      + `${small || wide ? 'but a small calibration set or a wide fold spread means the estimate depends on which trials were held out, '
        + 'and a model fitted to few trials can fit their particulars.' : 'the estimate looks stable across folds.'} `
      + 'It describes new trials from the calibration session; it does not cover a change between that session and this one.' };
}
