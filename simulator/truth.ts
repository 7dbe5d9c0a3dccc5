/**
 * Ground truth the generator writes beside its data: what was put where and when. JSON-safe.
 * Times are given both as sample indices (exact) and seconds (sample / sampleRateHz).
 */
import type { SimulationProfile } from './profile';

export type SourceKind = 'background' | 'rhythm' | 'effect' | 'eye-vertical' | 'eye-horizontal' | 'muscle-left' | 'muscle-right';

/** One source and its scalp pattern (gain per channel, in profile channel order). */
export interface TruthSource {
  id: string;
  kind: SourceKind;
  /** Rhythm name from the profile, when it has one. */
  name?: string;
  /** The electrode the source was placed at, when placed at one. */
  nearChannel?: string;
  position: { x: number; y: number; z: number; thetaDeg: number; phiDeg: number };
  spreadDeg: number;
  pattern: number[];
  /** Time course: a 1/f^exponent background, a narrow-band rhythm, or an artifact waveform. */
  timeCourse:
    | { type: 'pink'; exponent: number; rmsUv: number }
    | { type: 'rhythm'; frequencyHz: number; bandwidthHz: number; rmsUv: number }
    | { type: 'artifact' };
  /** Indices into `effects` carried by this source. */
  effects: number[];
}

/** A class-dependent effect (one entry of the profile's `effects`) and the source carrying it. */
export interface TruthEffect {
  index: number;
  class: string;
  nearChannel: string;
  frequencyHz: number;
  bandwidthHz: number;
  onsetS: number;
  durationS: number;
  changePercent: number;
  /** Raised-cosine ramps inside the window at both ends, seconds. */
  rampS: number;
  sourceId: string;
}

export interface TruthCue { id: number; sample: number; timeS: number; class: string; block: number }

export type ArtifactKind = 'blink' | 'saccade' | 'muscle' | 'pop';

export interface TruthArtifact {
  kind: ArtifactKind;
  startSample: number;
  endSample: number;
  startS: number;
  durationS: number;
  /**
   * blink: peak at Fp1/Fp2; saccade: signed step at F7 (F8 gets the opposite sign); muscle: RMS at
   * T7 or T8; pop: signed initial step at its channel. µV.
   */
  amplitudeUv: number;
  sourceId?: string;
  channel?: string;
  /** pop: exponential decay time constant, seconds. */
  tauS?: number;
}

export interface TruthDropout { startSample: number; endSample: number; startS: number; durationS: number }

export interface GroundTruth {
  format: 'aftercue-simulation-truth';
  version: 1;
  seed: number;
  sampleRateHz: number;
  channels: string[];
  /** Samples generated so far; events below are those starting before it. */
  sampleCount: number;
  durationS: number;
  profile: SimulationProfile;
  sources: TruthSource[];
  effects: TruthEffect[];
  cues: TruthCue[];
  artifacts: TruthArtifact[];
  dropouts: TruthDropout[];
  mains: { frequencyHz: number; amplitudeUv: number; phaseRad: number; channelGains: number[] };
  flatChannels: string[];
  /** Per-channel independent white noise, RMS µV. */
  sensorNoiseUv: number;
}
