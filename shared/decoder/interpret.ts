/**
 * Interpretation data of a frozen decoder, for the decoder detail page and reports.
 *
 * component-tf: per selected component its scalp map (mixing column, µV per unit component, with
 * the channel names), its F×T weight matrix, and the leading singular triplets
 * W_k = Σ_j σ_j u_j v_jᵀ: u_j over the frequency axis (a frequency profile) and v_j over the time
 * axis (a time course), as Tomioka & Müller 2010 read the rank-1 factors. Sign: u_j's
 * largest-magnitude entry is positive (v_j flips with it; σ u vᵀ is unchanged).
 *
 * Weights are a filter, not a pattern (Haufe et al. 2014, NeuroImage 87:96-110): W_k weighs each
 * log-power feature by its single-trial signal-to-noise against everything else the model sees,
 * so its peak need not be where the class difference is. Given the training epochs, each selected
 * component also gets its activation pattern (Haufe et al. 2014, eq. 6 for one decision value,
 * A = Cov(x, ŷ)/Var(ŷ)) in the space of the measured features, the binned Morlet log power x
 * (before the per-feature z-scoring, which belongs to the model, i.e. to the filter):
 *   A_k[f, t] = Σ_i (x_ik[f, t] − x̄_k[f, t]) (ŷ_i − ȳ) / Σ_i (ŷ_i − ȳ)²,
 * with ŷ_i the decoder's decision value on training trial i: how much the component's log power at
 * (f, t) moves per unit of decision value (positive: it grows towards classes[1]). Its leading
 * singular triplet gives the pattern's frequency profile and time course (same sign rule). Then
 * `frequencyProfile`, `timeCourse`, `peakFrequencyHz` and `peakTimeS` are the pattern's
 * (`profileSource: 'activation-pattern'`); without training epochs they are the weights'
 * (`'weights'`). The weights' own profile and peaks are always in the `weight*` fields.
 *
 * Band pattern: the scalp map `map` is the ICA mixing column, the component's pattern over the
 * whole band (for uncorrelated components it equals Σ_x w_k, Haufe et al. 2014, eq. 6, with w_k
 * the unmixing row). The decoder reads the component's power near peakFrequencyHz only, so given the
 * training epochs `bandMap` is the pattern of that band-limited activity, a_k = Σ_f w_k / (w_kᵀ Σ_f w_k),
 * with Σ_f = mean over trials and times of Re(c cᴴ), c the channels' complex Morlet coefficients at
 * that frequency (the decoder's own wavelet: same cycles and normalisation). This is how patterns of
 * band-specific spatial filters are read (CSP: Blankertz, Tomioka, Lemm, Kawanabe & Müller 2008,
 * IEEE Signal Process Mag 25(1):41-56; Haufe et al. 2014). Where ICA leaves a stationary rhythm mixed
 * with broadband background, the band pattern shows the rhythm the decoder actually reads; it
 * is dominated by whichever sources are strong at that frequency within the component.
 *
 * covariance: W = Σ_j μ_j e_j e_jᵀ (symmetric eigendecomposition of (W + Wᵀ)/2); per non-zero
 * μ_j the spatial filter Pᵀ e_j and, following Haufe et al. 2014 (NeuroImage 87:96-110), the
 * pattern (training mean covariance)·Pᵀ e_j, i.e. the artifact's patternBasis times e_j. Positive μ: more power along the filter favours classes[1].
 */
import { applyUnmixing, type FittedIca } from '../ica/ica';
import { svd } from '../linalg/svd';
import { symmetricEig } from '../linalg/symmetric-eig';
import { ShapeError, type Epochs } from '../types';
import type { ComponentTfModel, DecoderArtifact } from './artifact';
import { decodeF64, decodeRows } from './pipeline';
import { binnedLogPower, morletGrid } from './recipes/morlet-stage';
import { cwt } from '../tf/cwt';
import { createMorletPlan } from '../tf/morlet-plan';

