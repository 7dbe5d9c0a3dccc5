/**
 * Input of the gap review's pure computation (shared/review/gap-review.ts): a stopped session's
 * trials and totals, and its decoder's cross-validated figures, as plain values.
 */
import type { TrialFlag } from '../api/sessions';
import type { ReplayInput } from './findings-replay';

/** One stored trial, classes as indices into `ReviewInput.classes`. */
export interface ReviewTrial {
  /** Cue onset, seconds from the session's start. */
  onsetS: number;
  /** null when the feed did not name one of the decoder's classes. */
  trueClass: number | null;
  predictedClass: number;
  /** One per class, in the decoder's class order. */
  probabilities: readonly number[];
  flags: readonly TrialFlag[];
  markedBad: boolean;
  /** Stored total latency (chunk arrival to broadcast), ms. */
  totalLatencyMs: number;
}

/** The decoder's nested cross-validation figures, as its training report holds them. */
export interface OfflineInput {
  /** Pooled nested-CV accuracy (averaged over repeats when there were several). */
  accuracy: number;
  /** Calibration trials the estimate pooled. */
  trials: number;
  /** Every outer fold's accuracy; [] when the report lacks them. */
  foldAccuracies: readonly number[];
}

/** Everything the review computes from: a stopped session's trials and totals, and the decoder's offline figures. */
export interface ReviewInput {
  classes: readonly string[];
  /** In cue order. */
  trials: readonly ReviewTrial[];
  /** null when the decoder came without a cross-validated estimate. */
  offline: OfflineInput | null;
  /** Samples the feed announced missing while the session ran, and in how many ranges. */
  droppedSamples: number;
  gapCount: number;
  /** Feed sampling rate, Hz (null when unknown: gap seconds are then not given). */
  sampleRateHz: number | null;
  /** Session length from start to stop, s (null when unknown). */
  durationS: number | null;
  /** End of the decoder's epoch after the cue, s. */
  epochEndS: number;
  /** The offline re-run of the stored samples; without it the 'replay' finding is left out. */
  replay?: ReplayInput;
}

/** A trial counts in online accuracy when it carries no flag, is not marked bad and its class is known. */
export function isClean(t: ReviewTrial): boolean {
  return t.flags.length === 0 && !t.markedBad && t.trueClass !== null;
}
