import FFT from 'fft.js';
import { describe, expect, it } from 'vitest';
import { ParamError, ShapeError } from '../../../shared/types';
import { cwt, cwtLogPower, cwtPower, DEFAULT_LOG_POWER_FLOOR } from '../../../shared/tf/cwt';
import { createMorletPlan, waveletSpectrum, type MorletParams } from '../../../shared/tf/morlet-plan';
import { logSpacedFrequencies } from '../../../shared/tf/frequencies';
import { expectAllClose } from '../../helpers/all-close';

// Deterministic test signal: a linear congruential generator (Numerical Recipes constants), uniform in [-1, 1).
function noise(n: number, seed: number): Float64Array {
  let state = seed >>> 0;
  return Float64Array.from({ length: n }, () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 2 ** 31 - 1;
  });
}

function maxAbs(values: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < values.length; i++) m = Math.max(m, Math.abs(values[i]!));
  return m;
}

const base: MorletParams = {
  sampleRateHz: 160, nSamples: 720, frequenciesHz: logSpacedFrequencies(4, 40, 20), cycles: 7,
  normalisation: 'unit-energy', padding: 'zero',
};

/** Full-length T&C eq. 4 on the plan's grid with the untruncated spectrum: one FFT of size M per frequency. */
function fullComputation(params: MorletParams, x: Float64Array): { re: Float64Array[]; im: Float64Array[] } {
  const plan = createMorletPlan({ ...params, decimation: 1 });
  const m = plan.fftSize;
  const fft = new FFT(m);
  const buf = new Float64Array(2 * m);
  x.forEach((v, i) => { buf[2 * i] = v; });
  const spec = new Float64Array(2 * m);
  fft.transform(spec, buf);
  const re: Float64Array[] = [];
  const im: Float64Array[] = [];
  for (let j = 0; j < plan.nFrequencies; j++) {
    const psi = waveletSpectrum(plan, j);
    const prod = spec.map((v, i) => v * psi[i >> 1]!);
    const out = new Float64Array(2 * m);
    fft.inverseTransform(out, prod);
    re.push(Float64Array.from({ length: x.length }, (_, i) => out[2 * i]!));
    im.push(Float64Array.from({ length: x.length }, (_, i) => out[2 * i + 1]!));
  }
  return { re, im };
}

describe('folded decimated inverse', () => {
  const x = noise(720, 1);
  const full = fullComputation(base, x);
  const grids = [
    { firstSample: 0, step: 8, count: 90 }, { firstSample: 3, step: 8, count: 89 }, { firstSample: 2, step: 6, count: 119 },
    { firstSample: 1, step: 5, count: 144 }, { firstSample: 0, step: 1, count: 720 }, { firstSample: 7, step: 64, count: 11 },
    { firstSample: 0, step: 512, count: 2 },
  ];
  it.each(grids)('equals the full-length computation on grid first $firstSample, step $step', (grid) => {
    const plan = createMorletPlan({ ...base, decimation: grid });
    const w = cwt(plan, x);
    const expRe: number[] = [];
    const expIm: number[] = [];
    for (let j = 0; j < plan.nFrequencies; j++) {
      for (let c = 0; c < grid.count; c++) {
        expRe.push(full.re[j]![grid.firstSample + grid.step * c]!);
        expIm.push(full.im[j]![grid.firstSample + grid.step * c]!);
      }
    }
    const scale = Math.max(maxAbs(expRe), maxAbs(expIm));
    // The folding identity of cwt.ts is exact; the band cut drops weights < 2e-16 of the peak. 1e-10 relative
    // to the largest coefficient is the brief's bound (common practice for double-precision FFT identities).
    expectAllClose(w.re, expRe, { rtol: 1e-10, atol: 1e-10 * scale });
    // Same check, imaginary part.
    expectAllClose(w.im, expIm, { rtol: 1e-10, atol: 1e-10 * scale });
  });

  it('gives the same power decimated by 8 as the full computation, also with reflection', () => {
    const reflectFull = cwtPower(createMorletPlan({ ...base, padding: 'reflect' }), x);
    const reflectDecimated = cwtPower(createMorletPlan({ ...base, padding: 'reflect', decimation: 8 }), x);
    const expected = Float64Array.from({ length: 20 * 90 }, (_, i) => reflectFull[Math.floor(i / 90) * 720 + (i % 90) * 8]!);
    // Folding identity (cwt.ts); 1e-10 relative as above.
    expectAllClose(reflectDecimated, expected, { rtol: 1e-10, atol: 1e-10 * maxAbs(expected) });
  });
});

