import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { cwt, cwtPower } from '../../../shared/tf/cwt';
import { createMorletPlan, waveletSpectrum, type MorletNormalisation, type MorletPadding,
  type MorletTimeGrid } from '../../../shared/tf/morlet-plan';
import { expectAllClose, expectClose } from '../../helpers/all-close';

interface FixtureCase {
  name: string;
  reference: 'direct' | 'fourier' | 'fourier-plan-grid';
  tolerance: { rtol: number; atolRelativeToMax: number };
  input: { sampleRateHz: number; x: number[]; frequenciesHz: number[]; cycles: number | number[];
    normalisation: MorletNormalisation; padding: MorletPadding; grid: MorletTimeGrid };
  expected: { re: number[]; im: number[] };
}
interface PywtTones {
  sampleRateHz: number; nSamples: number; cyclesEquivalent: number;
  tones: { frequencyHz: number; scaleSamples: number; absCoefCentre: number }[];
}
const fixture = JSON.parse(readFileSync(new URL('../../fixtures/tf/cwt_morlet.json', import.meta.url), 'utf8')) as {
  source: string; cases: FixtureCase[]; pywtTones: PywtTones };

function maxAbs(values: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < values.length; i++) m = Math.max(m, Math.abs(values[i]!));
  return m;
}

function cosine(n: number, fs: number, f: number, amplitude = 1): Float64Array {
  return Float64Array.from({ length: n }, (_, i) => amplitude * Math.cos(2 * Math.PI * f * i / fs));
}

describe('complex Morlet CWT against NumPy implementations of Torrence & Compo 1998', () => {
  it.each(fixture.cases)('matches the $reference reference for $name', ({ input, expected, tolerance }) => {
    const plan = createMorletPlan({ sampleRateHz: input.sampleRateHz, nSamples: input.x.length,
      frequenciesHz: input.frequenciesHz, cycles: input.cycles, normalisation: input.normalisation,
      padding: input.padding, decimation: input.grid });
    const w = cwt(plan, Float64Array.from(input.x));
    const scale = Math.max(maxAbs(expected.re), maxAbs(expected.im), maxAbs(input.x));
    const tol = { rtol: tolerance.rtol, atol: tolerance.atolRelativeToMax * scale };
    // Reference: tests/fixtures/tf/cwt_morlet.json (make_cwt_morlet.py: T&C eq. 2 direct sum, eq. 4-6 FFT form on a
    // generous grid, or on the plan's documented grid). rtol 1e-9: same definition in double precision; the atol
    // (1e-9 of the largest value, more for grid-independent references with n = 6) covers the ~1e-10
    // wrap-around floor (SUPPORT_SIGMAS) and the e^(-n^2/2) analyticity floor; the script states both.
    expectAllClose(w.re, expected.re, tol);
    // Same source and tolerance, imaginary part.
    expectAllClose(w.im, expected.im, tol);
  });
});

