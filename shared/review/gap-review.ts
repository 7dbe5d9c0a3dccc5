/**
 * The gap review's statistics: online accuracy on clean trials against the decoder's nested
 * cross-validated estimate, their difference, and one finding per possible reason for the gap
 * (chance, excluded trials, dropped samples, latency, non-stationarity, over-fitting, and the live
 * path against an offline re-run when one was made). Pure: the
 * server gathers the stored rows (server/services/review.ts) and calls `computeGapReview`.
 */
import type { AccuracyEstimate, GapReview } from '../api/review';
import { chanceThreshold, wilsonInterval } from '../evaluation/stats';
import { chanceFinding, excludedFinding, gapsFinding, latencyFinding } from './findings-data';
import { driftFinding, overfittingFinding } from './findings-model';
import { replayFinding } from './findings-replay';
import { newcombeDifference } from './intervals';
import { isClean, type ReviewInput } from './types';

export type { ReviewInput, ReviewTrial, OfflineInput } from './types';
export type { ReplayInput, ReplayTrial } from './findings-replay';

/** The computed part of a GapReview (the server adds the session's names and times). */
export type GapReviewCore = Pick<GapReview, 'online' | 'onlineChance' | 'offline' | 'difference' | 'findings'>;

/** Accuracy with its Wilson 95 % interval (Wilson 1927, JASA 22:209-212). @param correct may be fractional */
export function accuracyEstimate(correct: number, trials: number): AccuracyEstimate {
  const w = wilsonInterval(correct, trials);
  return { correct, trials, accuracy: correct / trials, wilson95: [w.lower, w.upper] };
}

/**
 * Online against offline, and the findings.
 * - online: clean trials only (no flag, not marked bad, true class known), Wilson 95 %;
 * - onlineChance: binomial chance threshold for that many trials at α = 0.05 (Combrisson &
 *   Jerbi 2015, J Neurosci Methods 250:126-136), classes equiprobable;
 * - offline: the report's nested-CV accuracy over its calibration trials, Wilson 95 % (pooled
 *   cross-validated accuracy is only approximately binomial);
 * - difference: online - offline with Newcombe's hybrid score interval (Newcombe 1998, Stat Med
 *   17:873-890, method 10), treating the two as independent samples of trials.
 */
export function computeGapReview(input: ReviewInput): GapReviewCore {
  const clean = input.trials.filter(isClean);
  const correct = clean.filter((t) => t.predictedClass === t.trueClass).length;
  const online = clean.length > 0 ? accuracyEstimate(correct, clean.length) : null;
  const classes = Math.max(2, input.classes.length);
  const ct = clean.length > 0 ? chanceThreshold(clean.length, classes, 0.05) : null;
  const onlineChance = ct ? { minCorrect: ct.minCorrect, accuracyNeeded: ct.accuracyNeeded, aboveChance: correct >= ct.minCorrect } : null;
  const off = input.offline;
  const offline = off && off.trials > 0 && off.accuracy >= 0 && off.accuracy <= 1 ? accuracyEstimate(off.accuracy * off.trials, off.trials) : null;
  const diff = online && offline ? newcombeDifference(online.correct, online.trials, offline.correct, offline.trials) : null;
  const difference = diff ? { value: diff.difference, newcombe95: [diff.lower, diff.upper] as [number, number] } : null;
  const core = { online, onlineChance, offline, difference };
  return {
    ...core,
    findings: [
      chanceFinding(core, classes),
      excludedFinding(input, online),
      gapsFinding(input),
      latencyFinding(input),
      driftFinding(input),
      overfittingFinding(input, core),
      ...(input.replay !== undefined ? [replayFinding(input.replay)] : []),
    ],
  };
}