describe('CWT invariants', () => {
  const plan = createMorletPlan({ ...base, decimation: 4 });

  it('is linear in the signal', () => {
    const x = noise(720, 2);
    const y = noise(720, 3);
    const combo = x.map((v, i) => 2.5 * v - 0.75 * y[i]!);
    const wx = cwt(plan, x);
    const wy = cwt(plan, y);
    const wc = cwt(plan, combo);
    const expRe = wx.re.map((v, i) => 2.5 * v - 0.75 * wy.re[i]!);
    const expIm = wx.im.map((v, i) => 2.5 * v - 0.75 * wy.im[i]!);
    // Linearity of the transform (T&C eq. 4 is linear in x); rounding only.
    expectAllClose(wc.re, expRe, { rtol: 1e-10, atol: 1e-12 * maxAbs(expRe) });
    // Same, imaginary part.
    expectAllClose(wc.im, expIm, { rtol: 1e-10, atol: 1e-12 * maxAbs(expIm) });
  });

  it('scales power by a² when the signal is scaled by a', () => {
    const x = noise(720, 4);
    const p = cwtPower(plan, x);
    const p3 = cwtPower(plan, x.map((v) => -3 * v));
    // |W(a x)|^2 = a^2 |W(x)|^2 (linearity); rounding only.
    expectAllClose(p3, p.map((v) => 9 * v), { rtol: 1e-12 });
  });

  it('shifts with the signal away from the edges', () => {
    const long = noise(900, 5);
    const shift = 40;
    const a = long.subarray(0, 720);
    const b = long.subarray(shift, shift + 720);
    const full = createMorletPlan(base);
    const pa = cwtPower(full, Float64Array.from(a));
    const pb = cwtPower(full, Float64Array.from(b));
    const margin = full.supportSamples + shift;
    const got: number[] = [];
    const want: number[] = [];
    for (let j = 0; j < 20; j++) {
      for (let t = margin; t < 720 - margin; t++) { got.push(pb[j * 720 + t]!); want.push(pa[j * 720 + t + shift]!); }
    }
    // Time-shift equivariance of convolution; beyond the wavelet support the edges leak < 1e-10 (SUPPORT_SIGMAS).
    expectAllClose(got, want, { rtol: 1e-8, atol: 1e-9 * maxAbs(want) });
  });

  it('does not modify its input', () => {
    const x = noise(720, 6);
    const copy = Float64Array.from(x);
    cwt(plan, x); cwtPower(plan, x); cwtLogPower(plan, x);
    // Common practice: a transform leaves its argument alone.
    expect(Array.from(x)).toEqual(Array.from(copy));
  });

  it('returns the log of the power, floored', () => {
    const x = noise(720, 7);
    const p = cwtPower(plan, x);
    const out = new Float64Array(p.length);
    const lp = cwtLogPower(plan, x, out);
    expect(lp).toBe(out);
    // Definition: ln |W|^2 (natural log), computed by Math.log on the same power.
    expectAllClose(lp, p.map(Math.log), { rtol: 1e-14 });
    const zeros = cwtLogPower(plan, new Float64Array(720));
    // Documented floor: ln(1e-20) for zero power instead of -Infinity.
    expectAllClose(zeros, new Float64Array(zeros.length).fill(Math.log(DEFAULT_LOG_POWER_FLOOR)), { rtol: 0 });
    // A caller's floor is used as given.
    expectAllClose(cwtLogPower(plan, new Float64Array(720), undefined, 1e-6), new Float64Array(zeros.length).fill(Math.log(1e-6)), { rtol: 0 });
  });
});

