/**
 * Interpretation data of a frozen decoder, for the decoder detail page and reports.
 *
 * component-tf: per selected component its scalp map (mixing column, µV per unit component, with
 * the channel names), its F×T weight matrix, and the leading singular triplets
 * W_k = Σ_j σ_j u_j v_jᵀ: u_j over the frequency axis (a frequency profile) and v_j over the time
 * axis (a time course), as Tomioka & Müller 2010 read the rank-1 factors. Sign: u_j's
 * largest-magnitude entry is positive (v_j flips with it; σ u vᵀ is unchanged).
 * covariance: W = Σ_j μ_j e_j e_jᵀ (symmetric eigendecomposition of (W + Wᵀ)/2); per non-zero
 * μ_j the spatial filter Pᵀ e_j and, following Haufe et al. 2014 (NeuroImage 87:96-110), the
 * pattern (training mean covariance)·Pᵀ e_j, i.e. the artifact's patternBasis times e_j. Positive μ: more power along the filter favours classes[1].
 */
import { svd } from '../linalg/svd';
import { symmetricEig } from '../linalg/symmetric-eig';
import type { DecoderArtifact } from './artifact';
import { decodeF64, decodeRows } from './pipeline';

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
  /** u_1, v_1 (empty when W_k = 0). */
  frequencyProfile: number[];
  timeCourse: number[];
  peakFrequencyHz: number;
  peakTimeS: number;
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

/** Interpretation data of an artifact (verified or not; it does not check the seal). */
export function interpretDecoder(a: DecoderArtifact, count = 3): DecoderInterpretation {
  const m = a.model;
  if (m.kind === 'covariance') return { recipe: 'covariance', spatialPatterns: spatialPatterns(a, count) };
  const maps = decodeRows(m.maps, 'model.maps');
  const w = decodeF64(m.weights, 'model.weights');
  const { rows: F, cols: T } = m.blockShape;
  const binS = m.cwt.binS;
  const binSamples = Math.round(binS * a.sampleRateHz);
  const timesS = Array.from({ length: T }, (_, b) => a.epoch.tminS + (b * binSamples + binSamples / 2) / a.sampleRateHz);
  const components = m.selected.map((k, i) => {
    const wk = w.subarray(i * F * T, (i + 1) * F * T);
    const d = svd(wk, F, T);
    const top = d.s[0] ?? 0;
    const r = Math.min(count, d.s.filter((s) => top > 0 && s > 1e-12 * top).length);
    const u = Float64Array.from({ length: F }, (_, f) => (r > 0 ? d.u[f * d.k]! : 0));
    const v = Float64Array.from({ length: T }, (_, t) => (r > 0 ? d.v[t * d.k]! : 0));
    const sign = Math.sign(u.reduce((big, x) => (Math.abs(x) > Math.abs(big) ? x : big), 0)) || 1;
    const argmax = (x: Float64Array) => x.reduce((best, val, j) => (Math.abs(val) > Math.abs(x[best]!) ? j : best), 0);
    let norm = 0;
    for (const x of wk) norm += x * x;
    return {
      component: k, channelNames: [...a.channelNames], map: Array.from(maps[i]!),
      plausibility: m.plausibility[k] ?? null, priorWeight: m.priorWeights[k] ?? 1,
      frequenciesHz: [...m.cwt.frequenciesHz], timesS,
      weights: Array.from({ length: F }, (_, f) => Array.from(wk.subarray(f * T, (f + 1) * T))),
      weightNorm: Math.sqrt(norm), singularValues: Array.from(d.s.subarray(0, r)),
      frequencyProfile: r > 0 ? Array.from(u, (x) => sign * x) : [],
      timeCourse: r > 0 ? Array.from(v, (x) => sign * x) : [],
      peakFrequencyHz: r > 0 ? m.cwt.frequenciesHz[argmax(u)]! : NaN,
      peakTimeS: r > 0 ? timesS[argmax(v)]! : NaN,
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
