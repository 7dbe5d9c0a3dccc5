/**
 * Findings of the gap review about the sample and the data path: chance (is the gap within what
 * this many trials can show?), trials kept out of accuracy, dropped samples, and latency.
 * Verdict thresholds marked "rule of thumb" are this review's own choices, not published cut-offs;
 * each finding's text says what its numbers do and do not show.
 */
import type { GapReview, ReviewFigure, ReviewFinding } from '../api/review';
import { TRIAL_FLAGS, type TrialFlag } from '../api/sessions';
import { wilsonInterval } from '../evaluation/stats';
import { pctText, plural, pointsRangeText, pointsText, rangeText } from './format';
import { quantile } from './intervals';
import type { ReviewInput } from './types';

/** Rule of thumb: a share of excluded trials from which the exclusions may shape the online figure. */
export const EXCLUDED_POSSIBLE_SHARE = 0.1;
/** Rule of thumb: a share of excluded trials from which a quarter or more of the session is missing from the online figure. */
export const EXCLUDED_LIKELY_SHARE = 0.25;
/** Rule of thumb: fewest excluded trials for 'likely' (one or two exclusions in a short session say little). */
export const EXCLUDED_LIKELY_MIN = 5;
/** Rule of thumb: share of session time lost to gaps from which dropped samples may matter. */
export const GAP_POSSIBLE_SHARE = 0.01;
/** Rule of thumb: share of trials whose feedback came after the next cue from which latency may matter. */
export const LATE_POSSIBLE_SHARE = 0.1;

type Core = Pick<GapReview, 'online' | 'onlineChance' | 'offline' | 'difference'>;

/** (a) Chance and sample size: does the Newcombe interval of the difference include zero? */
export function chanceFinding(core: Core, classes: number): ReviewFinding {
  const { online, onlineChance, offline, difference } = core;
  const figures: ReviewFigure[] = [
    { label: 'Online accuracy (clean trials)', value: online?.accuracy ?? null, unit: 'fraction', ...(online ? { interval: online.wilson95 } : {}) },
    { label: 'Online trials', value: online?.trials ?? 0, unit: 'count' },
    { label: 'Accuracy needed above chance (α = 0.05)', value: onlineChance && onlineChance.accuracyNeeded <= 1 ? onlineChance.accuracyNeeded : null,
      unit: 'fraction' },
    { label: 'Offline nested-CV accuracy', value: offline?.accuracy ?? null, unit: 'fraction', ...(offline ? { interval: offline.wilson95 } : {}) },
    { label: 'Online minus offline', value: difference?.value ?? null, unit: 'difference', ...(difference ? { interval: difference.newcombe95 } : {}) },
  ];
  const title = 'Chance and sample size';
  if (!online) {
    return { key: 'chance', title, verdict: 'possible', figures,
      text: 'No clean trial with a known class: there is no online accuracy to compare, so nothing can be said about the gap.' };
  }
  const chanceLine = !onlineChance ? ''
    : onlineChance.minCorrect > online.trials
      ? `With only ${plural(online.trials, 'clean trial')} and ${classes} classes no accuracy can be told apart from chance at the 5 % level: `
        + 'even all trials correct happens by chance more often than that.'
      : `With ${plural(online.trials, 'clean trial')} and ${classes} classes, accuracy must reach ${pctText(onlineChance.accuracyNeeded)} to be above `
        + `chance (one-sided binomial test, α = 0.05); the online accuracy of ${pctText(online.accuracy)} is `
        + `${onlineChance.aboveChance ? 'above' : 'not above'} that threshold.`;
  if (!difference || !offline) {
    return { key: 'chance', title, verdict: 'possible', figures,
      text: `${chanceLine} The decoder has no stored cross-validated estimate, so the size of the gap is unknown.` };
  }
  const [lo, hi] = difference.newcombe95;
  const includesZero = lo <= 0 && hi >= 0;
  const body = `Online minus offline is ${pointsText(difference.value)}; its 95 % interval (Newcombe's hybrid score method) runs from `
    + `${pointsRangeText(difference.newcombe95)}. `;
  const verdictText = includesZero
    ? 'The interval includes zero: a gap of this size is within what these trial counts can show by chance, so the data do not establish a real difference. '
      + 'It does not show the two are equal either; more trials would narrow the interval.'
    : `The interval excludes zero: chance with ${plural(online.trials, 'online trial')} and ${plural(offline.trials, 'calibration trial')} `
      + 'does not account for a gap of this size on its own; the other findings weigh possible causes.';
  return { key: 'chance', title, verdict: includesZero ? 'likely' : 'unlikely', figures,
    text: `${chanceLine} ${body}${verdictText} The interval treats online and calibration trials as independent samples; `
      + 'pooled cross-validated accuracy is only approximately binomial.' };
}

