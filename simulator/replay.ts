/**
 * EDF replay as a feed source: a recording's samples in order, its annotations as cue markers
 * (label = annotation text), and runs of samples missing on every channel (NaN, e.g. the gaps
 * of an EDF+D file) as GAP items.
 */
import { normaliseChannelName } from '../shared/montage';
import type { Recording } from '../shared/types';
import { blockItems, type FeedItem, type FeedSource } from './feed-items';

export interface ReplayOptions {
  /**
   * Annotation texts to stream as cues (e.g. ['T1', 'T2']); others (such as a rest marker 'T0')
   * are skipped. Default: every non-empty annotation.
   */
  classes?: string[];
}

/** Cues of a recording: annotations within the data, filtered by `classes`, in time order. */
export function replayCues(rec: Recording, classes?: string[]): Array<{ sample: number; cueId: number; label: string }> {
  const n = rec.data[0]?.length ?? 0;
  const keep = classes ? new Set(classes) : null;
  return rec.annotations
    .map((a) => ({ sample: Math.round(a.onsetS * rec.sampleRateHz), label: a.text.trim() }))
    .filter((c) => c.label !== '' && (!keep || keep.has(c.label)) && c.sample >= 0 && c.sample < n)
    .sort((a, b) => a.sample - b.sample)
    .map((c, i) => ({ ...c, cueId: i + 1 }));
}

/** Feed channel names: 10-10 spelling where the label is one ('C3..' -> 'C3'), unless that would duplicate a name. */
export function feedChannelNames(labels: string[]): string[] {
  const normal = labels.map((l) => normaliseChannelName(l));
  return new Set(normal).size === normal.length ? normal : labels.map((l) => l.trim());
}

export function replaySource(rec: Recording, opts: ReplayOptions = {}): FeedSource {
  const n = rec.data[0]?.length ?? 0;
  const cues = replayCues(rec, opts.classes);
  let next = 0;
  let cueAt = 0;
  const lostIn = (from: number, to: number): Array<[number, number]> => {
    const out: Array<[number, number]> = [];
    let runStart = -1;
    for (let i = from; i < to; i++) {
      const missing = rec.data.every((row) => Number.isNaN(row[i]!));
      if (missing && runStart < 0) runStart = i;
      if (!missing && runStart >= 0) { out.push([runStart, i]); runStart = -1; }
    }
    if (runStart >= 0) out.push([runStart, to]);
    return out;
  };
  return {
    channelNames: feedChannelNames(rec.channelNames),
    units: rec.channelNames.map(() => 'uV'),
    sampleRateHz: rec.sampleRateHz,
    totalSamples: n,
    get nextSample() { return next; },
    read(maxSamples: number): FeedItem[] {
      const to = Math.min(n, next + maxSamples);
      if (to <= next) return [];
      const chunkCues: typeof cues = [];
      while (cueAt < cues.length && cues[cueAt]!.sample < to) chunkCues.push(cues[cueAt++]!);
      const rows = rec.data.map((row) => row.subarray(next, to));
      const items = blockItems(rows, next, to - next, chunkCues, lostIn(next, to));
      next = to;
      return items;
    },
  };
}
