/**
 * Offline simulation: a whole recording at once (for `aftercue simulate`, tests and demos), with
 * every cue as an annotation whose text is the class label.
 */
import type { Recording } from '../shared/types';
import { createSimulation, generateChunk, simulationTruth } from './generator';
import type { SimulationProfile } from './profile';
import type { GroundTruth } from './truth';

export interface SimulateOptions {
  /** Length in seconds; default one run (every class x trialsPerClass cue, then the last epoch). */
  seconds?: number;
  /** Overrides profile.seed. */
  seed?: number;
  /** ISO 8601 time of sample 0; default null (unknown). */
  startTime?: string | null;
}

/** Generates `seconds` of data as a Recording (µV) plus its ground truth. */
export function simulateRecording(profile: SimulationProfile | unknown, opts: SimulateOptions = {}):
  { recording: Recording; truth: GroundTruth } {
  const state = createSimulation(profile, { seed: opts.seed });
  const fs = state.sampleRateHz;
  const total = opts.seconds === undefined ? state.runLengthSamples : Math.round(opts.seconds * fs);
  if (!Number.isFinite(total) || total < 1) throw new RangeError(`seconds must give at least one sample, got ${opts.seconds}`);
  const data = state.channelNames.map(() => new Float64Array(total));
  // Generate in 10-s blocks to bound the scratch memory; the result equals one call.
  const block = Math.max(1, Math.round(10 * fs));
  for (let s0 = 0; s0 < total; s0 += block) {
    const chunk = generateChunk(state, Math.min(block, total - s0));
    chunk.data.forEach((row, c) => data[c]!.set(row, s0));
  }
  const truth = simulationTruth(state);
  return {
    recording: {
      channelNames: [...state.channelNames], sampleRateHz: fs, data,
      annotations: truth.cues.map((c) => ({ onsetS: c.sample / fs, durationS: null, text: c.class })),
      startTime: opts.startTime ?? null,
    },
    truth,
  };
}
