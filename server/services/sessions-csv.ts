/** The trials of a session as CSV (RFC 4180: comma-separated, CRLF line ends, quotes doubled). */
import type { Trial } from '../../shared/api';

function cell(v: string | number | boolean | null): string {
  if (v === null) return '';
  const s = String(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** One row per trial; one probability column per class, in the decoder's class order. */
export function trialsCsv(trials: readonly Trial[], classes: readonly string[]): string {
  const head = ['trialId', 'cueId', 'sampleIndex', 'onsetS', 'trueClass', 'predictedClass', 'probability',
    ...classes.map((c) => `p_${c}`), 'correct', 'flags', 'excluded', 'markedBad', 'note', 'receivedMs', 'epochMs', 'featuresMs',
    'predictMs', 'broadcastMs', 'totalMs', 'createdAt'];
  const rows = trials.map((t) => [t.id, t.cueId, t.sampleIndex, t.onsetS, t.trueClass, t.predictedClass, t.probability,
    ...classes.map((_, k) => t.probabilities[k] ?? null), t.correct, t.flags.join(' '), t.excluded, t.markedBad, t.note,
    t.latency.receivedMs, t.latency.epochMs, t.latency.featuresMs, t.latency.predictMs, t.latency.broadcastMs, t.latency.totalMs,
    t.createdAt].map(cell).join(','));
  return [head.map(cell).join(','), ...rows].join('\r\n') + '\r\n';
}
