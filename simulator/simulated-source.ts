/**
 * The generator as a feed source: chunks of its data, its cues (label = class) and its
 * dropouts as GAP items (the samples are never sent).
 */
import type { FeedItem, FeedSource } from './feed-items';
import { blockItems } from './feed-items';
import { generateChunk, type SimulationState } from './generator';

/** Streams `state` from its current sample; `totalSamples` null = endless (runs repeat). */
export function simulatedSource(state: SimulationState, totalSamples: number | null = null): FeedSource {
  return {
    channelNames: [...state.channelNames],
    units: state.channelNames.map(() => 'uV'),
    sampleRateHz: state.sampleRateHz,
    totalSamples,
    get nextSample() { return state.nextSample; },
    read(maxSamples: number): FeedItem[] {
      const left = totalSamples === null ? maxSamples : Math.min(maxSamples, totalSamples - state.nextSample);
      if (left <= 0) return [];
      const chunk = generateChunk(state, left);
      return blockItems(chunk.data, chunk.firstSample, chunk.sampleCount,
        chunk.cues.map((c) => ({ sample: c.sample, cueId: c.id, label: c.label })), chunk.dropouts);
    },
  };
}
