import type { ChannelMajor } from '../types';
import { ParamError, ShapeError } from '../types';

/** Largest reduced up or down factor accepted (the FIR has 20·max(up, down) + 1 taps). */
const MAX_FACTOR = 2000;

const gcd = (a: number, b: number): number => (b === 0 ? a : gcd(b, a % b));

/**
 * The reduced rational factor up/down = toHz/fromHz. Rates with up to six decimals are exact.
 * @throws ParamError when a rate is not positive or the reduced factors exceed 2000
 */
export function resampleFactors(fromHz: number, toHz: number): { up: number; down: number } {
  if (!(Number.isFinite(fromHz) && fromHz > 0)) throw new ParamError('fromHz', `expected a positive rate, got ${fromHz}`);
  if (!(Number.isFinite(toHz) && toHz > 0)) throw new ParamError('toHz', `expected a positive rate, got ${toHz}`);
  let scale = 1;
  while (scale < 1e6 && (Math.abs(Math.round(fromHz * scale) - fromHz * scale) > 1e-9 * scale
    || Math.abs(Math.round(toHz * scale) - toHz * scale) > 1e-9 * scale)) scale *= 10;
  const a = Math.round(toHz * scale), b = Math.round(fromHz * scale);
  const g = gcd(a, b);
  const up = a / g, down = b / g;
  if (up > MAX_FACTOR || down > MAX_FACTOR) {
    throw new ParamError('toHz', `ratio ${toHz}/${fromHz} reduces to ${up}/${down}; factors above ${MAX_FACTOR} are not supported`);
  }
  return { up, down };
}

/** Modified Bessel function of the first kind, order 0, by its power series (x <= ~30). */
function besselI0(x: number): number {
  const q = (x / 2) * (x / 2);
  let term = 1, sum = 1;
  for (let k = 1; k < 500 && term > 1e-17 * sum; k++) {
    term *= q / (k * k);
    sum += term;
  }
  return sum;
}

/**
 * The anti-aliasing low-pass of SciPy's `resample_poly` with its default window: windowed-sinc
 * FIR (`firwin`) of 2·10·max(up, down) + 1 taps, cutoff 1/max(up, down) of the Nyquist rate,
 * Kaiser window β = 5 (Kaiser 1974), scaled to unit DC gain, then multiplied by `up`.
 */
export function resampleFilter(up: number, down: number): Float64Array {
  const maxRate = Math.max(up, down);
  const fc = 1 / maxRate;
  const halfLen = 10 * maxRate;
  const taps = 2 * halfLen + 1;
  const h = new Float64Array(taps);
  const i0Beta = besselI0(5);
  let sum = 0;
  for (let j = 0; j < taps; j++) {
    const m = j - halfLen;
    const arg = Math.PI * fc * m;
    const sinc = m === 0 ? 1 : Math.sin(arg) / arg;
    const r = m / halfLen;
    const w = besselI0(5 * Math.sqrt(Math.max(0, 1 - r * r))) / i0Beta;
    h[j] = fc * sinc * w;
    sum += h[j]!;
  }
  for (let j = 0; j < taps; j++) h[j] = (h[j]! / sum) * up;
  return h;
}

/**
 * Rational-factor polyphase resampling with anti-aliasing, equal to SciPy's
 * `resample_poly(x, up, down)` with its defaults (window ('kaiser', 5.0), zero padding outside
 * the signal; Crochiere & Rabiner 1983, Multirate Digital Signal Processing): conceptually insert
 * up − 1 zeros between samples, low-pass with {@link resampleFilter}, keep every down-th sample;
 * the filter is centred, so there is no delay. Output length ceil(n·up/down). Only the needed
 * products are computed (polyphase). Offline: the edges see zeros outside the signal, so the
 * first and last ~10 output samples of a signal with a large offset are attenuated.
 * @param x [channel][sample] at fromHz; not modified
 * @returns [channel][sample] at toHz (a copy when the rates are equal)
 * @throws ParamError for a non-positive rate or a ratio that does not reduce to factors <= 2000
 */
export function resample(x: ChannelMajor, fromHz: number, toHz: number): ChannelMajor {
  const { up, down } = resampleFactors(fromHz, toHz);
  const n = x.length > 0 ? x[0]!.length : 0;
  x.forEach((c, ch) => {
    if (c.length !== n) throw new ShapeError('x', `channel ${ch} has ${c.length} samples, channel 0 has ${n}`);
  });
  if (up === 1 && down === 1) return x.map((c) => c.slice());
  const h = resampleFilter(up, down);
  const halfLen = (h.length - 1) / 2;
  const nOut = Math.ceil((n * up) / down);
  return x.map((c) => {
    const y = new Float64Array(nOut);
    for (let k = 0; k < nOut; k++) {
      // Output k sits at position t = k·down + halfLen of the upsampled-and-filtered sequence:
      // y[k] = Σ_i x[i]·h[t − i·up] over 0 <= t − i·up < taps.
      const t = k * down + halfLen;
      const iLo = Math.max(0, Math.ceil((t - h.length + 1) / up));
      const iHi = Math.min(n - 1, Math.floor(t / up));
      let acc = 0;
      for (let i = iLo, j = t - iLo * up; i <= iHi; i++, j -= up) acc += c[i]! * h[j]!;
      y[k] = acc;
    }
    return y;
  });
}
