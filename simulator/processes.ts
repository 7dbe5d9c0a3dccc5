/**
 * Streaming noise shapers for the generator. Each keeps its filter memory in an explicit state
 * array and works in place on a chunk, so generating in chunks equals generating at once.
 */

/**
 * 1/f^chi noise by a cascade of first-order pole-zero sections (Keshner 1982, "1/f noise",
 * Proc IEEE 70(3):212-218; the discrete cascade as in Corsini & Saletti 1988, IEEE Trans Instrum
 * Meas 37(4):615-619 [from memory, unchecked]). Poles p_k are log-spaced from `lowHz` with ratio
 * R = 10^(1/3) (three per decade) and each zero sits at p_k * R^(chi/2): between a pole and its
 * zero the power falls 20 dB/decade, so the average slope is -10 chi dB/decade, i.e. power
 * ∝ 1/f^chi between `lowHz` and Nyquist (flat below `lowHz`). Sections are discretised by the
 * matched z-transform: y[n] = a y[n-1] + x[n] - b x[n-1], a = exp(-2π p/fs), b = exp(-2π z/fs).
 */
export interface PinkDesign {
  /** Pole coefficients per section. */
  a: Float64Array;
  /** Zero coefficients per section. */
  b: Float64Array;
  /** Multiplier giving the cascade unit output variance for unit-variance white input. */
  unitGain: number;
}

const RATIO = 10 ** (1 / 3);

export function designPink(exponent: number, sampleRateHz: number, lowHz = 0.1): PinkDesign {
  const a: number[] = [];
  const b: number[] = [];
  for (let p = lowHz; p < sampleRateHz / 2; p *= RATIO) {
    a.push(Math.exp(-2 * Math.PI * p / sampleRateHz));
    b.push(Math.exp(-2 * Math.PI * p * RATIO ** (exponent / 2) / sampleRateHz));
  }
  const design: PinkDesign = { a: Float64Array.from(a), b: Float64Array.from(b), unitGain: 1 };
  // Output variance for unit white input = sum of the squared impulse response; the slowest pole
  // decays by e after fs / (2π lowHz) samples, 12 of those leave < 1e-10 of the energy.
  const len = Math.ceil(12 * sampleRateHz / (2 * Math.PI * lowHz));
  const h = new Float64Array(len);
  h[0] = 1;
  pinkProcess(design, new Float64Array(2 * a.length), h, 0, len);
  let energy = 0;
  for (let i = 0; i < len; i++) energy += h[i]! * h[i]!;
  design.unitGain = 1 / Math.sqrt(energy);
  return design;
}

/** Filters buf[from..to) in place through the cascade; state = [xPrev, yPrev] per section (advanced). */
export function pinkProcess(d: PinkDesign, state: Float64Array, buf: Float64Array, from: number, to: number): void {
  for (let k = 0; k < d.a.length; k++) {
    const a = d.a[k]!;
    const b = d.b[k]!;
    let xp = state[2 * k]!;
    let yp = state[2 * k + 1]!;
    for (let i = from; i < to; i++) {
      const x = buf[i]!;
      yp = a * yp + x - b * xp;
      xp = x;
      buf[i] = yp;
    }
    state[2 * k] = xp;
    state[2 * k + 1] = yp;
  }
  const g = d.unitGain;
  for (let i = from; i < to; i++) buf[i] = buf[i]! * g;
}

/**
 * Narrow-band rhythm: a two-pole resonator (AR(2)) driven by white noise, x[n] = c1 x[n-1] +
 * c2 x[n-2] + g e[n], poles r e^{±iω}, ω = 2π f/fs, r = exp(-π bw/fs) for a -3 dB bandwidth of
 * about bw Hz. g gives unit stationary variance: for AR(2) var = g^2 (1 - c2) / ((1 + c2)
 * ((1 - c2)^2 - c1^2)) (Box & Jenkins, Time Series Analysis, AR(2) variance [from memory,
 * checked numerically in tests/simulator/processes.test.ts]). Its envelope waxes and wanes
 * like spontaneous alpha.
 */
export interface ResonatorDesign { c1: number; c2: number; g: number }

export function designResonator(frequencyHz: number, bandwidthHz: number, sampleRateHz: number): ResonatorDesign {
  const r = Math.exp(-Math.PI * bandwidthHz / sampleRateHz);
  const c1 = 2 * r * Math.cos(2 * Math.PI * frequencyHz / sampleRateHz);
  const c2 = -r * r;
  const varPerUnit = (1 - c2) / ((1 + c2) * ((1 - c2) ** 2 - c1 * c1));
  return { c1, c2, g: 1 / Math.sqrt(varPerUnit) };
}

/** In place over buf[from..to) (white input -> rhythm); state = [x[n-1], x[n-2]] (advanced). */
export function resonatorProcess(d: ResonatorDesign, state: Float64Array, buf: Float64Array, from: number, to: number): void {
  let x1 = state[0]!;
  let x2 = state[1]!;
  const { c1, c2, g } = d;
  for (let i = from; i < to; i++) {
    const x = c1 * x1 + c2 * x2 + g * buf[i]!;
    x2 = x1;
    x1 = x;
    buf[i] = x;
  }
  state[0] = x1;
  state[1] = x2;
}

/**
 * Second-order sections from the "Audio EQ Cookbook" (R. Bristow-Johnson), normalised so
 * a0 = 1: [b0, b1, b2, a1, a2]; Q = 1/sqrt(2) gives Butterworth sections.
 */
export type Biquad = [number, number, number, number, number];

export function biquad(kind: 'lowpass' | 'highpass', cornerHz: number, sampleRateHz: number, q = Math.SQRT1_2): Biquad {
  const w0 = 2 * Math.PI * cornerHz / sampleRateHz;
  const cos = Math.cos(w0);
  const alpha = Math.sin(w0) / (2 * q);
  const a0 = 1 + alpha;
  const b = kind === 'lowpass' ? [(1 - cos) / 2, 1 - cos, (1 - cos) / 2] : [(1 + cos) / 2, -(1 + cos), (1 + cos) / 2];
  return [b[0]! / a0, b[1]! / a0, b[2]! / a0, (-2 * cos) / a0, (1 - alpha) / a0];
}

/** Direct form II transposed, in place over buf[from..to); state = [s1, s2] (advanced). */
export function biquadProcess(c: Biquad, state: Float64Array, offset: number, buf: Float64Array, from: number, to: number): void {
  const [b0, b1, b2, a1, a2] = c;
  let s1 = state[offset]!;
  let s2 = state[offset + 1]!;
  for (let i = from; i < to; i++) {
    const x = buf[i]!;
    const y = b0 * x + s1;
    s1 = b1 * x - a1 * y + s2;
    s2 = b2 * x - a2 * y;
    buf[i] = y;
  }
  state[offset] = s1;
  state[offset + 1] = s2;
}
