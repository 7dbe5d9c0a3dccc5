/**
 * Complex Morlet continuous wavelet transform: the plan (everything that depends on the signal
 * length, the sampling rate and the frequency grid, computed once and reused for every epoch and
 * channel). The transform itself is in `cwt.ts`; the derivation of the fast decimated inverse is
 * written out there.
 *
 * Wavelet (Torrence & Compo 1998, "A practical guide to wavelet analysis", Bull Am Meteorol Soc
 * 79(1):61-78, Table 1 and eq. 4-6; Tallon-Baudry, Bertrand, Delpuech & Pernier 1997, J Neurosci
 * 17(2):722-734; Cohen 2019, "A better way to define and describe Morlet wavelets for
 * time-frequency analysis", NeuroImage 199:81-86): an n-cycle Morlet at centre frequency f has
 * the Gaussian envelope exp(−t²/(2σ_t²)) with σ_t = n/(2πf), spectral SD σ_f = 1/(2πσ_t) = f/n.
 * It is the T&C Morlet with scale s = σ_t and ω0 = n (peak angular frequency ω0/s = 2πf). We use
 * T&C's Fourier form, which is analytic (Heaviside H on the spectrum, so negative frequencies,
 * DC and the Nyquist bin are excluded):
 *   ψ̂(ω_k) = c · H(ω_k) · exp(−(σ_t ω_k − n)² / 2),  ω_k = 2πk·fs/M (k < M/2), M = FFT size,
 *   W_m = IFFT_k[ x̂_k · ψ̂*(ω_k) ]_m   (ψ̂ is real, so ψ̂* = ψ̂).
 * Normalisation constant c:
 *   - 'unit-energy' (T&C eq. 6): c = (2πσ_t·fs)^(1/2) · π^(−1/4), i.e. T&C's (2πs/δt)^(1/2)π^(−1/4).
 *     Each scaled wavelet has unit energy: white noise of variance σ² gives E|W|² = σ² at every
 *     frequency (Σ_k |ψ̂_k|² / M = 1), so power is in the signal's squared units (µV²).
 *   - 'amplitude': c = 2, the spectrum of a unit-area Gaussian envelope (peak 1 at f) times 2
 *     (the analytic-signal factor). A sinusoid of amplitude A at the centre frequency gives
 *     |W| = A (away from the edges), power A². Without the factor 2 it would be A/2
 *     (REFERENCES.md §1 row (b): 0.5 for A = 1; this mode returns 1.0).
 * Limits: the Heaviside cut leaves a spectral step of exp(−n²/2) of the peak at DC, and a
 * wavelet whose Gaussian reaches Nyquist is cut there too. Either step gives the wavelet a
 * slowly (1/t) decaying tail, so the result then depends on the FFT grid at about that level:
 * 1e−2 for n = 3, 3e−4 for n = 4, 4e−6 for n = 5, 2e−8 for n = 6, 2e−11 for n = 7; keep
 * f + 7σ_f below fs/2 for a grid-independent result. For n >= 7 well below Nyquist the plan's
 * output equals T&C's direct time-domain sum (their eq. 2) to ~1e−10.
 * FFT grid (part of the definition for few cycles): M = the next power of two >= N + h ('zero')
 * or N + 2h ('reflect'), h = ceil(SUPPORT_SIGMAS·max σ_t·fs); the signal sits at [0, N), the
 * reflection (if any) occupies h samples on each side circularly, zeros fill the rest.
 */
import FFT from 'fft.js';
import { ParamError } from '../types';

/** Normalisation of the wavelets; see the module comment. */
export type MorletNormalisation = 'unit-energy' | 'amplitude';

/**
 * How the signal is extended beyond its ends: 'zero' (zero padding, as T&C 1998 do before the FFT), or 'reflect'
 * (mirror without repeating the edge sample, NumPy's `np.pad(x, p, 'reflect')`: d c b | a b c d |
 * c b a, repeated for pads longer than the signal; a one-sample signal is extended as a constant).
 */
