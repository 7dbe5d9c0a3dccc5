/**
 * The plausibility prior on ICA components (Aftercue's own cortical prior; DESIGN.md "The
 * decoder" item 6): each component is scored from its scalp map (a mixing column over the
 * montage's 10-10 positions) and its spectrum (Welch PSD of its activation on the TRAINING
 * trials), and the score becomes its penalty weight w_k in the trace-norm objective
 * λ Σ_k w_k ‖W_k‖_* (Tomioka & Müller 2010), so eye, muscle, line-noise and single-electrode
 * components need more evidence to enter the decoder.
 *
 * Measurements (map energy e_c = a_c² / Σ_c a_c², over all channels):
 *   frontalFraction      Σ e_c over electrodes within 40° of Fpz (Fp1, Fpz, Fp2, AFz, AF3/4, AF7/8 in
 *                        the 10-10 system); a uniform 64-channel map gives 0.125
 *   edgeFraction         Σ e_c over electrodes with polar angle θ ≥ 85° (the Fpz-T7-Oz-T8 ring and
 *                        below, where frontalis, temporalis and neck muscles project); uniform ≈ 0.36
 *   maxChannelFraction   max_c e_c (a map living on one electrode); uniform 1/C
 *   lowFrequencyFraction P(f₀..4 Hz) / P(f₀..f₁), with [f₀, f₁] = [max(1, band low), min(45, band high,
 *                        0.45·fs)]; 1/f gives 0.38 and 1/f² 0.77 on 1-40 Hz
 *   highFrequencyFraction P(20..f₁) / P(f₀..f₁); 1/f² gives 0.03, 1/f 0.19, a flat (EMG-like) 0.51
 *   lineNoiseDb          10·log10 of the mean PSD within ±1 Hz of 50 or 60 Hz over the median PSD
 *                        3-6 Hz away on both sides (0 when f + 6 Hz ≥ fs/2): is there a narrow peak?
 *   lineNoiseFraction    P(f ± 1 Hz) / (P(f ± 1 Hz) + P(f₀..f₁)): how much of the component it is.
 *                        Both are taken at the mains frequency (50 or 60 Hz) with the larger fraction.
 *                        Mains is present in nearly every component of a real recording, so the peak
 *                        alone says little; after a 40 Hz low-pass the fraction is tiny and the
 *                        criterion rarely fires, as it should (the features then hardly see mains).
 * Sub-scores in [0, 1] (1 = looks like the artifact), with ramp(x; a, b) = clamp((x − a)/(b − a), 0, 1):
 *   eye      = ramp(frontalFraction; 0.3, 0.6) · ramp(lowFrequencyFraction; 0.5, 0.75)
 *              (blinks and vertical eye movements: largest at Fp1/Fp2, power below 4 Hz; REFERENCES §8)
 *   muscle   = ramp(highFrequencyFraction; 0.3, 0.5) · (0.6 + 0.4·ramp(edgeFraction; 0.5, 0.8))
 *              (broadband power above 20 Hz, strongest at the scalp's edge)
 *   line     = ramp(lineNoiseFraction; 0.1, 0.3) · ramp(lineNoiseDb; 3, 10)
 *   focal    = ramp(maxChannelFraction; 0.35, 0.7) (an electrode artifact: a single-channel map)
 * plausibility p = max(0.05, Π_criteria (1 − 0.9·s)), in [0.05, 1]; penalty weight w = 1/p in [1, 20]:
 * a component that fully meets one artifact criterion costs 10× more trace norm per unit weight.
 * The ramp ends come from the idealised spectra and maps quoted above, chosen a priori (our
 * design, not fitted to any data set); they are parameters of `scoreComponent` for studies
 * with other montages.
 */
import { positionOf } from '../montage';
import { welchPsd } from '../tf/welch';
import { ParamError, ShapeError } from '../types';

/** What a component's plausibility was computed from, and each criterion's sub-score. */
export interface ComponentPlausibility {
  /** In [0.05, 1]; 1 = nothing artifact-like found. */
  plausibility: number;
  /** Penalty weight w_k = 1/plausibility (1 when the prior is switched off). */
  weight: number;
  subScores: { eye: number; muscle: number; line: number; focal: number };
  measures: {
    frontalFraction: number; edgeFraction: number; maxChannelFraction: number;
    lowFrequencyFraction: number; highFrequencyFraction: number; lineNoiseDb: number; lineNoiseFraction: number;
    /** Frequency of the PSD maximum within the analysed band, Hz. */
    peakFrequencyHz: number;
  };
}

/** A component's spectrum: one-sided PSD at the given frequencies. */
export interface ComponentSpectrum {
  frequenciesHz: Float64Array;
  psd: Float64Array;
}

/** The analysed band [f₀, f₁] (module comment) and the sampling rate. */
export interface PriorBand { lowHz: number; highHz: number; sampleRateHz: number }

const FRONTAL_DEG = 40;
const EDGE_THETA_DEG = 85;
const FPZ = { x: 0, y: 1, z: 0 };

/** clamp((x − a)/(b − a), 0, 1). */
export function ramp(x: number, a: number, b: number): number {
  return Math.min(1, Math.max(0, (x - a) / (b - a)));
}