const FLAG_LABEL: Record<TrialFlag | 'markedBad', string> = {
  artifact: 'Artifact', gap: 'Gap in the feed', dropout: 'Dropout (flat or non-finite channel)', paused: 'Cue while paused',
  markedBad: 'Marked bad',
};

/** (b) Trials kept out of accuracy, by reason, and how the decoder did on them when their class is known. */
export function excludedFinding(input: ReviewInput, online: Core['online']): ReviewFinding {
  const trials = input.trials;
  const excluded = trials.filter((t) => t.flags.length > 0 || t.markedBad);
  const labelled = excluded.filter((t) => t.trueClass !== null);
  const correct = labelled.filter((t) => t.trueClass === t.predictedClass).length;
  const unknownClass = trials.filter((t) => t.trueClass === null && t.flags.length === 0 && !t.markedBad).length;
  const share = trials.length > 0 ? excluded.length / trials.length : 0;
  const figures: ReviewFigure[] = [
    { label: 'Trials in the session', value: trials.length, unit: 'count' },
    { label: 'Excluded trials', value: excluded.length, unit: 'count' },
    { label: 'Excluded share', value: trials.length > 0 ? share : null, unit: 'fraction' },
    ...TRIAL_FLAGS.map((f) => ({ label: FLAG_LABEL[f], value: trials.filter((t) => t.flags.includes(f)).length, unit: 'count' as const })),
    { label: FLAG_LABEL.markedBad, value: trials.filter((t) => t.markedBad).length, unit: 'count' },
  ];
  let accText = '';
  if (labelled.length > 0) {
    const w = wilsonInterval(correct, labelled.length);
    figures.push({ label: 'Accuracy on excluded trials (class known)', value: correct / labelled.length, unit: 'fraction',
      interval: [w.lower, w.upper] });
    accText = ` On the ${plural(labelled.length, 'excluded trial')} whose class is known the decoder was right ${pctText(correct / labelled.length)} `
      + `of the time (95 % ${rangeText([w.lower, w.upper])})${online ? `, against ${pctText(online.accuracy)} on clean trials` : ''}.`;
  }
  if (unknownClass > 0) figures.push({ label: 'Unflagged trials without a known class', value: unknownClass, unit: 'count' });
  const title = 'Excluded trials';
  if (excluded.length === 0) {
    return { key: 'excluded', title, verdict: 'unlikely', figures,
      text: 'No trial was flagged or marked bad, so exclusions cannot explain the gap.' };
  }
  const reasons = [...TRIAL_FLAGS, 'markedBad' as const]
    .map((f) => [f, f === 'markedBad' ? trials.filter((t) => t.markedBad).length : trials.filter((t) => t.flags.includes(f)).length] as const)
    .filter(([, n]) => n > 0).map(([f, n]) => `${FLAG_LABEL[f].toLowerCase()} ${n}`).join(', ');
  const verdict = share >= EXCLUDED_LIKELY_SHARE && excluded.length >= EXCLUDED_LIKELY_MIN ? 'likely'
    : share >= EXCLUDED_POSSIBLE_SHARE ? 'possible' : 'unlikely';
  return { key: 'excluded', title, verdict, figures,
    text: `${plural(excluded.length, 'trial')} of ${trials.length} (${pctText(share)}) were kept out of online accuracy (${reasons}; a trial can carry `
      + `several reasons).${accText} Excluded trials do not enter the online figure, but a large share of them means the clean trials are a selected `
      + 'subset and that the recording conditions differed from calibration; this review cannot tell whether the remaining trials were '
      + 'affected below the flag limits.' };
}