export type MorletPadding = 'zero' | 'reflect';

/** Output columns at samples firstSample + step·i, i = 0 .. count − 1 (sample 0 = first input sample). */
export type MorletTimeGrid = {
  firstSample: number;
  step: number;
  count: number;
};

/** Hyperparameters of a Morlet CWT plan. */
export type MorletParams = {
  /** Sampling rate of the signals, Hz. */
  sampleRateHz: number;
  /** Samples per signal; every call with this plan must pass exactly this many. */
  nSamples: number;
  /** Centre frequencies, Hz, each in (0, sampleRateHz/2); see `logSpacedFrequencies`. */
  frequenciesHz: ArrayLike<number>;
  /**
   * Cycles n per wavelet (σ_t = n/(2πf)): one value for all, or one per frequency. n >= 6 keeps
   * the wavelet admissible (T&C 1998 use ω0 = 6) and its DC leak below 2e−8.
   */
  cycles: number | ArrayLike<number>;
  normalisation: MorletNormalisation;
  padding: MorletPadding;
  /**
   * Output every k-th sample starting at sample 0 (default 1: every sample, ceil(nSamples/k)
   * columns), or an explicit grid. Power-of-two steps are the fastest (see `cwt.ts`).
   */
  decimation?: number | MorletTimeGrid;
};

/**
 * Precomputed FFT machinery and wavelet spectra. Opaque to callers: only `cwt.ts` reads it.
 * It owns scratch buffers, so one plan must not run two transforms at once (one plan per worker).
 */
export interface MorletKernel {
  readonly forward: FFT; // size fftSize
  readonly inverse: FFT; // size inverseSize (run forward on the conjugate: IFFT(z) = conj(FFT(conj z))/L)
  readonly inverseSize: number; // L = fftSize / subStep
  readonly subStep: number; // s: power of two dividing the output step
  readonly firstColumn: number; // m0: first output is inverse sample m0
  readonly columnStride: number; // q = step / s
  readonly source: Int32Array; // [fftSize] input sample loaded at each buffer position, −1 = zero
  readonly bandStart: Int32Array; // [freq] first DFT bin of the kept band
  readonly bandLength: Int32Array; // [freq]
  readonly weightOffset: Int32Array; // [freq] offset into weights
  readonly weights: Float64Array; // concatenated c·exp(−(σ_t ω_k − n)²/2)/M over each band (M = s·L)
  readonly padded: Float64Array; // [fftSize] scratch
  readonly spectrum: Float64Array; // [2·fftSize] scratch, interleaved complex
  readonly folded: Float64Array; // [2·inverseSize] scratch
  readonly output: Float64Array; // [2·inverseSize] scratch
}

/** A Morlet CWT plan: the validated parameters, per-frequency wavelet descriptors, output grid. */
export interface MorletPlan {
  readonly sampleRateHz: number;
  readonly nSamples: number;
  readonly nFrequencies: number;
  /** Output columns per frequency. */
  readonly nTimes: number;
  readonly frequenciesHz: Float64Array; // [freq]
  readonly cycles: Float64Array; // [freq]
  /** Envelope SD σ_t = n/(2πf), s (Tallon-Baudry et al. 1997). */
  readonly sigmaTS: Float64Array; // [freq]
  /** Spectral SD σ_f = f/n, Hz (Tallon-Baudry et al. 1997). */
  readonly sigmaFHz: Float64Array; // [freq]
  /** Full width at half maximum in time, 2√(2 ln 2)·σ_t, s (Cohen 2019). */
  readonly fwhmTS: Float64Array; // [freq]
  /** Full width at half maximum in frequency, 2√(2 ln 2)·σ_f, Hz (Cohen 2019). */
  readonly fwhmFHz: Float64Array; // [freq]
  readonly normalisation: MorletNormalisation;
  readonly padding: MorletPadding;
  readonly timeGrid: Readonly<MorletTimeGrid>;
  /** Input sample index of each output column. */
  readonly outputSamples: Float64Array; // [time]
  /** Time of each output column, s from the first input sample. */
  readonly outputTimesS: Float64Array; // [time]
  /** Forward FFT size M: the power of two >= nSamples + supportSamples ('zero') or nSamples + 2·supportSamples ('reflect'), at least 4. */
  readonly fftSize: number;
  /** Samples of wavelet half-support SUPPORT_SIGMAS·max σ_t·fs; the reflection length with 'reflect'. */
  readonly supportSamples: number;
  readonly kernel: MorletKernel;
}

