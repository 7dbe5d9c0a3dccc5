/**
 * Welch's averaged-periodogram power spectral density (Welch 1967, "The use of fast Fourier
 * transform for the estimation of power spectra", IEEE Trans Audio Electroacoust 15(2):70-73),
 * with the conventions of SciPy's `scipy.signal.welch` defaults (Virtanen et al. 2020, SciPy 1.0,
 * Nat Methods 17:261-272): periodic Hann window, 256-sample segments (the whole signal if it is
 * shorter), 50 % overlap, constant (mean) detrend per segment, FFT length = segment length,
 * one-sided spectrum, density scaling 1/(fs·Σw²), mean over segments; trailing samples that do
 * not fill a segment are dropped.
 */
import { ParamError } from '../types';
import { createRealDft } from './dft';

/** Options of `welchPsd`; every field defaults to SciPy's `welch` default. */
export type WelchParams = {
  /** Samples per segment (nperseg), default 256, reduced to the signal length if longer. */
  segmentLength?: number;
  /** Samples shared by consecutive segments (noverlap), default floor(segmentLength / 2). */
  overlap?: number;
  /** Taper; only the periodic Hann window (SciPy's `get_window('hann', n)`) is offered. */
  window?: 'hann';
};

/** A one-sided PSD: psd[k] is the density at frequenciesHz[k] = k·fs/segmentLength. */
export interface WelchResult {
  frequenciesHz: Float64Array; // [floor(segmentLength/2) + 1]
  psd: Float64Array; // [floor(segmentLength/2) + 1], x's units squared per Hz (µV²/Hz)
}

/**
 * One-sided Welch PSD of a real signal (density, mean of Hann-windowed, mean-detrended,
 * overlapping segments), equal to `scipy.signal.welch(x, fs, nperseg=segmentLength,
 * noverlap=overlap)`. An empty signal gives empty arrays (as SciPy); NaN anywhere in a segment
 * makes every bin NaN. Any segment length works (Bluestein's FFT for non-powers of two).
 * @param x [nSamples] signal, not modified
 * @param sampleRateHz sampling rate, Hz
 * @throws ParamError for a bad rate, segment length, overlap or window
 */
export function welchPsd(x: Float64Array, sampleRateHz: number, params: WelchParams = {}): WelchResult {
  if (!Number.isFinite(sampleRateHz) || sampleRateHz <= 0) {
    throw new ParamError('sampleRateHz', `expected a finite number > 0, got ${sampleRateHz}`);
  }
  if ((params.window ?? 'hann') !== 'hann') throw new ParamError('window', `expected 'hann', got ${String(params.window)}`);
  const requested = params.segmentLength ?? 256;
  if (!Number.isInteger(requested) || requested < 1) throw new ParamError('segmentLength', `expected an integer >= 1, got ${requested}`);
  const n = x.length;
  if (n === 0) return { frequenciesHz: new Float64Array(0), psd: new Float64Array(0) };
  const seg = Math.min(requested, n);
  const overlap = params.overlap ?? Math.floor(seg / 2);
  if (!Number.isInteger(overlap) || overlap < 0 || overlap >= seg) {
    throw new ParamError('overlap', `expected an integer in [0, ${seg}), got ${overlap}`);
  }
  const window = seg === 1 ? Float64Array.of(1) : Float64Array.from({ length: seg }, (_, i) => 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / seg));
  let sumSq = 0;
  for (const w of window) sumSq += w * w;
  const step = seg - overlap;
  const count = Math.floor((n - overlap) / step);
  const bins = Math.floor(seg / 2) + 1;
  const dft = createRealDft(seg);
  const buf = new Float64Array(seg);
  const re = new Float64Array(bins);
  const im = new Float64Array(bins);
  const psd = new Float64Array(bins);
  for (let s = 0; s < count; s++) {
    const start = s * step;
    let mean = 0;
    for (let i = 0; i < seg; i++) mean += x[start + i]!;
    mean /= seg;
    for (let i = 0; i < seg; i++) buf[i] = (x[start + i]! - mean) * window[i]!;
    dft.transform(buf, re, im);
    for (let k = 0; k < bins; k++) psd[k] = psd[k]! + re[k]! * re[k]! + im[k]! * im[k]!;
  }
  const scale = 1 / (sampleRateHz * sumSq * count);
  // One-sided: double every bin that has a negative-frequency twin (not DC, not an even length's Nyquist).
  const lastDoubled = seg % 2 === 0 ? bins - 2 : bins - 1;
  for (let k = 0; k < bins; k++) psd[k] = psd[k]! * scale * (k >= 1 && k <= lastDoubled ? 2 : 1);
  const frequenciesHz = Float64Array.from({ length: bins }, (_, k) => (k * sampleRateHz) / seg);
  return { frequenciesHz, psd };
}
