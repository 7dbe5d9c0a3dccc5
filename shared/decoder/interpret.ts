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
 * A = Cov(x, ŷ)/Var(ŷ)) in the space of the measured quantity, the binned Morlet power x = exp(log
 * power feature) (before the per-feature z-scoring, which belongs to the model, i.e. to the filter):
 *   A_k[f, t] = Σ_i (x_ik[f, t] − x̄_k[f, t]) (ŷ_i − ȳ) / Σ_i (ŷ_i − ȳ)²,
 * with ŷ_i the decoder's decision value on training trial i: how much the component's power at
 * (f, t) moves per unit of decision value (positive: it grows towards classes[1]). Power, not log
 * power: an ERD/ERS is a change of band power (Pfurtscheller & Lopes da Silva 1999), and power
 * adds over sources, so class-blind sources mixed into the component cancel in the covariance and
 * the pattern peaks where the effect's power is. In log power (a relative change) the same
 * pattern peaks where the effect is the largest fraction of the component's power, which shifts
 * with whatever class-blind power (alpha, background) the component carries at each frequency;
 * `activationPatterns(trainingFeatures(a, training), 'log-power')` (interpret-patterns.ts) gives that one. Its leading
 * singular triplet gives the pattern's frequency profile and time course (same sign rule). Then
 * `frequencyProfile`, `timeCourse`, `peakFrequencyHz` and `peakTimeS` are the pattern's
 * (`profileSource: 'activation-pattern'`); without training epochs they are the weights'
 * (`'weights'`). The weights' own profile and peaks are always in the `weight*` fields.
 *
 * Band pattern: the scalp map `map` is the ICA mixing column, the component's pattern over the
 * whole band and over everything it carries (for uncorrelated components it equals Σ_x w_k, Haufe
 * et al. 2014, eq. 6, w_k the unmixing row). Given the training epochs, `bandMap` is the pattern of
 * the component's activity that the decision follows, at the activation pattern's peak frequency f:
 * per channel c, a_k[c] = Cov(g_c, ŷ)/Var(ŷ) with g_c = mean_t Re(x_c(t)·conj(s_k(t))), the
 * trial's cross-spectrum between the channel and the component (complex Morlet coefficients x_c, and
 * s_k = w_kᵀx, with the decoder's wavelet at f). With independent sources of powers P_j(f) and
 * patterns a_j, g = Σ_j P_j (w_kᵀa_j) a_j, so a_k = Σ_j Cov(P_j, ŷ)/Var(ŷ)·(w_kᵀa_j)·a_j: sources whose
 * power does not follow the decision (background, alpha) drop out, and the map is that of the
 * source(s) whose band power the decoder reads through this component: Haufe's pattern of the
 * channels' cross-spectra with the component. It answers "which source does this component's
 * decision-relevant power come from" where the ICA map cannot: ICA (non-Gaussianity) leaves a
 * stationary Gaussian rhythm mixed with background sources. `bandMapFrequencyHz` is f.
 *
 * covariance: W = Σ_j μ_j e_j e_jᵀ (symmetric eigendecomposition of (W + Wᵀ)/2); per non-zero
 * μ_j the spatial filter Pᵀ e_j and, following Haufe et al. 2014 (NeuroImage 87:96-110), the
 * pattern (training mean covariance)·Pᵀ e_j, i.e. the artifact's patternBasis times e_j. Positive μ: more power along the filter favours classes[1].
 */
import { svd } from '../linalg/svd';
import { symmetricEig } from '../linalg/symmetric-eig';
import type { DecoderArtifact } from './artifact';
import { activationPatterns, bandPatterns, trainingFeatures, type InterpretationTraining } from './interpret-patterns';
import { decodeF64, decodeRows } from './pipeline';

export type { InterpretationTraining } from './interpret-patterns';

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
  /** Activation pattern A_k [F][T] (power, component units², per unit decision value), null without training epochs. */
  activationPattern: number[][] | null;
  /** Leading singular value of A_k (0 without training epochs). */
  patternSingularValue: number;
  /**
   * Band pattern at bandMapFrequencyHz (module comment): covariance of each channel's cross-spectrum with the
   * component with the decision value, [channel], µV·(component unit) per unit decision value; null without training epochs.
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
  const feats = training === undefined || m.selected.length === 0 ? null : trainingFeatures(a, training);
  const patterns = feats === null ? null : activationPatterns(feats);
  const triplets = patterns?.map((pk) => leadingTriplet(pk, F, T, 1, freqs, timesS)) ?? null;
  const bands = training === undefined || feats === null || triplets === null ? null
    : bandPatterns(a, training, feats, triplets.map((t) => t.peakHz));
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
