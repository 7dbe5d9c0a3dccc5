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
 *   lateralFrontalFraction Σ e_c over electrodes within 40° of F7 or of F8 (the outer canthi side:
 *                        F7/F8, AF7/AF8, FT7/FT8, F5/F6, Fp1/Fp2, T7/T8 ...), where the horizontal EOG is largest
 *   lateralAntisymmetry  with S_L = Σ a_c within 40° of F7 and S_R the same around F8:
 *                        min(|S_L|, |S_R|)/max(|S_L|, |S_R|) when S_L and S_R have opposite signs, else 0
 *                        (1 for a field that is equal and opposite on the two sides)
 *   edgeFraction         Σ e_c over electrodes with polar angle θ ≥ 85° (the Fpz-T7-Oz-T8 ring and
 *                        below, where frontalis, temporalis and neck muscles project); uniform ≈ 0.36
 *   maxChannelFraction   max_c e_c (a map living on one electrode); uniform 1/C
 *   neighbourRatio       mean of a_n / a_max over the 4 electrodes nearest (great circle) to the electrode
 *                        of the largest |a|: a smooth field gives clearly positive values, a single
 *                        electrode ≈ 0 (slightly negative after a common average reference)
 *   lowFrequencyFraction P(f₀..4 Hz) / P(f₀..f₁), with [f₀, f₁] = [max(1, band low), min(45, band high,
 *                        0.45·fs)]; 1/f gives 0.38 and 1/f² 0.77 on 1-40 Hz
 *   highFrequencyFraction P(20..f₁) / P(f₀..f₁); 1/f² gives 0.03, 1/f 0.19, a flat (EMG-like) 0.51
 *   highFrequencySlope   least-squares slope of log10 PSD against log10 f over [20, f₁ − 5] Hz (the top
 *                        5 Hz left out: the low-pass edge bends every spectrum there); NaN when that range
 *                        is narrower than 8 Hz. Cortical 1/f^χ gives −χ (χ ≈ 1-2: Pritchard 1992; He,
 *                        Zempel, Snyder & Raichle 2010, REFERENCES.md §8); EMG is broadband, flat or
 *                        rising from 20 Hz to well above 40 Hz (Goncharova, McFarland, Vaughan & Wolpaw
 *                        2003, Clin Neurophysiol 114:1580-1593), so a slope near or above 0
 *   lineNoiseDb          10·log10 of the mean PSD within ±1 Hz of 50 or 60 Hz over the median PSD
 *                        3-6 Hz away on both sides (0 when f + 6 Hz ≥ fs/2): is there a narrow peak?
 *   lineNoiseFraction    P(f ± 1 Hz) / (P(f ± 1 Hz) + P(f₀..f₁)): how much of the component it is.
 *                        Both are taken at the mains frequency (50 or 60 Hz) with the larger fraction.
 *                        Mains is present in nearly every component of a real recording, so the peak
 *                        alone says little; after a 40 Hz low-pass the fraction is tiny and the
 *                        criterion rarely fires, as it should (the features then hardly see mains).
 * (Croft & Barry 2000, Plöchl et al. 2012 and Goncharova et al. 2003 are cited from memory, unchecked.)
 * Sub-scores in [0, 1] (1 = looks like the artifact), with ramp(x; a, b) = clamp((x − a)/(b − a), 0, 1):
 *   eye      = ramp(frontalFraction; 0.3, 0.6) · ramp(lowFrequencyFraction; 0.5, 0.75)
 *              (blinks and vertical eye movements: largest at Fp1/Fp2, power below 4 Hz; REFERENCES §8)
 *   saccade  = ramp(lateralFrontalFraction; 0.3, 0.6) · ramp(lateralAntisymmetry; 0.3, 0.7)
 *              · ramp(lowFrequencyFraction; 0.4, 0.7)
 *              (horizontal eye movements: the corneo-retinal dipole turning left-right puts equal and
 *              opposite potentials at F7/F8 and the other sites near the outer canthi, and a step with
 *              a hold has a 1/f² spectrum (low fraction 0.77); 1/f-like or flatter spectra (≤ 0.38) are
 *              not eye movements. Horizontal EOG topography: Croft & Barry 2000, Neurophysiol Clin
 *              30:5-19; Plöchl, Ossandón & König 2012, Front Hum Neurosci 6:278)
 *   muscle   = max(ramp(highFrequencyFraction; 0.3, 0.5), ramp(highFrequencySlope; −1, 0))
 *              · (0.6 + 0.4·ramp(edgeFraction; 0.5, 0.8))
 *              (broadband power above 20 Hz, or a spectrum that stops falling above 20 Hz: the
 *              flattest cortical background, 1/f, gives slope −1 and 0, a flat EMG spectrum 1; EMG is
 *              strongest at the scalp's edge. A muscle component of an ICA on bursty EMG mixes the
 *              bursts with background, so its high-frequency fraction stays modest while its slope
 *              above 20 Hz already turns flat)
 *   line     = ramp(lineNoiseFraction; 0.1, 0.3) · ramp(lineNoiseDb; 3, 10)
 *   focal    = ramp(maxChannelFraction; 0.35, 0.7) · ramp(neighbourRatio; 0.2, 0.05)
 *              (an electrode artifact: most of the map on one electrode AND not on its neighbours. The
 *              second factor keeps a smooth cortical source from counting as focal on a sparse montage:
 *              on 32 channels a 22° source puts over 35 % of its energy on its nearest electrode, but
 *              its neighbours, 25-35° away, still carry a fifth or more of its peak; a popping electrode
 *              leaves its neighbours at crosstalk level, ≤ 5 % of its peak)
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
  subScores: { eye: number; saccade: number; muscle: number; line: number; focal: number };
  measures: MapMeasures & {
    lowFrequencyFraction: number; highFrequencyFraction: number; highFrequencySlope: number;
    lineNoiseDb: number; lineNoiseFraction: number;
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
const LATERAL_DEG = 40;
const EDGE_THETA_DEG = 85;
const NEIGHBOURS = 4;
const FPZ = { x: 0, y: 1, z: 0 };

/** The scalp-map measures of the module comment. */
export interface MapMeasures {
  frontalFraction: number; lateralFrontalFraction: number; lateralAntisymmetry: number;
  edgeFraction: number; maxChannelFraction: number; neighbourRatio: number;
}

type Point = { x: number; y: number; z: number };
function angleDeg(p: Point, q: Point): number {
  return Math.acos(Math.min(1, Math.max(-1, p.x * q.x + p.y * q.y + p.z * q.z))) * (180 / Math.PI);
}

/** clamp((x − a)/(b − a), 0, 1). */
export function ramp(x: number, a: number, b: number): number {
  return Math.min(1, Math.max(0, (x - a) / (b - a)));
}

/** The scalp-map measures of one mixing column (module comment). */
export function mapMeasures(map: ArrayLike<number>, channelNames: readonly string[]): MapMeasures {
  if (map.length !== channelNames.length) throw new ShapeError('map', `expected ${channelNames.length} values (one per channel), got ${map.length}`);
  let total = 0, frontal = 0, lateral = 0, edge = 0, max = 0, sumL = 0, sumR = 0, peak = -1;
  for (let c = 0; c < map.length; c++) total += map[c]! ** 2;
  if (!(total > 0)) return { frontalFraction: 0, lateralFrontalFraction: 0, lateralAntisymmetry: 0, edgeFraction: 0, maxChannelFraction: 0, neighbourRatio: 0 };
  const f7 = positionOf('F7')!, f8 = positionOf('F8')!;
  const positions = channelNames.map((name) => positionOf(name));
  channelNames.forEach((_, c) => {
    const e = map[c]! ** 2 / total;
    if (e > max) { max = e; peak = c; }
    const p = positions[c];
    if (p === undefined) return;
    if (angleDeg(p, FPZ) <= FRONTAL_DEG) frontal += e;
    const nearL = angleDeg(p, f7) <= LATERAL_DEG, nearR = angleDeg(p, f8) <= LATERAL_DEG;
    if (nearL || nearR) lateral += e;
    if (nearL) sumL += map[c]!;
    if (nearR) sumR += map[c]!;
    if (p.thetaDeg >= EDGE_THETA_DEG) edge += e;
  });
  const big = Math.max(Math.abs(sumL), Math.abs(sumR));
  const antisymmetry = sumL * sumR < 0 && big > 0 ? Math.min(Math.abs(sumL), Math.abs(sumR)) / big : 0;
  // Neighbours of the peak electrode (no position: ratio 0, i.e. no evidence of a smooth field).
  let neighbourRatio = 0;
  const pp = peak >= 0 ? positions[peak] : undefined;
  if (pp !== undefined) {
    const near = positions.flatMap((p, c) => (p !== undefined && c !== peak ? [{ c, d: angleDeg(p, pp) }] : []))
      .sort((x, y) => x.d - y.d).slice(0, NEIGHBOURS);
    if (near.length > 0) neighbourRatio = near.reduce((acc, { c }) => acc + map[c]! / map[peak]!, 0) / near.length;
  }
  return { frontalFraction: frontal, lateralFrontalFraction: lateral, lateralAntisymmetry: antisymmetry, edgeFraction: edge,
           maxChannelFraction: max, neighbourRatio };
}

/** The spectral measures of one component (module comment). */
export function spectrumMeasures(spec: ComponentSpectrum, band: PriorBand): {
  lowFrequencyFraction: number; highFrequencyFraction: number; highFrequencySlope: number; lineNoiseDb: number; lineNoiseFraction: number;
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
  const highFrequencySlope = logLogSlope(f, psd, 20, f1 - 5);
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
  return { lowFrequencyFraction: frac(low), highFrequencyFraction: frac(high), highFrequencySlope, lineNoiseDb: lineDb,
           lineNoiseFraction: lineFraction, peakFrequencyHz: peakF };
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
  const slopeScore = Number.isNaN(s.highFrequencySlope) ? 0 : ramp(s.highFrequencySlope, -1, 0);
  const subScores = {
    eye: ramp(m.frontalFraction, 0.3, 0.6) * ramp(s.lowFrequencyFraction, 0.5, 0.75),
    saccade: ramp(m.lateralFrontalFraction, 0.3, 0.6) * ramp(m.lateralAntisymmetry, 0.3, 0.7) * ramp(s.lowFrequencyFraction, 0.4, 0.7),
    muscle: Math.max(ramp(s.highFrequencyFraction, 0.3, 0.5), slopeScore) * (0.6 + 0.4 * ramp(m.edgeFraction, 0.5, 0.8)),
    line: ramp(s.lineNoiseFraction, 0.1, 0.3) * ramp(s.lineNoiseDb, 3, 10),
    focal: ramp(m.maxChannelFraction, 0.35, 0.7) * ramp(m.neighbourRatio, 0.2, 0.05),
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

/**
 * Least-squares slope of log10 psd against log10 f over the bins in [lo, hi] Hz (module comment:
 * highFrequencySlope); NaN when hi − lo < 8 Hz, fewer than 3 bins fall inside, or a bin has no power.
 */
export function logLogSlope(f: Float64Array, psd: Float64Array, lo: number, hi: number): number {
  if (!(hi - lo >= 8)) return NaN;
  const xs: number[] = [], ys: number[] = [];
  for (let k = 0; k < f.length; k++) {
    if (f[k]! < lo || f[k]! > hi) continue;
    if (!(psd[k]! > 0)) return NaN;
    xs.push(Math.log10(f[k]!));
    ys.push(Math.log10(psd[k]!));
  }
  if (xs.length < 3) return NaN;
  const mx = xs.reduce((a, b) => a + b, 0) / xs.length, my = ys.reduce((a, b) => a + b, 0) / ys.length;
  let sxy = 0, sxx = 0;
  xs.forEach((x, i) => { sxy += (x - mx) * (ys[i]! - my); sxx += (x - mx) ** 2; });
  return sxy / sxx;
}

function median(v: number[]): number {
  const s = [...v].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 === 1 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2;
}
