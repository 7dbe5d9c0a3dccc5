import type { QualityChannel } from '@shared/api/live';
import { token } from '../composables/canvas';

export type QualityState = 'ok' | 'flagged' | 'flat' | 'saturated' | 'unknown';

export interface QualityLook {
  state: QualityState;
  /** Line colour on the trace; null keeps the normal ink colour. */
  colour: string | null;
}

/** A channel's quality as the trace shows it; saturation outranks flatness, which outranks noise. */
export function qualityLook(q: QualityChannel | undefined): QualityLook {
  if (!q) return { state: 'unknown', colour: null };
  if (q.saturated) return { state: 'saturated', colour: token('--ac-red-600', '#a8382d') };
  if (q.flat) return { state: 'flat', colour: token('--ac-ink-300', '#a8b4ba') };
  if (q.flagged) return { state: 'flagged', colour: token('--ac-amber-500', '#b7791f') };
  return { state: 'ok', colour: null };
}