/** One selected component of a component-tf decoder. */
export interface ComponentInterpretation {
  component: number;
  channelNames: string[];
  map: number[]; // [channel]
  plausibility: number | null;
  priorWeight: number;
  frequenciesHz: number[]; // [F]
  /** Bin centres, s from the cue. */
  timesS: number[]; // [T]
  weights: number[][]; // [F][T]
  weightNorm: number; // ‖W_k‖_F
  singularValues: number[];
  /** What the four fields below are read from (module comment). */
  profileSource: 'activation-pattern' | 'weights';
  /** u_1, v_1 of the activation pattern, or of W_k without training epochs (empty when zero). */
  frequencyProfile: number[];
  timeCourse: number[];
  /** argmax |u_1|, Hz, and argmax |v_1|, s from the cue (of the pattern when available). */
  peakFrequencyHz: number;
  peakTimeS: number;
  /** Leading singular vectors of the weights W_k themselves (a filter) and their argmax. */
  weightFrequencyProfile: number[];
  weightTimeCourse: number[];
  weightPeakFrequencyHz: number;
  weightPeakTimeS: number;
  /** Activation pattern A_k [F][T] (log power per unit decision value), null without training epochs. */
  activationPattern: number[][] | null;
  /** Leading singular value of A_k (0 without training epochs). */
  patternSingularValue: number;
  /**
   * Scalp pattern of the component's activity at peakFrequencyHz (module comment, "band pattern"), [channel],
   * µV per unit of the band-limited component; null without training epochs.
   */
  bandMap: number[] | null;
  /** The frequency bandMap is taken at, Hz (NaN without training epochs). */
  bandMapFrequencyHz: number;
}

/** One discriminative spatial direction of a covariance decoder. */
export interface SpatialPatternInterpretation {
  eigenvalue: number;
  favours: string;
  channelNames: string[];
  filter: number[]; // [channel]
  pattern: number[]; // [channel]
}

export type DecoderInterpretation =
  | { recipe: 'component-tf'; components: ComponentInterpretation[] }
  | { recipe: 'covariance'; spatialPatterns: SpatialPatternInterpretation[] };

/** Training epochs for activation patterns: pre-processed as the decoder's training saw them. */
export interface InterpretationTraining {
  epochs: Epochs; // [trial][channel][sample], the decoder's channel order and epoch length
}

/** Leading singular triplet of an F×T matrix with the sign rule and argmax peaks (module comment). */
function leadingTriplet(m: Float64Array, F: number, T: number, count: number, freqs: readonly number[], timesS: readonly number[]) {
  const d = svd(m, F, T);
  const top = d.s[0] ?? 0;
  const r = Math.min(count, d.s.filter((s) => top > 0 && s > 1e-12 * top).length);
  const u = Float64Array.from({ length: F }, (_, f) => (r > 0 ? d.u[f * d.k]! : 0));
  const v = Float64Array.from({ length: T }, (_, t) => (r > 0 ? d.v[t * d.k]! : 0));
  const sign = Math.sign(u.reduce((big, x) => (Math.abs(x) > Math.abs(big) ? x : big), 0)) || 1;
  const argmax = (x: Float64Array) => x.reduce((best, val, j) => (Math.abs(val) > Math.abs(x[best]!) ? j : best), 0);
  return {
    singularValues: Array.from(d.s.subarray(0, r)),
    profile: r > 0 ? Array.from(u, (x) => sign * x) : [],
    course: r > 0 ? Array.from(v, (x) => sign * x) : [],
    peakHz: r > 0 ? freqs[argmax(u)]! : NaN,
    peakS: r > 0 ? timesS[argmax(v)]! : NaN,
  };
}

/**
 * Activation patterns A_k = Cov(x_k, ŷ)/Var(ŷ) of the selected components on training epochs
 * (module comment; Haufe et al. 2014, NeuroImage 87:96-110), computed from the artifact alone:
 * unmixing, Morlet log power, z-scoring and weights exactly as predict.ts applies them.
 * @returns [selected] F·T row-major patterns, log power per unit decision value
 */