/** The scalp-map measures of one mixing column (module comment). */
export function mapMeasures(map: ArrayLike<number>, channelNames: readonly string[]): {
  frontalFraction: number; edgeFraction: number; maxChannelFraction: number;
} {
  if (map.length !== channelNames.length) throw new ShapeError('map', `expected ${channelNames.length} values (one per channel), got ${map.length}`);
  let total = 0, frontal = 0, edge = 0, max = 0;
  for (let c = 0; c < map.length; c++) total += map[c]! ** 2;
  if (!(total > 0)) return { frontalFraction: 0, edgeFraction: 0, maxChannelFraction: 0 };
  channelNames.forEach((name, c) => {
    const e = map[c]! ** 2 / total;
    max = Math.max(max, e);
    const p = positionOf(name);
    if (p === undefined) return;
    const cosToFpz = p.x * FPZ.x + p.y * FPZ.y + p.z * FPZ.z;
    if (Math.acos(Math.min(1, Math.max(-1, cosToFpz))) * (180 / Math.PI) <= FRONTAL_DEG) frontal += e;
    if (p.thetaDeg >= EDGE_THETA_DEG) edge += e;
  });
  return { frontalFraction: frontal, edgeFraction: edge, maxChannelFraction: max };
}

/** The spectral measures of one component (module comment). */
export function spectrumMeasures(spec: ComponentSpectrum, band: PriorBand): {
  lowFrequencyFraction: number; highFrequencyFraction: number; lineNoiseDb: number; lineNoiseFraction: number;
  peakFrequencyHz: number;
} {
  const { frequenciesHz: f, psd } = spec;
  if (f.length !== psd.length) throw new ShapeError('spec.psd', `expected ${f.length} values, got ${psd.length}`);
  const f0 = Math.max(1, band.lowHz);
  const f1 = Math.min(45, band.highHz, 0.45 * band.sampleRateHz);
  if (!(f1 > f0)) throw new ParamError('band', `expected an analysable band above 1 Hz, got [${band.lowHz}, ${band.highHz}] Hz`);
  let total = 0, low = 0, high = 0, peak = 0, peakF = NaN;
  for (let k = 0; k < f.length; k++) {
    if (f[k]! < f0 || f[k]! > f1) continue;
    total += psd[k]!;
    if (f[k]! <= 4) low += psd[k]!;
    if (f[k]! >= 20) high += psd[k]!;
    if (psd[k]! > peak) { peak = psd[k]!; peakF = f[k]!; }
  }
  const frac = (v: number) => (total > 0 ? v / total : 0);
  let lineDb = 0, lineFraction = 0;
  for (const line of [50, 60]) {
    if (line + 6 >= band.sampleRateHz / 2) continue;
    const side: number[] = [];
    let near = 0, nNear = 0;
    for (let k = 0; k < f.length; k++) {
      const d = Math.abs(f[k]! - line);
      if (d <= 1) { near += psd[k]!; nNear++; } else if (d >= 3 && d <= 6) side.push(psd[k]!);
    }
    if (nNear === 0 || side.length === 0) continue;
    const fraction = near / (near + total);
    if (fraction < lineFraction) continue;
    lineFraction = fraction;
    const ref = median(side);
    lineDb = ref > 0 && near > 0 ? Math.max(0, 10 * Math.log10(near / nNear / ref)) : 0;
  }
  return { lowFrequencyFraction: frac(low), highFrequencyFraction: frac(high), lineNoiseDb: lineDb, lineNoiseFraction: lineFraction, peakFrequencyHz: peakF };
}

/**
 * Plausibility of one component from its map and spectrum (module comment for every formula).
 * @param map mixing column, one value per channel (µV per unit component)
 * @param enabled false: plausibility and weight 1 (the prior switched off), measures still reported
 */
export function scoreComponent(map: ArrayLike<number>, channelNames: readonly string[], spec: ComponentSpectrum,
                               band: PriorBand, enabled = true): ComponentPlausibility {
  const m = mapMeasures(map, channelNames);
  const s = spectrumMeasures(spec, band);
  const subScores = {
    eye: ramp(m.frontalFraction, 0.3, 0.6) * ramp(s.lowFrequencyFraction, 0.5, 0.75),
    muscle: ramp(s.highFrequencyFraction, 0.3, 0.5) * (0.6 + 0.4 * ramp(m.edgeFraction, 0.5, 0.8)),
    line: ramp(s.lineNoiseFraction, 0.1, 0.3) * ramp(s.lineNoiseDb, 3, 10),
    focal: ramp(m.maxChannelFraction, 0.35, 0.7),
  };
  let p = 1;
  for (const v of Object.values(subScores)) p *= 1 - 0.9 * v;
  const plausibility = enabled ? Math.max(0.05, p) : 1;
  return { plausibility, weight: 1 / plausibility, subScores, measures: { ...m, ...s } };
}

/**
 * Mean Welch PSD of a component over trials (per trial: 1 s Hann segments, 50 % overlap, shortened
 * to the trial when shorter; shared/tf/welch.ts), the spectrum the prior reads.
 * @param trials [trial][sample] activations of one component
 */
export function componentSpectrum(trials: readonly Float64Array[], sampleRateHz: number): ComponentSpectrum {
  if (trials.length === 0) throw new ShapeError('trials', 'expected at least one trial');
  const seg = Math.min(Math.round(sampleRateHz), trials[0]!.length);
  let acc: Float64Array | null = null;
  let freqs: Float64Array = new Float64Array(0);
  for (const x of trials) {
    const r = welchPsd(x, sampleRateHz, { segmentLength: seg });
    if (acc === null) { acc = new Float64Array(r.psd.length); freqs = r.frequenciesHz; }
    for (let k = 0; k < acc.length; k++) acc[k]! += r.psd[k]! / trials.length;
  }
  return { frequenciesHz: freqs, psd: acc! };
}

function median(v: number[]): number {
  const s = [...v].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 === 1 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2;
}
