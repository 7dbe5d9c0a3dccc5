// Profiles the simulator tests build on: the shipped demo, and a small fast one with every
// artifact kind frequent enough to cross chunk boundaries.
import { readFileSync } from 'node:fs';
import type { SimulationProfileInput } from '../../simulator/profile';

/**
 * The demo participant, by default with artifacts placed regardless of the cues
 * (stillDuringEpochs false): the decodability and prior checks need blinks, saccades and muscle
 * inside the training epochs, where ICA meets them.
 */
export function demoProfile(opts: { stillDuringEpochs?: boolean } = {}): SimulationProfileInput {
  const p = JSON.parse(readFileSync(new URL('../../simulator/profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as SimulationProfileInput;
  return { ...p, artifacts: { ...p.artifacts, stillDuringEpochs: opts.stillDuringEpochs ?? false } };
}

export function busyProfile(overrides: Partial<SimulationProfileInput> = {}): SimulationProfileInput {
  return {
    sampleRateHz: 250,
    channels: ['Fp1', 'Fp2', 'F7', 'F8', 'C3', 'Cz', 'C4', 'T7', 'T8', 'O1', 'Oz', 'O2'],
    classes: ['left-hand', 'right-hand'],
    trialsPerClass: 5,
    cueIntervalS: [5, 6],
    leadInS: 2,
    epoch: { tminS: -0.5, tmaxS: 4 },
    effects: [
      { class: 'left-hand', nearChannel: 'C4', frequencyHz: 11, bandwidthHz: 3, onsetS: 0.5, durationS: 3, changePercent: -40 },
      { class: 'right-hand', nearChannel: 'C3', frequencyHz: 11, bandwidthHz: 3, onsetS: -0.2, durationS: 3, changePercent: -40 },
      { class: 'right-hand', nearChannel: 'Cz', frequencyHz: 30, bandwidthHz: 4, onsetS: 1, durationS: 1, changePercent: 60 },
    ],
    artifacts: {
      blinksPerMin: 30, saccadesPerMin: 20, muscleBurstsPerMin: 20, popsPerMin: 10, dropoutsPerMin: 10,
      mainsHz: 60, mainsMicrovolts: 5, flatChannels: ['T8'],
    },
    seed: 7,
    ...overrides,
  };
}
