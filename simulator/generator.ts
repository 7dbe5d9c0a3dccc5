/**
 * The EEG generator: a simulation profile and a seed in, multichannel µV out, chunk by chunk.
 * All state lives in the SimulationState the caller holds; generateChunk advances it. Every
 * source, channel and event kind draws from its own seeded stream, so generating N samples in
 * any split of chunks gives exactly the same numbers as generating them at once.
 *
 * Signal model, summed per channel (docs/simulation-profile.md):
 *   background sources (1/f^chi, spread over the head)  + rhythms (alpha, mu, beta, theta; the
 *   profile's effects scale a rhythm's power after each cue of their class)  + artifacts (blinks,
 *   saccades, muscle, pops)  + mains sinusoid (per-channel pickup)  + sensor white noise;
 *   flat channels read 0; during a dropout every channel reads 0.
 */
import type { ChannelMajor } from '../shared/types';
import { ArtifactGenerator } from './artifacts';
import { electrodePoint } from './head';
import { parseProfile, type SimulationProfile } from './profile';
import { fillNormal, stream, uniform, type Rng } from './random';
import { CueSchedule, epochDeferral, runLengthSamples, type ScheduledCue } from './schedule';
import { pinkProcess, resonatorProcess } from './processes';
import { buildSources, type ContinuousSource } from './sources';
import type { GroundTruth, TruthEffect } from './truth';
import { positionOf } from '../shared/montage';

/** Everything the generator carries from one chunk to the next. Treat as opaque. */
export interface SimulationState {
  readonly profile: SimulationProfile;
  readonly seed: number;
  readonly sampleRateHz: number;
  /** Channel names in canonical 10-10 spelling (profile order). */
  readonly channelNames: string[];
  /** Samples in one run (classes x trialsPerClass cues, then the last epoch and 1 s). */
  readonly runLengthSamples: number;
  /** Index of the next sample generateChunk will produce. */
  nextSample: number;
  readonly sources: ContinuousSource[];
  readonly effects: TruthEffect[];
  readonly cueSchedule: CueSchedule;
  readonly artifacts: ArtifactGenerator;
  readonly sensorRngs: Rng[];
  readonly mains: { omega: number; phase: number; gains: Float64Array };
  readonly flat: Int32Array;
  /** Effect reach around a cue, samples: windows lie within [cue + before, cue + after). */
  readonly effectReach: { before: number; after: number };
  /** Dense mixing matrix of the continuous sources, [channel][source] row-major. */
  readonly mixing: Float64Array;
  firstLiveCue: number;
  /** One output buffer per continuous source, reused between chunks. */
  sourceBufs: Float64Array[];
  scratch: Float64Array;
  gain: Float64Array;
}

/** One generated chunk. */
export interface GeneratedChunk {
  firstSample: number;
  sampleCount: number;
  /** [channel][sample], µV. */
  data: ChannelMajor;
  /** Cues whose onset sample lies in this chunk. */
  cues: ScheduledCue[];
  /** Dropout ranges [from, to) inside this chunk (the data there is 0). */
  dropouts: Array<[number, number]>;
}

/**
 * Creates the generator state for a validated profile (see parseProfile) or raw JSON.
 * @param seed overrides profile.seed
 */