/**
 * Wavelet half-support in envelope SDs, √(2 ln 10¹⁰) ≈ 6.79: beyond it the Gaussian envelope is
 * below 1e−10 of its peak. The FFT size leaves this much zero (or reflected) signal beyond each
 * end, so circular wrap-around can leak at most 1e−10 of the wavelet's peak weight from one end
 * of the record into the other; the leak is largest at the record ends (inside the cone of
 * influence, T&C 1998 §3g [section letter from memory]) and falls off as a Gaussian away from them.
 */
export const SUPPORT_SIGMAS = Math.sqrt(2 * Math.log(1e10));
/** Spectral band kept per wavelet, in SDs of (σ_t ω − n): bins beyond weigh < exp(−8.5²/2) ≈ 2e−16 of the peak. */
export const BAND_SIGMAS = 8.5;
/** Largest forward FFT a plan may allocate (2^23 points, 128 MiB of complex scratch). */
export const MAX_FFT_SIZE = 2 ** 23;

const FWHM_PER_SD = 2 * Math.sqrt(2 * Math.LN2);

/**
 * Builds a Morlet CWT plan: validates the parameters, chooses the FFT size, and precomputes the
 * wavelet spectra (Torrence & Compo 1998 Fourier form, see the module comment), the padding map
 * and the decimated-inverse layout used by `cwt`, `cwtPower` and `cwtLogPower`.
 * @throws ParamError naming the field for an out-of-range value (frequency outside (0, fs/2),
 *   cycles <= 0, a grid beyond the signal, an FFT larger than MAX_FFT_SIZE ...)
 */
export function createMorletPlan(params: MorletParams): MorletPlan {
  const { sampleRateHz: fs, nSamples: n, normalisation, padding } = params;
  if (!Number.isFinite(fs) || fs <= 0) throw new ParamError('sampleRateHz', `expected a finite number > 0, got ${fs}`);
  if (!Number.isInteger(n) || n < 0) throw new ParamError('nSamples', `expected an integer >= 0, got ${n}`);
  if (normalisation !== 'unit-energy' && normalisation !== 'amplitude') {
    throw new ParamError('normalisation', `expected 'unit-energy' or 'amplitude', got ${String(normalisation)}`);
  }
  if (padding !== 'zero' && padding !== 'reflect') throw new ParamError('padding', `expected 'zero' or 'reflect', got ${String(padding)}`);
  const frequenciesHz = Float64Array.from(params.frequenciesHz);
  const nF = frequenciesHz.length;
  if (nF === 0) throw new ParamError('frequenciesHz', 'expected at least one frequency, got none');
  frequenciesHz.forEach((f, j) => {
    if (!(f > 0 && f < fs / 2)) throw new ParamError('frequenciesHz', `[${j}] must lie in (0, ${fs / 2}) Hz, got ${f}`);
  });
  const cycles = expandCycles(params.cycles, nF);
  const sigmaTS = frequenciesHz.map((f, j) => cycles[j]! / (2 * Math.PI * f));
  const sigmaFHz = frequenciesHz.map((f, j) => f / cycles[j]!);
  const timeGrid = resolveGrid(params.decimation ?? 1, n);

  const supportSamples = Math.ceil(SUPPORT_SIGMAS * Math.max(...sigmaTS) * fs);
  const needed = n + (padding === 'zero' ? 1 : 2) * supportSamples;
  const fftSize = nextPowerOfTwo(Math.max(needed, 4));
  if (fftSize > MAX_FFT_SIZE) {
    throw new ParamError('nSamples', `signal plus wavelet support needs an FFT of ${fftSize} > ${MAX_FFT_SIZE} points`);
  }
  const outputSamples = new Float64Array(timeGrid.count).map((_, i) => timeGrid.firstSample + timeGrid.step * i);
  return {
    sampleRateHz: fs, nSamples: n, nFrequencies: nF, nTimes: timeGrid.count, frequenciesHz, cycles,
    sigmaTS, sigmaFHz, fwhmTS: sigmaTS.map((v) => FWHM_PER_SD * v), fwhmFHz: sigmaFHz.map((v) => FWHM_PER_SD * v),
    normalisation, padding, timeGrid, outputSamples, outputTimesS: outputSamples.map((v) => v / fs),
    fftSize, supportSamples,
    kernel: buildKernel(fs, n, frequenciesHz, cycles, sigmaTS, normalisation, padding, timeGrid, fftSize, supportSamples),
  };
}