describe('REFERENCES.md §1 worked example: cos(2π·10·t), fs 250 Hz, N 2500, centre sample', () => {
  const fs = 250;
  const n = 2500;
  const centre = 1250;
  const omega0 = 6;

  it('gives unit-energy |W|² = 21.302536571899 at T&C scale s = 0.09680133091943911 s', () => {
    const s = 0.09680133091943911;
    // omega0 = 6 <=> 6 cycles; peak frequency omega0/(2 pi s) (REFERENCES §1, link to T&C).
    const plan = createMorletPlan({ sampleRateHz: fs, nSamples: n, frequenciesHz: [omega0 / (2 * Math.PI * s)],
      cycles: omega0, normalisation: 'unit-energy', padding: 'zero', decimation: { firstSample: centre, step: 1, count: 1 } });
    // REFERENCES.md §1 (a): sigma_t of the plan is the T&C scale s.
    expectClose(plan.sigmaTS[0]!, s, { rtol: 1e-14 });
    const power = cwtPower(plan, cosine(n, fs, 10));
    // REFERENCES.md §1 (a) [calc, cwt_morlet.py]: |W|^2 = 21.302536571899 (printed to 14 digits).
    expectClose(power[0]!, 21.302536571899, { rtol: 1e-11 });
  });

  it('follows the closed form (s/δt)(√π/2)A²exp(−(2πfs − ω0)²) over a range of scales', () => {
    const scales = [0.06, 0.08, 0.09680133091943911, 0.11, 0.14];
    const plan = createMorletPlan({ sampleRateHz: fs, nSamples: n, frequenciesHz: scales.map((s) => omega0 / (2 * Math.PI * s)),
      cycles: omega0, normalisation: 'unit-energy', padding: 'zero', decimation: { firstSample: centre, step: 1, count: 1 } });
    const amplitude = 3;
    const power = cwtPower(plan, cosine(n, fs, 10, amplitude));
    const expected = scales.map((s) => s * fs * (Math.sqrt(Math.PI) / 2) * amplitude ** 2 * Math.exp(-((2 * Math.PI * 10 * s - omega0) ** 2)));
    // REFERENCES.md §1 (a) closed form; 1e-9: the neglected negative-frequency term is e^-(2 pi f s + w0)^2 < 1e-50,
    // the record's finite length leaks < 1e-10 into the centre sample.
    expectAllClose(power, expected, { rtol: 1e-9 });
  });

  // Holds while the Gaussian fits inside (0, Nyquist): 80 Hz with 12 cycles ends 6.7 sigma_f below 125 Hz.
  it('has the white-noise expectation Σ|ψ̂_k|²/M = 1 (unit energy)', () => {
    const s = 0.09680133091943911;
    const plan = createMorletPlan({ sampleRateHz: fs, nSamples: 65536, frequenciesHz: [omega0 / (2 * Math.PI * s), 3, 40, 80],
      cycles: [omega0, 7, 7, 12], normalisation: 'unit-energy', padding: 'zero', decimation: 4096 });
    for (let j = 0; j < plan.nFrequencies; j++) {
      const psi = waveletSpectrum(plan, j);
      let sum = 0;
      for (const v of psi) sum += v * v;
      // REFERENCES.md §1 (a) white-noise check: sum |psi_hat|^2 / N = 1.0000000 (T&C eq. 6 normalisation).
      expectClose(sum / plan.fftSize, 1, { rtol: 1e-10 });
    }
  });

  it("'amplitude' returns |W| = 1.0 for A = 1: twice REFERENCES row (b)'s 0.5 (the analytic-signal factor)", () => {
    const plan = createMorletPlan({ sampleRateHz: fs, nSamples: n, frequenciesHz: [10, 10], cycles: [6, 7],
      normalisation: 'amplitude', padding: 'zero', decimation: { firstSample: centre, step: 1, count: 1 } });
    const w = cwt(plan, cosine(n, fs, 10));
    const abs = [0, 1].map((j) => Math.hypot(w.re[j]!, w.im[j]!));
    // REFERENCES.md §1 (b): |W| = 0.5 without, 1.0 with the analytic factor 2 (n = 6 and 7, f = 10 Hz).
    expectAllClose(abs, [1.0, 1.0], { rtol: 1e-12 });
  });

  it('reports σ_t, σ_f and FWHM of the REFERENCES table', () => {
    const plan = createMorletPlan({ sampleRateHz: fs, nSamples: 100, frequenciesHz: [10, 10, 20], cycles: [6, 7, 7],
      normalisation: 'amplitude', padding: 'zero' });
    // REFERENCES.md §1 table (Tallon-Baudry et al. 1997; Cohen 2019), sigma_t printed to 7 decimals: half a unit.
    expectAllClose(plan.sigmaTS, [0.0954930, 0.1114085, 0.0557042], { rtol: 0, atol: 5e-8 });
    // Same table, sigma_f in Hz, 6 decimals.
    expectAllClose(plan.sigmaFHz, [1.666667, 1.428571, 2.857143], { rtol: 0, atol: 5e-7 });
    // Same table, FWHM_t in s, 6 decimals.
    expectAllClose(plan.fwhmTS, [0.224869, 0.262347, 0.131173], { rtol: 0, atol: 5e-7 });
    // Same table, FWHM_f in Hz, 6 decimals.
    expectAllClose(plan.fwhmFHz, [3.924700, 3.364029, 6.728057], { rtol: 0, atol: 5e-7 });
    // The wavelet spectrum itself: its SD in Hz is sigma_f (Gaussian exp(-(sigma_t w - n)^2/2), T&C eq. 6).
    const psi = waveletSpectrum(plan, 1);
    const binHz = fs / plan.fftSize;
    let m0 = 0; let m1 = 0; let m2 = 0;
    psi.forEach((v, k) => { m0 += v; m1 += v * k * binHz; m2 += v * (k * binHz) ** 2; });
    // Tallon-Baudry et al. 1997: spectral SD f/n (= 1.428571 Hz here), centred on f.
    expectClose(Math.sqrt(m2 / m0 - (m1 / m0) ** 2), 1.428571, { rtol: 1e-6 });
  });

  it('agrees with PyWavelets cmor1.5-1.0 on pure tones to 1 % (integrated-wavelet discretisation)', () => {
    const { sampleRateHz, nSamples, cyclesEquivalent, tones } = fixture.pywtTones;
    const plan = createMorletPlan({ sampleRateHz, nSamples, frequenciesHz: tones.map((t) => t.frequencyHz),
      cycles: cyclesEquivalent, normalisation: 'amplitude', padding: 'zero',
      decimation: { firstSample: nSamples / 2, step: 1, count: 1 } });
    const scaled = tones.map((tone, j) => {
      const w = cwt(plan, cosine(nSamples, sampleRateHz, tone.frequencyHz));
      return Math.hypot(w.re[j]!, w.im[j]!) * Math.sqrt(tone.scaleSamples) / 2;
    });
    // Reference: tests/fixtures/tf/cwt_morlet.json pywtTones; PyWavelets falls 0.15-0.7 % short of the continuous
    // limit sqrt(a)/2 (REFERENCES §1 (c): 2.4914 vs 2.5), so 1e-2.
    expectAllClose(scaled, tones.map((t) => t.absCoefCentre), { rtol: 1e-2 });
    expect(fixture.source).toContain('pywt');
  });
});
