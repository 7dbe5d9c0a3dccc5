/**
 * Discrete Fourier transform of real signals of any length, on fft.js: power-of-two lengths use
 * its real radix-4 FFT directly, other lengths Bluestein's chirp-z algorithm (Bluestein 1970,
 * "A linear filtering approach to the computation of discrete Fourier transform", IEEE Trans
 * Audio Electroacoust 18(4):451-455; Rabiner, Schafer & Rader 1969), O(n log n) for every n.
 */
import FFT from 'fft.js';
import { ParamError, ShapeError } from '../types';

/** A reusable one-sided real DFT of fixed length n; owns scratch buffers (not re-entrant). */
export interface RealDft {
  readonly n: number;
  /**
   * X_k = Σ_t x_t e^{−i2πkt/n} for k = 0 .. floor(n/2) (the non-negative frequencies).
   * @param x [n] real input, not modified
   * @param re [floor(n/2) + 1] destination, real parts
   * @param im [floor(n/2) + 1] destination, imaginary parts
   */
  transform(x: ArrayLike<number>, re: Float64Array, im: Float64Array): void;
}

/**
 * Builds a real DFT of length n (integer >= 1).
 * @throws ParamError for a non-integer or n < 1
 */
export function createRealDft(n: number): RealDft {
  if (!Number.isInteger(n) || n < 1) throw new ParamError('n', `expected an integer >= 1, got ${n}`);
  const half = Math.floor(n / 2) + 1;
  const check = (x: ArrayLike<number>, re: Float64Array, im: Float64Array) => {
    if (x.length !== n) throw new ShapeError('x', `expected ${n} samples, got ${x.length}`);
    if (re.length !== half || im.length !== half) throw new ShapeError('re/im', `expected ${half} bins each, got ${re.length}/${im.length}`);
  };
  if (n === 1) return { n, transform: (x, re, im) => { check(x, re, im); re[0] = x[0]!; im[0] = 0; } };
  if ((n & (n - 1)) === 0) {
    const fft = new FFT(n);
    const input = new Float64Array(n);
    const out = new Float64Array(2 * n);
    return {
      n,
      transform(x, re, im) {
        check(x, re, im);
        for (let t = 0; t < n; t++) input[t] = x[t]!;
        fft.realTransform(out, input);
        for (let k = 0; k < half; k++) { re[k] = out[2 * k]!; im[k] = out[2 * k + 1]!; }
      },
    };
  }
  return bluestein(n, half, check);
}

// e^{−i2πkt/n} = w_k · w_t · conj(w_{k−t}) with the chirp w_m = e^{−iπm²/n}, so X = w ⊙ ((x ⊙ w) ∗ conj(w)):
// one circular convolution of length P >= 2n − 1 (power of two) by FFT.
function bluestein(n: number, half: number, check: (x: ArrayLike<number>, re: Float64Array, im: Float64Array) => void): RealDft {
  let p = 1;
  while (p < 2 * n - 1) p *= 2;
  const fft = new FFT(p);
  const chirpRe = new Float64Array(n);
  const chirpIm = new Float64Array(n);
  for (let m = 0; m < n; m++) {
    const angle = (Math.PI * ((m * m) % (2 * n))) / n; // m² mod 2n keeps the angle exact
    chirpRe[m] = Math.cos(angle);
    chirpIm[m] = -Math.sin(angle);
  }
  const kernel = new Float64Array(2 * p);
  for (let m = 0; m < n; m++) {
    kernel[2 * m] = chirpRe[m]!; kernel[2 * m + 1] = -chirpIm[m]!;
    if (m > 0) { kernel[2 * (p - m)] = chirpRe[m]!; kernel[2 * (p - m) + 1] = -chirpIm[m]!; }
  }
  const kernelHat = new Float64Array(2 * p);
  fft.transform(kernelHat, kernel);
  const a = new Float64Array(2 * p);
  const aHat = new Float64Array(2 * p);
  const conv = new Float64Array(2 * p);
  return {
    n,
    transform(x, re, im) {
      check(x, re, im);
      a.fill(0);
      for (let t = 0; t < n; t++) { a[2 * t] = x[t]! * chirpRe[t]!; a[2 * t + 1] = x[t]! * chirpIm[t]!; }
      fft.transform(aHat, a);
      for (let k = 0; k < p; k++) {
        const ar = aHat[2 * k]!; const ai = aHat[2 * k + 1]!;
        const br = kernelHat[2 * k]!; const bi = kernelHat[2 * k + 1]!;
        aHat[2 * k] = ar * br - ai * bi;
        aHat[2 * k + 1] = ar * bi + ai * br;
      }
      fft.inverseTransform(conv, aHat);
      for (let k = 0; k < half; k++) {
        const cr = conv[2 * k]!; const ci = conv[2 * k + 1]!;
        re[k] = cr * chirpRe[k]! - ci * chirpIm[k]!;
        im[k] = cr * chirpIm[k]! + ci * chirpRe[k]!;
      }
    },
  };
}
