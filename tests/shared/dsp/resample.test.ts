import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { resample, resampleFactors } from '../../../shared/dsp/resample';
import { ParamError } from '../../../shared/types';
import { expectAllClose, expectClose } from '../../helpers/all-close';

interface ResampleCase { name: string; input: { fromHz: number; toHz: number; x: number[][] }; expected: { y: number[][] } }
const fx = JSON.parse(readFileSync(new URL('../../fixtures/dsp/resample_poly.json', import.meta.url), 'utf8')) as
  { source: string; window: string; resampling: ResampleCase[] };

const sine = (fHz: number, fsHz: number, n: number) =>
  Float64Array.from({ length: n }, (_, i) => Math.sin((2 * Math.PI * fHz * i) / fsHz));
const rms = (a: Float64Array) => Math.sqrt(a.reduce((s, v) => s + v * v, 0) / a.length);

describe('resample', () => {
  // Reference: tests/fixtures/dsp/resample_poly.json (scipy.signal.resample_poly, window ('kaiser', 5.0)).
  // atol 1e-11 µV on ~20 µV signals: same FIR, different summation order (measured <= 7e-14).
  it.each(fx.resampling)('matches scipy resample_poly for $name', ({ input, expected }) => {
    const y = resample(input.x.map((r) => Float64Array.from(r)), input.fromHz, input.toHz);
    expect(y.map((r) => r.length)).toEqual(expected.y.map((r) => r.length));
    y.forEach((r, ch) => expectAllClose(r, expected.y[ch]!, { rtol: 1e-10, atol: 1e-11 }));
  });

  it('removes a component above the new Nyquist rate and keeps one below it', () => {
    const [alias] = resample([sine(70, 160, 1600)], 160, 100);
    const [kept] = resample([sine(10, 160, 1600)], 160, 100);
    // From memory, unchecked: a Kaiser (β = 5) windowed-sinc stopband is below about −45 dB, so a
    // 70 Hz tone (20 Hz past the 50 Hz cutoff) keeps < 1 % of its RMS; a 10 Hz tone passes within 1 %.
    expect(rms(alias!.subarray(50, 950))).toBeLessThan(0.01 * rms(sine(70, 160, 1600)));
    expectClose(rms(kept!.subarray(50, 950)), Math.SQRT1_2, { rtol: 0.01 });
  });

  it('reduces rates to rational factors', () => {
    // Arithmetic: 250/160 = 25/16, 256.5 -> 512 is 1024/513, equal rates 1/1.
    expect(resampleFactors(160, 250)).toEqual({ up: 25, down: 16 });
    expect(resampleFactors(256.5, 512)).toEqual({ up: 1024, down: 513 });
    expect(resampleFactors(1000, 1000)).toEqual({ up: 1, down: 1 });
    expect(() => resampleFactors(0, 250)).toThrow(ParamError);
    expect(() => resampleFactors(160, 250.0001)).toThrow(/toHz/);
  });

  it('handles empty, one-sample and same-rate input without modifying it', () => {
    const x = [Float64Array.of(1, 2, 3)];
    const same = resample(x, 250, 250);
    // Common practice (STYLE.md §4): equal rates give an equal copy; the input is untouched.
    expectAllClose(same[0]!, [1, 2, 3], { atol: 0 });
    expect(same[0]).not.toBe(x[0]);
    resample(x, 160, 250);
    expectAllClose(x[0]!, [1, 2, 3], { atol: 0 });
    expect(resample([new Float64Array(0)], 160, 250)[0]!.length).toBe(0);
    // Output length ceil(n·up/down), as resample_poly: one sample at 160 -> 250 Hz gives 2.
    expect(resample([Float64Array.of(5)], 160, 250)[0]!.length).toBe(2);
    expect(resample([], 160, 250)).toEqual([]);
  });

  it('propagates NaN as data', () => {
    const x = sine(10, 160, 400);
    x[200] = NaN;
    const [y] = resample([x], 160, 250);
    // Common practice (STYLE.md §3): NaN is data; outputs whose filter window covers it are NaN.
    expect(Number.isNaN(y![Math.round((200 * 250) / 160)]!)).toBe(true);
    expect(Number.isFinite(y![0]!)).toBe(true);
  });
});
