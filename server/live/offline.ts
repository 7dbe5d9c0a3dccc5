/**
 * Offline predict on what a session stored: its raw samples read back from SQLite (the feed's
 * chunks over [start_sample, stop_sample)), gaps and non-finite values filled by the same hold
 * rule as the live path, the decoder's pre-processing over the whole run at once, then one
 * prediction per stored trial. The gap review and the online-equals-offline checks use it.
 */
import type { Db } from '../db/client';
import { findFeedById, readFeedChunks, readFeedMarks } from '../db/queries/feed';
import { findPilotSession, listTrials } from '../db/queries/pilot-sessions';
import type { LiveDecoder } from './live-decoder';
import { channelMap, deinterleaveHold, fillHold } from './samples';

export interface OfflineTrial {
  trialId: number;
  cueId: number;
  sampleIndex: number;
  online: number[];
  /** null when the cue's epoch is not inside the stored run. */
  offline: number[] | null;
}

/** Raw samples of a feed over [from, to) in the decoder's channel order, holes held (see samples.ts). */
export function storedRun(db: Db, feedId: number, feedChannels: readonly string[], decoder: LiveDecoder, from: number, to: number) {
  const { map, missing } = channelMap(feedChannels, decoder.channelNames);
  if (missing.length > 0) throw new RangeError(`the feed lacks ${missing.join(', ')}`);
  const raw = decoder.channelNames.map(() => new Float64Array(to - from));
  const last = new Float64Array(raw.length);
  const gaps = readFeedMarks(db, feedId, from, to).filter((m) => m.kind === 'gap');
  const items: Array<{ at: number; fill: () => void }> = [];
  for (const c of readFeedChunks(db, feedId, from, to)) {
    if (c.firstSample < from || c.firstSample + c.sampleCount > to) {
      throw new RangeError(`chunk seq ${c.seq} straddles the session's bounds [${from}, ${to})`);
    }
    items.push({ at: c.firstSample, fill: () => { deinterleaveHold(c.samples, c.channelCount, c.sampleCount, map, raw, c.firstSample - from, last); } });
  }
  for (const g of gaps) {
    const a = g.sample, b = Math.min(g.toSample ?? g.sample, to);
    items.push({ at: a, fill: () => fillHold(raw, a - from, b - a, last) });
  }
  items.sort((x, y) => x.at - y.at);
  for (const it of items) it.fill();
  return raw;
}

/** Online and offline probabilities of every stored trial of a stopped (or running: up to now) session. */
export function offlineTrials(db: Db, sessionId: number, decoder: LiveDecoder): OfflineTrial[] {
  const s = findPilotSession(db, sessionId);
  if (!s || s.feedId === null || s.startSample === null) throw new RangeError(`session ${sessionId} never started`);
  const feed = findFeedById(db, s.feedId)!;
  const to = s.stopSample ?? feed.nextSample;
  const raw = storedRun(db, s.feedId, feed.channelNames, decoder, s.startSample, to);
  const trials = listTrials(db, sessionId);
  const offline = decoder.predictOffline(raw, trials.map((t) => t.sampleIndex - s.startSample!));
  return trials.map((t, i) => ({ trialId: t.id, cueId: t.cueId, sampleIndex: t.sampleIndex, online: t.probabilities,
    offline: offline[i] ? Array.from(offline[i]!) : null }));
}