export function activationPatterns(a: DecoderArtifact, training: InterpretationTraining): Float64Array[] {
  const m = a.model as ComponentTfModel;
  if (m.kind !== 'component-tf') throw new ShapeError('artifact.model', `expected a component-tf model, got '${String(m.kind)}'`);
  const { epochs } = training;
  const n = epochs.length;
  if (n < 2) throw new ShapeError('training.epochs', `expected at least 2 trials, got ${n}`);
  const rows = decodeRows(m.unmixing, 'model.unmixing');
  const ica = { mean: decodeF64(m.mean, 'model.mean'), unmixing: rows, mixing: [] } as unknown as FittedIca;
  const grid = morletGrid({ sampleRateHz: a.sampleRateHz, nSamples: m.cwt.nSamples, lowHz: m.cwt.lowHz, highHz: m.cwt.highHz,
                            count: m.cwt.count, cycles: m.cwt.cycles, binS: m.cwt.binS });
  const size = m.blockShape.rows * m.blockShape.cols;
  if (grid.frequenciesHz.length * grid.nBins !== size) throw new ShapeError('model.blockShape', `expected ${grid.frequenciesHz.length}×${grid.nBins}`);
  const K = rows.length;
  const mu = decodeF64(m.featureMean, 'model.featureMean');
  const sd = decodeF64(m.featureScale, 'model.featureScale');
  const w = decodeF64(m.weights, 'model.weights');
  const x = new Float64Array(n * K * size); // [trial][selected][F·T] log power
  const y = new Float64Array(n);
  const scratch = new Float64Array(grid.frequenciesHz.length * grid.plan.nTimes);
  epochs.forEach((trial, i) => {
    trial.forEach((ch, c) => {
      if (ch.length !== m.cwt.nSamples) throw new ShapeError(`training.epochs[${i}][${c}]`, `expected ${m.cwt.nSamples} samples, got ${ch.length}`);
    });
    const acts = applyUnmixing(ica, trial);
    let z = m.bias;
    acts.forEach((act, k) => {
      const o = (i * K + k) * size;
      binnedLogPower(grid, act, x, o, scratch);
      for (let j = 0; j < size; j++) z += ((x[o + j]! - mu[k * size + j]!) / sd[k * size + j]!) * w[k * size + j]!;
    });
    y[i] = z;
  });
  let ym = 0;
  for (const v of y) ym += v / n;
  let vy = 0;
  for (const v of y) vy += (v - ym) ** 2;
  return Array.from({ length: K }, (_, k) => {
    const pat = new Float64Array(size);
    if (!(vy > 0)) return pat;
    const xm = new Float64Array(size);
    for (let i = 0; i < n; i++) for (let j = 0; j < size; j++) xm[j]! += x[(i * K + k) * size + j]! / n;
    for (let i = 0; i < n; i++) {
      const dy = (y[i]! - ym) / vy;
      for (let j = 0; j < size; j++) pat[j]! += (x[(i * K + k) * size + j]! - xm[j]!) * dy;
    }
    return pat;
  });
}

/**
 * Band patterns a_k = Σ_f w_k / (w_kᵀ Σ_f w_k) of the selected components (module comment), each at its own
 * frequency, from the training epochs.
 * @param frequenciesHz [selected] frequency per component, Hz (NaN: that component's pattern is all NaN)
 * @returns [selected][channel]
 */
export function bandPatterns(a: DecoderArtifact, training: InterpretationTraining, frequenciesHz: readonly number[]): Float64Array[] {
  const m = a.model as ComponentTfModel;
  if (m.kind !== 'component-tf') throw new ShapeError('artifact.model', `expected a component-tf model, got '${String(m.kind)}'`);
  const rows = decodeRows(m.unmixing, 'model.unmixing');
  if (frequenciesHz.length !== rows.length) throw new ShapeError('frequenciesHz', `expected ${rows.length} values (one per selected component), got ${frequenciesHz.length}`);
  const C = a.channelNames.length;
  const cov = new Map<number, Float64Array>();
  for (const f of new Set(frequenciesHz.filter((x) => Number.isFinite(x)))) {
    const plan = createMorletPlan({ sampleRateHz: a.sampleRateHz, nSamples: m.cwt.nSamples, frequenciesHz: [f], cycles: m.cwt.cycles,
                                    normalisation: 'unit-energy', padding: 'reflect', decimation: 2 });
    const s = new Float64Array(C * C);
    let count = 0;
    training.epochs.forEach((trial, i) => {
      if (trial.length !== C) throw new ShapeError(`training.epochs[${i}]`, `expected ${C} channels, got ${trial.length}`);
      const cs = trial.map((x) => cwt(plan, x));
      const T = cs[0]?.re.length ?? 0;
      for (let p = 0; p < C; p++) {
        for (let q = 0; q <= p; q++) {
          const rp = cs[p]!.re, ip = cs[p]!.im, rq = cs[q]!.re, iq = cs[q]!.im;
          let acc = 0;
          for (let t = 0; t < T; t++) acc += rp[t]! * rq[t]! + ip[t]! * iq[t]!;
          s[p * C + q]! += acc;
        }
      }
      count += T;
    });
    for (let p = 0; p < C; p++) for (let q = 0; q <= p; q++) { s[p * C + q]! /= count; s[q * C + p] = s[p * C + q]!; }
    cov.set(f, s);
  }
  return rows.map((w, k) => {
    const s = cov.get(frequenciesHz[k]!);
    if (s === undefined) return new Float64Array(C).fill(NaN);
    const out = new Float64Array(C);
    let q = 0;
    for (let p = 0; p < C; p++) {
      let acc = 0;
      for (let r = 0; r < C; r++) acc += s[p * C + r]! * w[r]!;
      out[p] = acc;
      q += w[p]! * acc;
    }
    return out.map((v) => (q > 0 ? v / q : NaN));
  });
}