export function createSimulation(profile: SimulationProfile | unknown, opts: { seed?: number } = {}): SimulationState {
  const p = parseProfile(profile);
  const seed = opts.seed ?? p.seed;
  const fs = p.sampleRateHz;
  const electrodes = p.channels.map((c) => electrodePoint(c));
  const canonical = p.channels.map((c) => positionOf(c)!.name);
  const flatSet = new Set(p.artifacts.flatChannels.map((c) => positionOf(c)!.name));
  const flat = Int32Array.from(canonical.flatMap((c, i) => (flatSet.has(c) ? [i] : [])));
  const live = canonical.flatMap((c, i) => (flatSet.has(c) ? [] : [i]));
  const { sources, effects } = buildSources(p, seed, electrodes);
  const mainsRng = stream(seed, 'mains');
  const gains = Float64Array.from(p.channels, () => uniform(mainsRng, 0.5, 1.5));
  const phase = uniform(mainsRng, 0, 2 * Math.PI);
  const cueSchedule = new CueSchedule(p, seed);
  const before = Math.min(0, ...p.effects.map((e) => Math.round(e.onsetS * fs)));
  const after = Math.max(0, ...p.effects.map((e) => Math.round((e.onsetS + e.durationS) * fs)));
  return {
    profile: p, seed, sampleRateHz: fs, channelNames: canonical, runLengthSamples: runLengthSamples(p, seed),
    nextSample: 0, sources, effects, cueSchedule,
    artifacts: new ArtifactGenerator(p, seed, electrodes, live,
      p.artifacts.stillDuringEpochs ? () => epochDeferral(new CueSchedule(p, seed), p) : undefined),
    sensorRngs: p.channels.map((_, c) => stream(seed, 'sensor', c)),
    mains: { omega: 2 * Math.PI * p.artifacts.mainsHz / fs, phase, gains }, flat,
    effectReach: { before, after }, mixing: mixingMatrix(sources, p.channels.length), firstLiveCue: 0,
    sourceBufs: [], scratch: new Float64Array(0), gain: new Float64Array(0),
  };
}

function mixingMatrix(sources: ContinuousSource[], nCh: number): Float64Array {
  const m = new Float64Array(nCh * sources.length);
  sources.forEach((s, j) => {
    s.sparse.channels.forEach((c, k) => { m[c * sources.length + j] = s.sparse.gains[k]!; });
  });
  return m;
}

/**
 * out[c][i] += sum_s m[c][s] * x[s][i], four sources per pass so each output sample is loaded and
 * stored once per four sources (the generator's hot loop).
 */
function mixAll(out: Float64Array[], m: Float64Array, xs: Float64Array[], n: number): void {
  const S = xs.length;
  for (let c = 0; c < out.length; c++) {
    const row = out[c]!;
    const base = c * S;
    let s = 0;
    for (; s + 4 <= S; s += 4) {
      const g0 = m[base + s]!, g1 = m[base + s + 1]!, g2 = m[base + s + 2]!, g3 = m[base + s + 3]!;
      const x0 = xs[s]!, x1 = xs[s + 1]!, x2 = xs[s + 2]!, x3 = xs[s + 3]!;
      for (let i = 0; i < n; i++) row[i] = row[i]! + g0 * x0[i]! + g1 * x1[i]! + g2 * x2[i]! + g3 * x3[i]!;
    }
    for (; s < S; s++) {
      const g = m[base + s]!;
      const x = xs[s]!;
      for (let i = 0; i < n; i++) row[i] = row[i]! + g * x[i]!;
    }
  }
}

/** Multiplies `gain` by the effect envelopes of `src` over [s0, s0 + n) (amplitude = sqrt of power factor). */
function applyEffects(state: SimulationState, src: ContinuousSource, s0: number, n: number, gain: Float64Array): boolean {
  const cues = state.cueSchedule.cues;
  let touched = false;
  for (let c = state.firstLiveCue; c < cues.length; c++) {
    const cue = cues[c]!;
    if (cue.sample + state.effectReach.before >= s0 + n) break;
    for (const e of src.effects) {
      if (e.classLabel !== cue.label) continue;
      const a = cue.sample + e.onset;
      const from = Math.max(s0, a);
      const to = Math.min(s0 + n, a + e.length);
      for (let t = from; t < to; t++) {
        const k = t - a;
        const edge = Math.min(k, e.length - 1 - k);
        const w = edge >= e.ramp ? 1 : 0.5 - 0.5 * Math.cos(Math.PI * (edge + 0.5) / e.ramp);
        gain[t - s0] = gain[t - s0]! * Math.sqrt(1 + w * (e.powerFactor - 1));
        touched = true;
      }
    }
  }
  return touched;
}

