// Spectral estimates for the simulator's plausibility tests, written to match SciPy's
// signal.welch defaults and signal.periodogram(window='hann'); checked against
// tests/fixtures/simulator/spectrum_reference.json in spectrum.test.ts.
import FFT from 'fft.js';

/** Periodic Hann window of length n (SciPy get_window('hann', n)). */
function hann(n: number): Float64Array {
  return Float64Array.from({ length: n }, (_, i) => 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / n));
}

/**
 * Welch PSD: periodic Hann segments of `nperseg` (a power of two), 50 % overlap, mean removed per
 * segment, one-sided density (units^2/Hz), mean over segments.
 */
export function welch(x: ArrayLike<number>, fs: number, nperseg: number): { f: Float64Array; pxx: Float64Array } {
  const w = hann(nperseg);
  let s2 = 0;
  for (const v of w) s2 += v * v;
  const fft = new FFT(nperseg);
  const out = fft.createComplexArray() as number[];
  const seg = new Array<number>(nperseg);
  const half = nperseg / 2;
  const pxx = new Float64Array(half + 1);
  let count = 0;
  for (let start = 0; start + nperseg <= x.length; start += nperseg / 2) {
    let mean = 0;
    for (let i = 0; i < nperseg; i++) mean += x[start + i]!;
    mean /= nperseg;
    for (let i = 0; i < nperseg; i++) seg[i] = (x[start + i]! - mean) * w[i]!;
    fft.realTransform(out, seg);
    for (let k = 0; k <= half; k++) pxx[k] = pxx[k]! + out[2 * k]! ** 2 + out[2 * k + 1]! ** 2;
    count++;
  }
  const scale = 1 / (fs * s2 * count);
  for (let k = 0; k <= half; k++) pxx[k] = pxx[k]! * (k === 0 || k === half ? 1 : 2) * scale;
  return { f: Float64Array.from({ length: half + 1 }, (_, k) => (k * fs) / nperseg), pxx };
}

/**
 * Band power of one segment: Hann periodogram (one-sided density, mean removed) summed over the
 * bins with lo <= f <= hi, times the bin width. Direct DFT at those bins (any length).
 */
export function bandPower(x: ArrayLike<number>, fs: number, loHz: number, hiHz: number): number {
  const n = x.length;
  const w = hann(n);
  let s2 = 0;
  let mean = 0;
  for (let i = 0; i < n; i++) { s2 += w[i]! * w[i]!; mean += x[i]!; }
  mean /= n;
  let total = 0;
  for (let k = Math.ceil((loHz * n) / fs); k <= Math.floor((hiHz * n) / fs); k++) {
    let re = 0;
    let im = 0;
    for (let i = 0; i < n; i++) {
      const v = (x[i]! - mean) * w[i]!;
      const a = (-2 * Math.PI * k * i) / n;
      re += v * Math.cos(a);
      im += v * Math.sin(a);
    }
    const onesided = k === 0 || 2 * k === n ? 1 : 2;
    total += (onesided * (re * re + im * im)) / (fs * s2);
  }
  return (total * fs) / n;
}

/**
 * Averaged Hann periodogram (one-sided density, mean removed) of consecutive non-overlapping
 * segments of `segmentLength` samples, at the bins nearest to `freqsHz` (direct DFT, any length).
 */
export function periodogramAt(x: ArrayLike<number>, fs: number, segmentLength: number, freqsHz: number[]): number[] {
  const out = freqsHz.map(() => 0);
  let count = 0;
  for (let start = 0; start + segmentLength <= x.length; start += segmentLength) {
    const seg = Array.from({ length: segmentLength }, (_, i) => x[start + i]!);
    freqsHz.forEach((f, j) => {
      const bin = Math.round((f * segmentLength) / fs);
      const hz = (bin * fs) / segmentLength;
      out[j] = out[j]! + (bandPower(seg, fs, hz, hz) * segmentLength) / fs;
    });
    count++;
  }
  return out.map((v) => v / count);
}

/** Least-squares slope of log10(pxx) against log10(f) over lo <= f <= hi. */
export function logLogSlope(f: Float64Array, pxx: Float64Array, loHz: number, hiHz: number): number {
  const xs: number[] = [];
  const ys: number[] = [];
  f.forEach((fk, k) => { if (fk >= loHz && fk <= hiHz) { xs.push(Math.log10(fk)); ys.push(Math.log10(pxx[k]!)); } });
  const mx = xs.reduce((a, b) => a + b, 0) / xs.length;
  const my = ys.reduce((a, b) => a + b, 0) / ys.length;
  let num = 0;
  let den = 0;
  xs.forEach((xv, i) => { num += (xv - mx) * (ys[i]! - my); den += (xv - mx) ** 2; });
  return num / den;
}
