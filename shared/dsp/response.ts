import { checkSos, type Sos } from './sos';

/**
 * Magnitude of the frequency response of a section cascade, |H(e^{jω})| with ω = 2π·f/fs:
 * the product over sections of |b0 + b1·e^{−jω} + b2·e^{−2jω}| / |1 + a1·e^{−jω} + a2·e^{−2jω}|
 * (what SciPy's `sosfreqz` evaluates).
 * @param freqsHz frequencies in Hz
 * @returns |H| per frequency (linear; 20·log10 for dB)
 */
export function sosMagnitude(sos: Sos, freqsHz: ArrayLike<number>, sampleRateHz: number): Float64Array {
  checkSos(sos);
  const out = new Float64Array(freqsHz.length);
  for (let i = 0; i < freqsHz.length; i++) {
    const w = (2 * Math.PI * freqsHz[i]!) / sampleRateHz;
    const c1 = Math.cos(w), s1 = Math.sin(w), c2 = Math.cos(2 * w), s2 = Math.sin(2 * w);
    let m = 1;
    for (const row of sos) {
      const [b0, b1, b2, , a1, a2] = row as [number, number, number, number, number, number];
      const nr = b0 + b1 * c1 + b2 * c2, ni = -(b1 * s1 + b2 * s2);
      const dr = 1 + a1 * c1 + a2 * c2, di = -(a1 * s1 + a2 * s2);
      m *= Math.hypot(nr, ni) / Math.hypot(dr, di);
    }
    out[i] = m;
  }
  return out;
}

/** {@link sosMagnitude} in decibels, 20·log10|H| (−Infinity at an exact zero). */
export function sosMagnitudeDb(sos: Sos, freqsHz: ArrayLike<number>, sampleRateHz: number): Float64Array {
  return sosMagnitude(sos, freqsHz, sampleRateHz).map((m) => 20 * Math.log10(m));
}
