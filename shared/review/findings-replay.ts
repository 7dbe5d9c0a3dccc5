/**
 * Finding of the gap review about the live processing itself: the stored raw samples of the
 * session re-run offline through the same frozen decoder (server/live/offline.ts) and compared
 * with what the live path predicted. Equal outputs rule the live path out as a cause of the gap;
 * different outputs point at it.
 */
import type { ReviewFigure, ReviewFinding } from '../api/review';
import { plural } from './format';

/** Probabilities agreeing within this (absolute) count as the same computation (float rounding only). */
export const REPLAY_TOLERANCE = 1e-6;

/** One trial's class probabilities online and re-run offline (null: its epoch lies outside the stored run). */
export interface ReplayTrial {
  online: readonly number[];
  offline: readonly number[] | null;
}

/** The re-run's outcome: the compared trials, or why it could not run. */
export type ReplayInput = { trials: readonly ReplayTrial[] } | { unavailable: string };

function diffText(d: number): string {
  return !Number.isFinite(d) ? 'not comparable' : d === 0 ? '0, identical' : d < 1e-3 ? d.toExponential(1) : d.toPrecision(2);
}

const argmax = (p: readonly number[]) => p.reduce((best, v, i) => (v > p[best]! ? i : best), 0);

/** (g) Online against an offline re-run on the stored samples. */
export function replayFinding(replay: ReplayInput): ReviewFinding {
  const title = 'Live processing against an offline re-run';
  if ('unavailable' in replay) {
    return { key: 'replay', title, verdict: 'possible', figures: [],
      text: `The stored samples could not be re-run through the decoder (${replay.unavailable}), so a fault in the live processing is not ruled out.` };
  }
  const compared = replay.trials.filter((t): t is { online: readonly number[]; offline: readonly number[] } => t.offline !== null);
  let maxDiff = 0, changed = 0;
  for (const t of compared) {
    if (t.online.length !== t.offline.length) maxDiff = Infinity;
    else t.online.forEach((p, k) => { const d = Math.abs(p - t.offline[k]!); maxDiff = Number.isNaN(d) ? Infinity : Math.max(maxDiff, d); });
    if (argmax(t.online) !== argmax(t.offline)) changed++;
  }
  const outside = replay.trials.length - compared.length;
  const figures: ReviewFigure[] = [
    { label: 'Trials re-run', value: compared.length, unit: 'count' },
    { label: 'Trials outside the stored run', value: outside, unit: 'count' },
    { label: 'Largest probability difference', value: compared.length > 0 && Number.isFinite(maxDiff) ? maxDiff : null, unit: 'text',
      text: compared.length === 0 ? 'n/a' : diffText(maxDiff) },
    { label: 'Predictions that differ', value: changed, unit: 'count' },
  ];
  if (compared.length === 0) {
    return { key: 'replay', title, verdict: 'possible', figures,
      text: 'No trial lies inside the stored run, so the live processing could not be checked against an offline re-run.' };
  }
  const verdict = changed > 0 ? 'likely' : maxDiff > REPLAY_TOLERANCE ? 'possible' : 'unlikely';
  const text = verdict === 'unlikely'
    ? `Re-running the stored samples of ${plural(compared.length, 'trial')} offline through the same decoder gave the same probabilities `
      + `(largest difference ${diffText(maxDiff)}). The live path computed what the decoder computes offline, so it is not the cause `
      + 'of the gap; this does not test the samples themselves.'
    : `Re-running the stored samples offline gave ${changed > 0 ? `a different prediction on ${plural(changed, 'trial')}` : 'slightly different probabilities'} `
      + `(largest probability difference ${diffText(maxDiff)}). The live processing did not `
      + 'compute what the decoder computes offline on the same samples; that difference is a fault to investigate and can contribute to the gap.';
  return { key: 'replay', title, verdict, figures,
    text: outside > 0 ? `${text} ${plural(outside, 'trial')} lay outside the stored run and could not be re-run.` : text };
}
