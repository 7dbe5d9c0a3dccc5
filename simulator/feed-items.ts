/**
 * What a bridge streams, before sequence numbers are assigned: sample chunks (interleaved
 * float32), cue markers and gaps. Sources (the generator, an EDF replay) produce blocks of
 * items; the embedded feed and the bridge client number and frame them.
 */
import { FEED_LIMITS, type ChunkFrame, type CueFrame, type GapFrame, type GapReasonName, type SequencedFrame } from '../shared/protocol';
import type { ChannelMajor } from '../shared/types';

export type FeedItem =
  | { kind: 'chunk'; firstSample: number; sampleCount: number; channelCount: number; samples: Float32Array }
  | { kind: 'cue'; sample: number; cueId: number; label: string }
  | { kind: 'gap'; fromSample: number; toSample: number; reason: GapReasonName };

/** Anything that can be streamed as a feed. */
export interface FeedSource {
  readonly channelNames: string[];
  readonly units: string[];
  readonly sampleRateHz: number;
  /** Total samples, or null for an endless source. */
  readonly totalSamples: number | null;
  /** Index of the next sample `read` will produce. */
  readonly nextSample: number;
  /** The next up to `maxSamples` samples (fewer at the end) as items, in stream order. */
  read(maxSamples: number): FeedItem[];
}

/** Interleaves channel-major rows [channel][sample] over [from, to) into float32 [sample][channel]. */
export function interleave(rows: ChannelMajor, from: number, to: number): Float32Array {
  const nCh = rows.length;
  const out = new Float32Array((to - from) * nCh);
  for (let c = 0; c < nCh; c++) {
    const row = rows[c]!;
    for (let i = from, k = c; i < to; i++, k += nCh) out[k] = row[i]!;
  }
  return out;
}

/**
 * Items for one block of channel-major data starting at `firstSample`: chunks split at the
 * protocol's sample limit and around `lost` ranges (sorted, inside the block), which become
 * GAP items (reason 'source'); each cue follows the chunk holding its sample.
 */
export function blockItems(rows: ChannelMajor, firstSample: number, sampleCount: number,
                           cues: Array<{ sample: number; cueId: number; label: string }>,
                           lost: Array<[number, number]>, maxChunkSamples = FEED_LIMITS.maxSamplesPerChunk): FeedItem[] {
  const items: FeedItem[] = [];
  const pending = [...cues].sort((a, b) => a.sample - b.sample);
  let cueAt = 0;
  const flushCues = (upTo: number) => {
    while (cueAt < pending.length && pending[cueAt]!.sample < upTo) {
      const c = pending[cueAt++]!;
      items.push({ kind: 'cue', sample: c.sample, cueId: c.cueId, label: c.label });
    }
  };
  const end = firstSample + sampleCount;
  let s = firstSample;
  const emitData = (to: number) => {
    while (s < to) {
      const n = Math.min(maxChunkSamples, to - s);
      items.push({ kind: 'chunk', firstSample: s, sampleCount: n, channelCount: rows.length,
        samples: interleave(rows, s - firstSample, s - firstSample + n) });
      s += n;
      flushCues(s);
    }
  };
  for (const [from, to] of lost) {
    emitData(from);
    items.push({ kind: 'gap', fromSample: from, toSample: to, reason: 'source' });
    s = to;
    flushCues(s);
  }
  emitData(end);
  flushCues(Infinity);
  return items;
}

/** The frame for an item under sequence number `seq`. */
export function itemFrame(item: FeedItem, seq: number): SequencedFrame {
  switch (item.kind) {
    case 'chunk': return { type: 'chunk', seq, firstSample: item.firstSample, channelCount: item.channelCount,
      sampleCount: item.sampleCount, samples: item.samples } satisfies ChunkFrame;
    case 'cue': return { type: 'cue', seq, sample: item.sample, cueId: item.cueId, label: item.label } satisfies CueFrame;
    case 'gap': return { type: 'gap', seq, lastSeq: seq, fromSample: item.fromSample, toSample: item.toSample,
      reason: item.reason } satisfies GapFrame;
  }
}