/** (c) Samples the feed never delivered. */
export function gapsFinding(input: ReviewInput): ReviewFinding {
  const seconds = input.sampleRateHz ? input.droppedSamples / input.sampleRateHz : null;
  const share = seconds !== null && input.durationS ? seconds / input.durationS : null;
  const gapTrials = input.trials.filter((t) => t.flags.includes('gap')).length;
  const figures: ReviewFigure[] = [
    { label: 'Gaps', value: input.gapCount, unit: 'count' },
    { label: 'Dropped samples', value: input.droppedSamples, unit: 'count' },
    { label: 'Dropped time', value: seconds, unit: 'seconds' },
    { label: 'Share of session time', value: share, unit: 'fraction' },
    { label: 'Trials overlapping a gap', value: gapTrials, unit: 'count' },
  ];
  const title = 'Dropped samples';
  if (input.droppedSamples === 0) {
    return { key: 'gaps', title, verdict: 'unlikely', figures, text: 'The feed announced no missing samples during the session.' };
  }
  const verdict = share !== null && share >= GAP_POSSIBLE_SHARE ? 'possible' : 'unlikely';
  return { key: 'gaps', title, verdict, figures,
    text: `The feed announced ${plural(input.gapCount, 'gap')} with ${plural(input.droppedSamples, 'missing sample')}`
      + `${seconds !== null ? ` (${seconds.toFixed(2)} s${share !== null ? `, ${pctText(share)} of the session` : ''})` : ''}; `
      + `${plural(gapTrials, 'trial')} overlapped one and ${gapTrials === 1 ? 'was' : 'were'} excluded. Missing samples are held at the last value, `
      + 'so the causal filters see a step after each gap and the trials just after it may be disturbed without being flagged; '
      + 'the stored figures do not measure that effect.' };
}

/** (d) Latency of the stored predictions and feedback that came after the next cue. */
export function latencyFinding(input: ReviewInput): ReviewFinding {
  const ms = input.trials.map((t) => t.totalLatencyMs).filter(Number.isFinite);
  const p50 = quantile(ms, 0.5), p99 = quantile(ms, 0.99), max = ms.length > 0 ? Math.max(...ms) : NaN;
  // Feedback of trial i lands at onset_i + epochEnd + latency; late when that is after cue i+1.
  let late = 0;
  for (let i = 0; i + 1 < input.trials.length; i++) {
    const t = input.trials[i]!, next = input.trials[i + 1]!;
    if (t.onsetS + input.epochEndS + t.totalLatencyMs / 1000 > next.onsetS) late++;
  }
  const fin = (v: number) => (Number.isFinite(v) ? v : null);
  const lateShare = input.trials.length > 1 ? late / (input.trials.length - 1) : 0;
  const figures: ReviewFigure[] = [
    { label: 'Latency p50', value: fin(p50), unit: 'ms' },
    { label: 'Latency p99', value: fin(p99), unit: 'ms' },
    { label: 'Latency max', value: fin(max), unit: 'ms' },
    { label: 'Feedback after the next cue', value: late, unit: 'count' },
  ];
  const title = 'Latency';
  if (ms.length === 0) return { key: 'latency', title, verdict: 'unlikely', figures, text: 'No trial was stored, so there is no latency to weigh.' };
  const verdict = lateShare >= LATE_POSSIBLE_SHARE ? 'possible' : 'unlikely';
  return { key: 'latency', title, verdict, figures,
    text: `From the arrival of each epoch's last sample to the feedback, the median was ${p50.toFixed(1)} ms, the 99th percentile `
      + `${p99.toFixed(1)} ms and the longest ${max.toFixed(1)} ms. Each prediction reads the complete epoch, so latency does not change `
      + `what the decoder outputs; it changes when the participant sees it. ${late === 0 ? 'No feedback arrived after the next cue.'
        : `${plural(late, 'feedback')} arrived after the next cue had started, which can distract the participant in that trial.`}`
      + ' The figures do not include delays before the server (amplifier, bridge, network).' };
}