/** Generates the next `n` samples of every channel and advances the state. */
export function generateChunk(state: SimulationState, n: number): GeneratedChunk {
  if (!Number.isInteger(n) || n < 0) throw new RangeError(`sample count must be a non-negative integer, got ${n}`);
  const s0 = state.nextSample;
  const nCh = state.channelNames.length;
  const out: ChannelMajor = Array.from({ length: nCh }, () => new Float64Array(n));
  if (state.scratch.length < n) { state.scratch = new Float64Array(n); state.gain = new Float64Array(n); }
  const buf = state.scratch;
  const gain = state.gain;

  state.cueSchedule.ensureUntil(s0 + n - state.effectReach.before + 1);
  const cues = state.cueSchedule.cues;
  while (state.firstLiveCue < cues.length && cues[state.firstLiveCue]!.sample + state.effectReach.after < s0) state.firstLiveCue++;

  if (state.sourceBufs.length === 0 || state.sourceBufs[0]!.length < n) {
    state.sourceBufs = state.sources.map(() => new Float64Array(n));
  }
  const xs = state.sourceBufs.map((b) => (b.length === n ? b : b.subarray(0, n)));
  state.sources.forEach((src, j) => {
    const x = xs[j]!;
    fillNormal(src.rng, x, 0, n);
    if (src.pink) pinkProcess(src.pink.design, src.pink.state, x, 0, n);
    if (src.resonator) resonatorProcess(src.resonator.design, src.resonator.state, x, 0, n);
    gain.fill(src.scaleUv, 0, n);
    if (src.effects.length > 0) applyEffects(state, src, s0, n, gain);
    for (let i = 0; i < n; i++) x[i] = x[i]! * gain[i]!;
  });
  mixAll(out, state.mixing, xs, n);

  state.artifacts.render(out, s0, n);

  const { omega, phase, gains } = state.mains;
  const amp = state.profile.artifacts.mainsMicrovolts;
  if (amp > 0) {
    for (let i = 0; i < n; i++) buf[i] = amp * Math.sin(omega * (s0 + i) + phase);
    for (let c = 0; c < nCh; c++) {
      const row = out[c]!;
      const g = gains[c]!;
      for (let i = 0; i < n; i++) row[i] = row[i]! + g * buf[i]!;
    }
  }

  const sensorUv = state.profile.background.sensorNoiseUv;
  for (let c = 0; c < nCh; c++) {
    const row = out[c]!;
    const rng = state.sensorRngs[c]!;
    for (let i = 0; i < n; i++) row[i] = row[i]! + sensorUv * rng.nextNormal();
  }

  for (const c of state.flat) out[c]!.fill(0);
  const dropouts = state.artifacts.applyDropouts(out, s0, n);
  state.nextSample = s0 + n;
  const chunkCues = cues.filter((c) => c.sample >= s0 && c.sample < s0 + n);
  return { firstSample: s0, sampleCount: n, data: out, cues: chunkCues, dropouts };
}

/** The ground truth of everything generated so far (sources, effects, cues, artifacts, dropouts). */
export function simulationTruth(state: SimulationState): GroundTruth {
  const p = state.profile;
  const fs = state.sampleRateHz;
  const count = state.nextSample;
  const { artifacts, dropouts } = state.artifacts.truth(count, state.channelNames);
  const a = state.artifacts;
  return {
    format: 'aftercue-simulation-truth', version: 1, seed: state.seed, sampleRateHz: fs, channels: [...state.channelNames],
    sampleCount: count, durationS: count / fs, profile: p,
    sources: [...state.sources.map((s) => s.truth), a.blinkSource.truth, a.saccadeSource.truth, a.muscleSources[0].truth, a.muscleSources[1].truth],
    effects: state.effects,
    cues: state.cueSchedule.cues.filter((c) => c.sample < count)
      .map((c) => ({ id: c.id, sample: c.sample, timeS: c.sample / fs, class: c.label, block: c.block })),
    artifacts, dropouts,
    mains: { frequencyHz: p.artifacts.mainsHz, amplitudeUv: p.artifacts.mainsMicrovolts, phaseRad: state.mains.phase,
      channelGains: Array.from(state.mains.gains) },
    flatChannels: Array.from(state.flat, (c) => state.channelNames[c]!),
    sensorNoiseUv: p.background.sensorNoiseUv,
  };
}
