/**
 * The generator's continuous sources: spatially correlated 1/f background and narrow-band
 * rhythms, each with a scalp pattern and its own random stream; and the binding of the profile's
 * class-dependent effects to the rhythm sources that carry them.
 */
import { positionOf } from '../shared/montage';
import {
  electrodePoint, fibonacciCap, gaussianPattern, type SpherePoint,
} from './head';
import { designPink, designResonator, pinkProcess, resonatorProcess, type PinkDesign, type ResonatorDesign } from './processes';
import type { SimulationProfile } from './profile';
import { fillNormal, stream, type Rng } from './random';
import type { TruthEffect, TruthSource } from './truth';

/** A source's pattern restricted to the channels it reaches (gain > 1e-6 of its peak). */
export interface SparsePattern { channels: Int32Array; gains: Float64Array }

export function sparsify(pattern: Float64Array): SparsePattern {
  let max = 0;
  for (const g of pattern) max = Math.max(max, Math.abs(g));
  const idx: number[] = [];
  pattern.forEach((g, i) => { if (Math.abs(g) > 1e-6 * max) idx.push(i); });
  return { channels: Int32Array.from(idx), gains: Float64Array.from(idx.map((i) => pattern[i]!)) };
}

/** An effect window bound to a rhythm source, in samples. */
export interface BoundEffect {
  index: number;
  classLabel: string;
  onset: number;
  length: number;
  ramp: number;
  /** Power multiplier at full effect: 1 + changePercent / 100. */
  powerFactor: number;
}

/** A continuous source with its filter state; `scaleUv` multiplies its unit-variance output. */
export interface ContinuousSource {
  truth: TruthSource;
  sparse: SparsePattern;
  rng: Rng;
  scaleUv: number;
  pink?: { design: PinkDesign; state: Float64Array };
  resonator?: { design: ResonatorDesign; state: Float64Array };
  effects: BoundEffect[];
}

const EFFECT_SOURCE_RMS_UV = 5;
const EFFECT_SOURCE_SPREAD_DEG = 22;
/** Filter warm-up before sample 0, seconds: > 12 time constants of the slowest 1/f pole (0.1 Hz). */
const WARM_UP_S = 20;

function pointTruth(p: SpherePoint) {
  return { x: p.x, y: p.y, z: p.z, thetaDeg: p.thetaDeg, phiDeg: p.phiDeg };
}

/** Runs the source's filter for `samples` samples and discards the output (stationary start). */
function warmUp(src: ContinuousSource, samples: number): void {
  const buf = new Float64Array(Math.min(samples, 8192));
  for (let done = 0; done < samples; done += buf.length) {
    const n = Math.min(buf.length, samples - done);
    fillNormal(src.rng, buf, 0, n);
    if (src.pink) pinkProcess(src.pink.design, src.pink.state, buf, 0, n);
    if (src.resonator) resonatorProcess(src.resonator.design, src.resonator.state, buf, 0, n);
  }
}

/**
 * Builds the background and rhythm sources and binds each effect: to the profile rhythm placed
 * at the effect's channel whose band [f - bw/2, f + bw/2] (the wider of the two bands) contains
 * the effect's frequency (the nearest in frequency if several); otherwise to a new narrow-band
 * source at that channel with the effect's frequency and bandwidth (5 µV RMS, 22° spread).
 */
export function buildSources(profile: SimulationProfile, seed: number, electrodes: SpherePoint[]):
  { sources: ContinuousSource[]; effects: TruthEffect[] } {
  const fs = profile.sampleRateHz;
  const sources: ContinuousSource[] = [];
  const bg = profile.background;
  const pink = designPink(bg.exponent, fs);
  const points = fibonacciCap(bg.sourceCount, 115);
  const patterns = points.map((p) => gaussianPattern(p, electrodes, bg.spreadDeg));
  // Calibrate so the mean channel variance equals rmsUv^2 (sources are independent).
  let sumSq = 0;
  for (const pat of patterns) for (const g of pat) sumSq += g * g;
  const bgScale = sumSq > 0 ? bg.rmsUv / Math.sqrt(sumSq / electrodes.length) : 0;
  points.forEach((p, i) => {
    sources.push({
      truth: { id: `background-${i + 1}`, kind: 'background', position: pointTruth(p), spreadDeg: bg.spreadDeg,
        pattern: Array.from(patterns[i]!), timeCourse: { type: 'pink', exponent: bg.exponent, rmsUv: bgScale }, effects: [] },
      sparse: sparsify(patterns[i]!), rng: stream(seed, 'background', i), scaleUv: bgScale,
      pink: { design: pink, state: new Float64Array(2 * pink.a.length) }, effects: [],
    });
  });

  const rhythm = (id: string, kind: 'rhythm' | 'effect', name: string | undefined, near: string, f: number, bw: number,
    rmsUv: number, spreadDeg: number, index: number): ContinuousSource => {
    const p = electrodePoint(near);
    const pattern = gaussianPattern(p, electrodes, spreadDeg);
    return {
      truth: { id, kind, ...(name ? { name } : {}), nearChannel: positionOf(near)!.name, position: pointTruth(p), spreadDeg,
        pattern: Array.from(pattern), timeCourse: { type: 'rhythm', frequencyHz: f, bandwidthHz: bw, rmsUv }, effects: [] },
      sparse: sparsify(pattern), rng: stream(seed, kind, index), scaleUv: rmsUv,
      resonator: { design: designResonator(f, bw, fs), state: new Float64Array(2) }, effects: [],
    };
  };
  profile.rhythms.forEach((r, i) => {
    sources.push(rhythm(`rhythm-${r.name}`, 'rhythm', r.name, r.nearChannel, r.frequencyHz, r.bandwidthHz, r.rmsUv, r.spreadDeg, i));
  });

  const effects: TruthEffect[] = profile.effects.map((e, i) => {
    const near = positionOf(e.nearChannel)!.name;
    const candidates = sources.filter((s) => s.truth.kind !== 'background' && s.truth.nearChannel === near &&
      s.truth.timeCourse.type === 'rhythm' &&
      Math.abs(s.truth.timeCourse.frequencyHz - e.frequencyHz) <= Math.max(s.truth.timeCourse.bandwidthHz, e.bandwidthHz) / 2);
    const dist = (s: ContinuousSource) => (s.truth.timeCourse.type === 'rhythm' ? Math.abs(s.truth.timeCourse.frequencyHz - e.frequencyHz) : Infinity);
    let src = candidates.sort((a, b) => dist(a) - dist(b))[0];
    if (!src) {
      src = rhythm(`effect-${i + 1}`, 'effect', undefined, near, e.frequencyHz, e.bandwidthHz, EFFECT_SOURCE_RMS_UV, EFFECT_SOURCE_SPREAD_DEG, i);
      sources.push(src);
    }
    const rampS = Math.min(0.25, e.durationS / 4);
    src.truth.effects.push(i);
    src.effects.push({ index: i, classLabel: e.class, onset: Math.round(e.onsetS * fs), length: Math.round(e.durationS * fs),
      ramp: Math.round(rampS * fs), powerFactor: 1 + e.changePercent / 100 });
    return { index: i, class: e.class, nearChannel: near, frequencyHz: e.frequencyHz, bandwidthHz: e.bandwidthHz,
      onsetS: e.onsetS, durationS: e.durationS, changePercent: e.changePercent, rampS, sourceId: src.truth.id };
  });

  for (const s of sources) warmUp(s, Math.round(WARM_UP_S * fs));
  return { sources, effects };
}
