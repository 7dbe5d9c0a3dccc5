import { ParamError } from '../types';

/**
 * A logarithmically spaced frequency grid, the usual axis of a wavelet time-frequency map:
 * f_i = lowHz · (highHz / lowHz)^(i / (count − 1)), i = 0 .. count − 1, so neighbouring
 * frequencies keep a constant ratio. This matches the geometric scale sets s_j = s0 · 2^(j·δj)
 * of Torrence & Compo 1998 (Bull Am Meteorol Soc 79(1):61-78, eq. 9-10 [numbers from memory]) and the log-spaced
 * frequency axes recommended by Cohen 2019 (NeuroImage 199:81-86).
 * The first and last entries are exactly `lowHz` and `highHz`; `count = 1` gives [lowHz].
 * @param lowHz lowest frequency, Hz (> 0)
 * @param highHz highest frequency, Hz (>= lowHz)
 * @param count number of frequencies (integer >= 1)
 * @returns [count] frequencies in Hz, increasing
 * @throws ParamError for non-positive or non-finite edges, highHz < lowHz, or a bad count
 */
export function logSpacedFrequencies(lowHz: number, highHz: number, count: number): Float64Array {
  if (!Number.isFinite(lowHz) || lowHz <= 0) throw new ParamError('lowHz', `expected a finite number > 0, got ${lowHz}`);
  if (!Number.isFinite(highHz) || highHz < lowHz) {
    throw new ParamError('highHz', `expected a finite number >= lowHz (${lowHz}), got ${highHz}`);
  }
  if (!Number.isInteger(count) || count < 1) throw new ParamError('count', `expected an integer >= 1, got ${count}`);
  const out = new Float64Array(count);
  out[0] = lowHz;
  if (count === 1) return out;
  const logRatio = Math.log(highHz / lowHz);
  for (let i = 1; i < count - 1; i++) out[i] = lowHz * Math.exp((logRatio * i) / (count - 1));
  out[count - 1] = highHz;
  return out;
}