/**
 * Interpretation data of an artifact (verified or not; it does not check the seal).
 * @param count singular triplets of W_k to report
 * @param training the training epochs: adds activation patterns and reads the profiles from them
 */
export function interpretDecoder(a: DecoderArtifact, count = 3, training?: InterpretationTraining): DecoderInterpretation {
  const m = a.model;
  if (m.kind === 'covariance') return { recipe: 'covariance', spatialPatterns: spatialPatterns(a, count) };
  const maps = decodeRows(m.maps, 'model.maps');
  const w = decodeF64(m.weights, 'model.weights');
  const { rows: F, cols: T } = m.blockShape;
  const binS = m.cwt.binS;
  const binSamples = Math.round(binS * a.sampleRateHz);
  const timesS = Array.from({ length: T }, (_, b) => a.epoch.tminS + (b * binSamples + binSamples / 2) / a.sampleRateHz);
  const freqs = m.cwt.frequenciesHz;
  const patterns = training === undefined || m.selected.length === 0 ? null : activationPatterns(a, training);
  const triplets = patterns?.map((pk) => leadingTriplet(pk, F, T, 1, freqs, timesS)) ?? null;
  const bands = training === undefined || triplets === null ? null : bandPatterns(a, training, triplets.map((t) => t.peakHz));
  const components = m.selected.map((k, i) => {
    const wk = w.subarray(i * F * T, (i + 1) * F * T);
    const wt = leadingTriplet(wk, F, T, count, freqs, timesS);
    const pk = patterns?.[i];
    const pt = triplets?.[i] ?? null;
    const shown = pt ?? wt;
    let norm = 0;
    for (const x of wk) norm += x * x;
    return {
      component: k, channelNames: [...a.channelNames], map: Array.from(maps[i]!),
      plausibility: m.plausibility[k] ?? null, priorWeight: m.priorWeights[k] ?? 1,
      frequenciesHz: [...freqs], timesS,
      weights: Array.from({ length: F }, (_, f) => Array.from(wk.subarray(f * T, (f + 1) * T))),
      weightNorm: Math.sqrt(norm), singularValues: wt.singularValues,
      profileSource: pt === null ? 'weights' as const : 'activation-pattern' as const,
      frequencyProfile: shown.profile, timeCourse: shown.course, peakFrequencyHz: shown.peakHz, peakTimeS: shown.peakS,
      weightFrequencyProfile: wt.profile, weightTimeCourse: wt.course, weightPeakFrequencyHz: wt.peakHz, weightPeakTimeS: wt.peakS,
      activationPattern: pk === undefined ? null : Array.from({ length: F }, (_, f) => Array.from(pk.subarray(f * T, (f + 1) * T))),
      patternSingularValue: pt?.singularValues[0] ?? 0,
      bandMap: bands === null ? null : Array.from(bands[i]!),
      bandMapFrequencyHz: pt?.peakHz ?? NaN,
    };
  });
  return { recipe: 'component-tf', components };
}

/** The covariance decoder's spatial filters and patterns, largest |μ| first (module comment). */
export function spatialPatterns(a: DecoderArtifact, count = Infinity): SpatialPatternInterpretation[] {
  const m = a.model;
  if (m.kind !== 'covariance') return [];
  const p = decodeRows(m.whitening, 'model.whitening');
  const w = decodeF64(m.weight, 'model.weight');
  const r = m.rank, c = a.channelNames.length;
  const sym = Float64Array.from({ length: r * r }, (_, idx) => 0.5 * (w[idx]! + w[(idx % r) * r + Math.floor(idx / r)]!));
  const { values, vectors } = symmetricEig(sym, r);
  const basis = decodeRows(m.patternBasis, 'model.patternBasis'); // [channel][r], the pattern basis
  const top = values.reduce((mx, v) => Math.max(mx, Math.abs(v)), 0);
  const order = Array.from(values.keys()).filter((j) => top > 0 && Math.abs(values[j]!) > 1e-10 * top)
    .sort((i, j) => Math.abs(values[j]!) - Math.abs(values[i]!)).slice(0, count);
  return order.map((j) => {
    const filter = new Float64Array(c), pattern = new Float64Array(c);
    for (let i = 0; i < r; i++) {
      const e = vectors[i * r + j]!;
      for (let ch = 0; ch < c; ch++) {
        filter[ch]! += p[i]![ch]! * e;
        pattern[ch]! += basis[ch]![i]! * e;
      }
    }
    return { eigenvalue: values[j]!, favours: values[j]! > 0 ? a.classes[1] : a.classes[0], channelNames: [...a.channelNames],
             filter: Array.from(filter), pattern: Array.from(pattern) };
  });
}