describe('CWT special inputs', () => {
  it('returns empty arrays for an empty signal', () => {
    const plan = createMorletPlan({ ...base, nSamples: 0 });
    expect(plan.nTimes).toBe(0);
    expect(cwt(plan, new Float64Array(0)).re.length).toBe(0);
    expect(cwtLogPower(plan, new Float64Array(0)).length).toBe(0);
  });

  it('treats a one-sample signal as an impulse (zero padding): |W|² = x²·δt/(√π·σ_t)', () => {
    const plan = createMorletPlan({ ...base, nSamples: 1 });
    const p = cwtPower(plan, Float64Array.of(2));
    expect(p.length).toBe(20);
    // T&C eq. 2 at lag 0: psi(0) = pi^-1/4 (dt/s)^1/2, so |W|^2 = x^2 pi^-1/2 dt/sigma_t (exact up to e^-(n^2/2)).
    expectAllClose(p, plan.sigmaTS.map((s) => 4 / Math.sqrt(Math.PI) / (160 * s)), { rtol: 1e-9 });
  });

  it('makes every output NaN when the signal holds a NaN, and keeps NaN through the log', () => {
    const plan = createMorletPlan({ ...base, decimation: 8 });
    const x = noise(720, 8);
    x[100] = Number.NaN;
    // Documented: each coefficient mixes all samples (FFT), so NaN spreads to the whole call.
    expect(cwtPower(plan, x).every(Number.isNaN)).toBe(true);
    // Documented: the log floor does not hide NaN.
    expect(cwtLogPower(plan, x).every(Number.isNaN)).toBe(true);
  });

  it('gives ~zero power for a constant away from the edges, and none anywhere with reflection', () => {
    const zeroPlan = createMorletPlan(base);
    const reflectPlan = createMorletPlan({ ...base, padding: 'reflect' });
    const x = new Float64Array(720).fill(50);
    const pz = cwtPower(zeroPlan, x);
    const pr = cwtPower(reflectPlan, x);
    const h = zeroPlan.supportSamples;
    const interior: number[] = [];
    for (let j = 0; j < 20; j++) for (let t = h; t < 720 - h; t++) interior.push(pz[j * 720 + t]!);
    // psi_hat(0) = 0 (Heaviside) and e^-(n^2/2) ~ 2e-11 near DC for n = 7: power <= (2e-11 * 50)^2 * (sigma_t fs) scale.
    expect(maxAbs(interior)).toBeLessThan(1e-12);
    // Reflection continues the constant, so even the edge columns stay ~0 (same bound).
    expect(maxAbs(pr)).toBeLessThan(1e-12);
    // With zero padding the steps at the ends are edge effects, large inside the cone of influence.
    expect(pz[0]).toBeGreaterThan(100);
  });

  it('throws ShapeError for a signal or output of the wrong length', () => {
    const plan = createMorletPlan({ ...base, decimation: 8 });
    expect(() => cwt(plan, new Float64Array(719))).toThrow(ShapeError);
    expect(() => cwtPower(plan, new Float64Array(720), new Float64Array(10))).toThrow(/expected \[20\]\[90\]/);
    expect(() => cwtLogPower(plan, new Float64Array(721))).toThrow(/x: expected 720 samples/);
  });

  it('throws ParamError naming the field for bad parameters', () => {
    expect(() => createMorletPlan({ ...base, frequenciesHz: [4, 80] })).toThrow(/frequenciesHz: \[1\]/);
    expect(() => createMorletPlan({ ...base, frequenciesHz: [] })).toThrow(ParamError);
    expect(() => createMorletPlan({ ...base, cycles: [7, 7] })).toThrow(/cycles: expected one value or 20/);
    expect(() => createMorletPlan({ ...base, cycles: 0 })).toThrow(/cycles/);
    expect(() => createMorletPlan({ ...base, decimation: 0 })).toThrow(/decimation/);
    expect(() => createMorletPlan({ ...base, decimation: { firstSample: 700, step: 8, count: 4 } })).toThrow(/beyond the signal/);
    expect(() => createMorletPlan({ ...base, nSamples: 2 ** 24 })).toThrow(/FFT of/);
    expect(() => createMorletPlan({ ...base, sampleRateHz: 0 })).toThrow(/sampleRateHz/);
  });
});

describe('logSpacedFrequencies', () => {
  it('spans the edges exactly with a constant ratio', () => {
    const f = logSpacedFrequencies(4, 40, 20);
    expect([f[0], f[19]]).toEqual([4, 40]);
    const ratios = Array.from(f.subarray(1)).map((v, i) => v / f[i]!);
    // Definition (T&C 1998 eq. 9-10, geometric scales): ratio (40/4)^(1/19) between neighbours.
    expectAllClose(ratios, new Array(19).fill(10 ** (1 / 19)), { rtol: 1e-13 });
    expect(Array.from(logSpacedFrequencies(8, 30, 1))).toEqual([8]);
    expect(() => logSpacedFrequencies(0, 40, 5)).toThrow(/lowHz/);
    expect(() => logSpacedFrequencies(10, 5, 5)).toThrow(/highHz/);
    expect(() => logSpacedFrequencies(4, 40, 0)).toThrow(/count/);
  });
});
