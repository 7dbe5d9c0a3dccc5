/**
 * Complex Morlet CWT execution on a precomputed plan (`createMorletPlan`): complex coefficients,
 * power |W|² and natural-log power, on the plan's output time grid.
 *
 * Method: Torrence & Compo 1998 (Bull Am Meteorol Soc 79(1):61-78) Fourier form, eq. 4:
 * W_n = (1/M) Σ_k x̂_k ψ̂_k e^{i2πkn/M}, with the n-cycle wavelet of Tallon-Baudry et al. 1997
 * (J Neurosci 17(2):722-734) and Cohen 2019 (NeuroImage 199:81-86); see `morlet-plan.ts`.
 *
 * Fast decimated inverse (exact). Only every D-th output sample is wanted, D = s·q with s the
 * largest power of two dividing D. For n = s·m, e^{i2πkn/M} = e^{i2πkm/L} with L = M/s, which
 * depends on k only through k mod L. Grouping the bins by their residue ρ = k mod L (spectral
 * folding: the DFT form of the aliasing relation for downsampling, e.g. Oppenheim & Schafer,
 * Discrete-Time Signal Processing, 3rd ed. 2010, ch. 4 [chapter from memory]):
 *   W_{s·m} = (1/M) Σ_{ρ<L} Z_ρ e^{i2πρm/L} = (1/s) · IFFT_L[Z]_m,   Z_ρ = Σ_{k ≡ ρ (mod L)} x̂_k ψ̂_k.
 * This is an identity, not an approximation: the complex W (hence power and phase) on the
 * decimated grid equals the full-length inverse FFT sampled every s points, for any bandwidth
 * (bands wider than L fold onto themselves; no baseband shift or power-invariance argument is
 * needed). ψ̂_k is a Gaussian around the centre frequency, so the sum over k only runs over the
 * band where ψ̂_k exceeds ~2e−16 of its peak (BAND_SIGMAS); dropping the rest changes W by less
 * than double-precision rounding. A grid offset r (first sample not a multiple of s) is handled
 * by loading the signal circularly shifted by r, and the odd factor q by taking every q-th
 * inverse sample. Cost per frequency: the band's multiply-adds plus one complex FFT of size
 * M/s instead of M; the forward real FFT of size M is shared by all frequencies. Power-of-two
 * decimations therefore run fastest; an odd decimation (q > 1, s = 1) is the full-length
 * computation. Tests check the identity against the full computation to 1e−10.
 *
 * Special inputs: an empty plan (nSamples 0 or no output columns) returns empty arrays; a
 * one-sample signal is one impulse (zero padding) or a constant (reflection); a constant signal
 * gives W ≈ 0 away from the edges (ψ̂(0) = 0), edge transients inside the cone of influence
 * with zero padding; NaN anywhere in x makes every output of that call NaN, because each
 * coefficient mixes all samples (±Infinity likewise gives NaN or infinite outputs). The input is
 * never modified.
 */
import { ShapeError } from '../types';
import type { MorletPlan } from './morlet-plan';

/** Complex CWT coefficients, frequency-major: element [j·nTimes + t] is frequency j, output column t. */
export interface ComplexTf {
  re: Float64Array; // [freq][time] flattened
  im: Float64Array; // [freq][time] flattened
}

/** Power below this floor (in the signal's squared units) is clamped before the logarithm in `cwtLogPower`. */
export const DEFAULT_LOG_POWER_FLOOR = 1e-20;

/**
 * Complex Morlet CWT of one signal on the plan's frequencies and output grid
 * (Torrence & Compo 1998 eq. 4, analytic Morlet, normalisation as planned).
 * @param x [nSamples] signal (e.g. µV); not modified
 * @returns re, im: [nFrequencies][nTimes] flattened frequency-major; in x's units for 'amplitude',
 *   and for 'unit-energy' scaled so that |W|² is in x's squared units (T&C eq. 6)
 * @throws ShapeError when x.length differs from plan.nSamples
 */
export function cwt(plan: MorletPlan, x: Float64Array): ComplexTf {
  checkInput(plan, x);
  const size = plan.nFrequencies * plan.nTimes;
  const re = new Float64Array(size);
  const im = new Float64Array(size);
  if (!forwardSpectrum(plan, x)) return { re, im };
  const { output } = plan.kernel;
  const { nT, first, step } = columns(plan);
  for (let j = 0; j < plan.nFrequencies; j++) {
    inverseRow(plan, j);
    for (let c = 0, o = first, d = j * nT; c < nT; c++, o += step, d++) {
      re[d] = output[o]!;
      im[d] = -output[o + 1]!;
    }
  }
  return { re, im };
}

/**
 * CWT power |W|² of one signal (the wavelet power spectrum of Torrence & Compo 1998).
 * With 'unit-energy', white noise of variance σ² has E|W|² = σ²; with 'amplitude', a sinusoid of
 * amplitude A at a planned frequency has |W|² = A².
 * @param x [nSamples] signal; not modified
 * @param out optional [nFrequencies·nTimes] destination, frequency-major
 * @returns [nFrequencies][nTimes] flattened power (x's units squared)
 * @throws ShapeError for a wrong x or out length
 */
