import { ParamError } from '../types';
import type { FilterKind, Sos } from './sos';
import { bilinear, buttap, lp2bp, lp2bs, lp2hp, lp2lp, zpk2sos } from './zpk';

export type { FilterKind, Sos } from './sos';

const KINDS: readonly FilterKind[] = ['lowpass', 'highpass', 'bandpass', 'bandstop'];

/**
 * Butterworth design as second-order sections (Butterworth 1930, "On the theory of filter
 * amplifiers", Wireless Engineer 7:536-541): analog prototype, frequency transformation, bilinear
 * transform with pre-warped edges Ω = 2·fs·tan(π·f/fs) so the digital −3.0103 dB points land
 * exactly on the requested edges (Oppenheim & Schafer 2010, §7.1), then poles and zeros paired
 * into sections as SciPy's `zpk2sos` does ('nearest': the pole closest to the unit circle goes
 * last, with its nearest zero). Coefficients match `scipy.signal.butter(order, edges,
 * btype=kind, fs=sampleRateHz, output='sos')` row for row (tests/fixtures/dsp/butter_sos.json).
 * Band-pass and band-stop of order N have 2N poles, hence N sections; low/high-pass of order N
 * have ceil(N/2) sections.
 * @param order filter order N >= 1 (integer)
 * @param edgesHz one edge in Hz for low/high-pass, [low, high] in Hz for band-pass/stop; every
 *   edge strictly between 0 and sampleRateHz / 2
 * @param sampleRateHz sampling rate in Hz
 * @returns one row per section: [b0, b1, b2, 1, a1, a2]
 * @throws ParamError naming the argument when it is out of range
 */
export function butterSos(order: number, edgesHz: number | [number, number],
                          kind: FilterKind, sampleRateHz: number): Sos {
  if (!Number.isInteger(order) || order < 1) throw new ParamError('order', `expected an integer >= 1, got ${order}`);
  if (!KINDS.includes(kind)) throw new ParamError('kind', `expected one of ${KINDS.join(', ')}, got ${String(kind)}`);
  if (!(Number.isFinite(sampleRateHz) && sampleRateHz > 0)) {
    throw new ParamError('sampleRateHz', `expected a positive number, got ${sampleRateHz}`);
  }
  const band = kind === 'bandpass' || kind === 'bandstop';
  const edges = typeof edgesHz === 'number' ? [edgesHz] : [...edgesHz];
  if (edges.length !== (band ? 2 : 1)) {
    throw new ParamError('edgesHz', `${kind} needs ${band ? 'two edges [low, high]' : 'one edge'}, got ${edges.length}`);
  }
  const nyquist = sampleRateHz / 2;
  for (const f of edges) {
    if (!(f > 0 && f < nyquist)) throw new ParamError('edgesHz', `edges must lie in (0, ${nyquist}) Hz, got ${f}`);
  }
  if (band && !(edges[0]! < edges[1]!)) throw new ParamError('edgesHz', `expected low < high, got [${edges.join(', ')}]`);

  // Normalised to Nyquist, then pre-warped for the bilinear transform at the internal rate fs = 2
  // (SciPy's iirfilter: warped = 2·fs·tan(π·Wn/fs)).
  const fs = 2;
  const warped = edges.map((f) => 2 * fs * Math.tan((Math.PI * ((2 * f) / sampleRateHz)) / fs));
  const proto = buttap(order);
  let analog;
  if (kind === 'lowpass') analog = lp2lp(proto, warped[0]!);
  else if (kind === 'highpass') analog = lp2hp(proto, warped[0]!);
  else {
    const bw = warped[1]! - warped[0]!;
    const wo = Math.sqrt(warped[0]! * warped[1]!);
    analog = kind === 'bandpass' ? lp2bp(proto, wo, bw) : lp2bs(proto, wo, bw);
  }
  return zpk2sos(bilinear(analog, fs));
}
