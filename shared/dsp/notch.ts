import { ParamError } from '../types';
import type { Sos } from './sos';

/**
 * Second-order IIR notch at f0 with quality factor Q, SciPy's `iirnotch` design (Orfanidis,
 * Introduction to Signal Processing, 1996, §11.3, eqs. 11.3.4-11.3.6): w0 = 2·f0/fs,
 * bw = w0/Q, β = tan(π·bw/2), g = 1/(1+β); b = g·[1, −2cos(π·w0), 1], a = [1, −2g·cos(π·w0), 2g−1].
 * Zero gain at f0, unity gain at 0 Hz and Nyquist, −3 dB bandwidth ≈ f0/Q up to bilinear warping.
 * @param f0Hz notch frequency in Hz, 0 < f0Hz < sampleRateHz / 2
 * @param q quality factor f0 / bandwidth (> 0; 30 is common practice for mains)
 * @param sampleRateHz sampling rate in Hz
 * @returns one section [b0, b1, b2, 1, a1, a2]
 */
export function iirNotchSos(f0Hz: number, q: number, sampleRateHz: number): Sos {
  if (!(Number.isFinite(sampleRateHz) && sampleRateHz > 0)) {
    throw new ParamError('sampleRateHz', `expected a positive number, got ${sampleRateHz}`);
  }
  if (!(f0Hz > 0 && f0Hz < sampleRateHz / 2)) {
    throw new ParamError('f0Hz', `expected 0 < f0Hz < ${sampleRateHz / 2}, got ${f0Hz}`);
  }
  if (!(Number.isFinite(q) && q > 0)) throw new ParamError('q', `expected a positive number, got ${q}`);
  // Same operation order as scipy.signal.iirnotch (gb = 1/√2 is the −3 dB level).
  const w0 = (2 * f0Hz) / sampleRateHz;
  const bw = (w0 / q) * Math.PI;
  const gb = 1 / Math.sqrt(2);
  const beta = (Math.sqrt(1 - gb ** 2) / gb) * Math.tan(bw / 2);
  const gain = 1 / (1 + beta);
  const cosW0 = Math.cos(w0 * Math.PI);
  return [[gain, gain * (-2 * cosW0), gain, 1, -2 * gain * cosW0, 2 * gain - 1]];
}