export function cwtPower(plan: MorletPlan, x: Float64Array, out?: Float64Array): Float64Array {
  checkInput(plan, x);
  const dest = checkOut(plan, out);
  if (!forwardSpectrum(plan, x)) return dest;
  const { output } = plan.kernel;
  const { nT, first, step } = columns(plan);
  for (let j = 0; j < plan.nFrequencies; j++) {
    inverseRow(plan, j);
    for (let c = 0, o = first, d = j * nT; c < nT; c++, o += step, d++) {
      const re = output[o]!;
      const im = output[o + 1]!;
      dest[d] = re * re + im * im;
    }
  }
  return dest;
}

/**
 * Natural logarithm of CWT power, ln(max(|W|², floor)), the feature the decoder uses
 * (log power on a log-spaced grid; Torrence & Compo 1998 plot power on a log scale too).
 * NaN power stays NaN (it is not floored).
 * @param x [nSamples] signal; not modified
 * @param out optional [nFrequencies·nTimes] destination, frequency-major
 * @param floor smallest power before the log, in x's squared units (default 1e−20, ln = −46.05)
 * @returns [nFrequencies][nTimes] flattened ln power
 * @throws ShapeError for a wrong x or out length
 */
export function cwtLogPower(plan: MorletPlan, x: Float64Array, out?: Float64Array,
                            floor: number = DEFAULT_LOG_POWER_FLOOR): Float64Array {
  const dest = cwtPower(plan, x, out); // checks x and out
  for (let i = 0; i < dest.length; i++) {
    const pw = dest[i]!;
    dest[i] = Math.log(pw < floor ? floor : pw);
  }
  return dest;
}

function checkInput(plan: MorletPlan, x: Float64Array): void {
  if (x.length !== plan.nSamples) throw new ShapeError('x', `expected ${plan.nSamples} samples (the plan's nSamples), got ${x.length}`);
}

function checkOut(plan: MorletPlan, out: Float64Array | undefined): Float64Array {
  const size = plan.nFrequencies * plan.nTimes;
  if (out === undefined) return new Float64Array(size);
  if (out.length !== size) {
    throw new ShapeError('out', `expected [${plan.nFrequencies}][${plan.nTimes}] = ${size} values, got ${out.length}`);
  }
  return out;
}

// The kernel, in three steps: load with padding and one forward real FFT per signal; per
// frequency fold the band and run one short FFT; the callers read the requested columns.
// The inverse DFT runs as a forward FFT of the conjugate, IFFT_L(z) = conj(FFT_L(conj z))/L,
// with 1/L folded into the weights: `folded` holds conj(Z) and `output` holds conj(W) in the
// interleaved layout, so W = output_re − i·output_im at inverse sample m0 + q·c.

/** Loads x (padding, grid shift) and computes its spectrum; false when there is nothing to compute. */
function forwardSpectrum(plan: MorletPlan, x: Float64Array): boolean {
  if (plan.nTimes === 0 || plan.nSamples === 0) return false;
  const { padded, source, spectrum, forward } = plan.kernel;
  for (let p = 0; p < padded.length; p++) {
    const i = source[p]!;
    padded[p] = i >= 0 ? x[i]! : 0;
  }
  forward.realTransform(spectrum, padded);
  return true;
}

/** Interleaved offsets of the requested columns in `kernel.output`. */
function columns(plan: MorletPlan): { nT: number; first: number; step: number } {
  return { nT: plan.nTimes, first: 2 * plan.kernel.firstColumn, step: 2 * plan.kernel.columnStride };
}

/** Frequency row j: fold its band of the current spectrum and run the short FFT into kernel.output. */
function inverseRow(plan: MorletPlan, j: number): void {
  const k = plan.kernel;
  foldBand(k.folded, k.spectrum, k.weights, k.bandStart[j]!, k.bandLength[j]!, k.weightOffset[j]!, k.inverseSize);
  k.inverse.transform(k.output, k.folded);
}

// folded = conj(Z), Z_ρ = Σ_{k ≡ ρ (mod L)} x̂_k·w_k over the band (interleaved complex, [2L]).
// The first min(len, L) bins land on distinct residues and are assigned; later laps (bands wider
// than L) accumulate; residues the band never reaches are zeroed.
function foldBand(folded: Float64Array, spectrum: Float64Array, weights: Float64Array, start: number, len: number,
                  w0: number, l: number): void {
  if (len < l) folded.fill(0);
  let w = w0;
  let bin = 2 * start;
  let rho = start % l;
  const firstLap = Math.min(len, l);
  for (let done = 0; done < firstLap;) {
    const run = Math.min(firstLap - done, l - rho);
    for (let f = 2 * rho, end = 2 * (rho + run); f < end; f += 2, bin += 2, w++) {
      const wt = weights[w]!;
      folded[f] = spectrum[bin]! * wt;
      folded[f + 1] = -spectrum[bin + 1]! * wt;
    }
    done += run;
    rho = rho + run === l ? 0 : rho + run;
  }
  for (let left = len - firstLap; left > 0; rho = 0) {
    const run = Math.min(left, l - rho);
    for (let f = 2 * rho, end = 2 * (rho + run); f < end; f += 2, bin += 2, w++) {
      const wt = weights[w]!;
      folded[f] = folded[f]! + spectrum[bin]! * wt;
      folded[f + 1] = folded[f + 1]! - spectrum[bin + 1]! * wt;
    }
    left -= run;
  }
}