/**
 * The full (untruncated) wavelet spectrum of frequency row `j` on the plan's DFT grid:
 * ψ̂(ω_k) = c·H(ω_k)·exp(−(σ_t ω_k − n)²/2) for k = 0 .. fftSize − 1 (T&C 1998 eq. 5-6 with
 * s = σ_t, ω0 = n; zero for k = 0 and k >= fftSize/2). Used for checks and plots; the transform
 * uses the same values restricted to the band where they exceed ~2e−16 of the peak.
 * @returns [fftSize] real spectrum values (dimensionless for 'amplitude', √samples for 'unit-energy')
 */
export function waveletSpectrum(plan: MorletPlan, j: number): Float64Array {
  if (!Number.isInteger(j) || j < 0 || j >= plan.nFrequencies) {
    throw new ParamError('j', `expected a frequency row in [0, ${plan.nFrequencies}), got ${j}`);
  }
  const m = plan.fftSize;
  const sigmaT = plan.sigmaTS[j]!;
  const nCyc = plan.cycles[j]!;
  const c = normalisationConstant(plan.normalisation, sigmaT, plan.sampleRateHz);
  const out = new Float64Array(m);
  const dOmega = (2 * Math.PI * plan.sampleRateHz) / m;
  for (let k = 1; k < m / 2; k++) {
    const u = sigmaT * dOmega * k - nCyc;
    out[k] = c * Math.exp(-0.5 * u * u);
  }
  return out;
}

function normalisationConstant(kind: MorletNormalisation, sigmaT: number, fs: number): number {
  return kind === 'amplitude' ? 2 : Math.sqrt(2 * Math.PI * sigmaT * fs) * Math.PI ** -0.25;
}

function expandCycles(cycles: number | ArrayLike<number>, nF: number): Float64Array {
  const out = typeof cycles === 'number' ? new Float64Array(nF).fill(cycles) : Float64Array.from(cycles);
  if (out.length !== nF) throw new ParamError('cycles', `expected one value or ${nF} (one per frequency), got ${out.length}`);
  out.forEach((c, j) => {
    if (!(Number.isFinite(c) && c > 0)) throw new ParamError('cycles', `[${j}] must be a finite number > 0, got ${c}`);
  });
  return out;
}

function resolveGrid(decimation: number | MorletTimeGrid, n: number): MorletTimeGrid {
  if (typeof decimation === 'number') {
    if (!Number.isInteger(decimation) || decimation < 1) {
      throw new ParamError('decimation', `expected an integer >= 1, got ${decimation}`);
    }
    return { firstSample: 0, step: decimation, count: Math.ceil(n / decimation) };
  }
  const { firstSample, step, count } = decimation;
  if (!Number.isInteger(firstSample) || firstSample < 0) {
    throw new ParamError('decimation.firstSample', `expected an integer >= 0, got ${firstSample}`);
  }
  if (!Number.isInteger(step) || step < 1) throw new ParamError('decimation.step', `expected an integer >= 1, got ${step}`);
  if (!Number.isInteger(count) || count < 0) throw new ParamError('decimation.count', `expected an integer >= 0, got ${count}`);
  if (count > 0 && firstSample + step * (count - 1) > n - 1) {
    throw new ParamError('decimation', `last column at sample ${firstSample + step * (count - 1)} lies beyond the signal (${n} samples)`);
  }
  return { firstSample, step, count };
}

function nextPowerOfTwo(v: number): number {
  let p = 1;
  while (p < v) p *= 2;
  return p;
}

/** Index into a signal of length n after even reflection without edge repeat (period 2(n − 1)). */
function reflectIndex(i: number, n: number): number {
  if (n === 1) return 0;
  const period = 2 * (n - 1);
  const k = ((i % period) + period) % period;
  return k < n ? k : period - k;
}

function buildKernel(fs: number, n: number, freqs: Float64Array, cycles: Float64Array, sigmaTS: Float64Array,
                     normalisation: MorletNormalisation, padding: MorletPadding, grid: MorletTimeGrid,
                     m: number, support: number): MorletKernel {
  // Output step = s·q with s the largest power of two dividing it (at most m/2, so the inverse has >= 2 points).
  let subStep = 1;
  while (grid.step % (subStep * 2) === 0 && subStep * 2 <= m / 2) subStep *= 2;
  const inverseSize = m / subStep;
  const shift = grid.firstSample % subStep;
  // Buffer position p holds the extended signal at index p + shift (circularly), so inverse sample mm is input sample shift + s·mm.
  const source = new Int32Array(m);
  for (let p = 0; p < m; p++) {
    const i = (p + shift) % m;
    if (i < n) source[p] = i;
    else if (padding === 'reflect' && n > 0 && i < n + support) source[p] = reflectIndex(i, n);
    else if (padding === 'reflect' && n > 0 && i >= m - support) source[p] = reflectIndex(i - m, n);
    else source[p] = -1;
  }
  const bandStart = new Int32Array(freqs.length);
  const bandLength = new Int32Array(freqs.length);
  const weightOffset = new Int32Array(freqs.length);
  const dOmega = (2 * Math.PI * fs) / m;
  let total = 0;
  for (let j = 0; j < freqs.length; j++) {
    const lo = Math.max(1, Math.ceil((cycles[j]! - BAND_SIGMAS) / (sigmaTS[j]! * dOmega)));
    const hi = Math.min(m / 2 - 1, Math.floor((cycles[j]! + BAND_SIGMAS) / (sigmaTS[j]! * dOmega)));
    bandStart[j] = lo;
    bandLength[j] = Math.max(0, hi - lo + 1);
    weightOffset[j] = total;
    total += bandLength[j]!;
  }
  const weights = new Float64Array(total);
  for (let j = 0; j < freqs.length; j++) {
    // 1/s from the folding identity and 1/L of the inverse DFT, which cwt.ts runs as a forward FFT of the conjugate.
    const c = normalisationConstant(normalisation, sigmaTS[j]!, fs) / m;
    for (let t = 0; t < bandLength[j]!; t++) {
      const u = sigmaTS[j]! * dOmega * (bandStart[j]! + t) - cycles[j]!;
      weights[weightOffset[j]! + t] = c * Math.exp(-0.5 * u * u);
    }
  }
  return {
    forward: new FFT(m), inverse: new FFT(inverseSize), inverseSize, subStep,
    firstColumn: (grid.firstSample - shift) / subStep, columnStride: grid.step / subStep,
    source, bandStart, bandLength, weightOffset, weights,
    padded: new Float64Array(m), spectrum: new Float64Array(2 * m),
    folded: new Float64Array(2 * inverseSize), output: new Float64Array(2 * inverseSize),
  };
}
