import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { createRealDft } from '../../../shared/tf/dft';
import { welchPsd } from '../../../shared/tf/welch';
import { expectAllClose } from '../../helpers/all-close';

interface WelchCase {
  name: string;
  input: { sampleRateHz: number; x: number[]; segmentLength: number | null; overlap: number | null };
  expected: { frequenciesHz: number[]; psd: number[] };
}
const fixture = JSON.parse(readFileSync(new URL('../../fixtures/tf/welch.json', import.meta.url), 'utf8')) as {
  source: string; cases: WelchCase[] };

describe('welchPsd', () => {
  it.each(fixture.cases)('matches scipy.signal.welch for $name', ({ input, expected }) => {
    const x = Float64Array.from(input.x);
    const { frequenciesHz, psd } = welchPsd(x, input.sampleRateHz, {
      segmentLength: input.segmentLength ?? undefined, overlap: input.overlap ?? undefined });
    // Reference: tests/fixtures/tf/welch.json (make_welch.py, scipy.signal.welch defaults); exact formula.
    expectAllClose(frequenciesHz, expected.frequenciesHz, { rtol: 1e-14 });
    // Same source; 1e-10 relative (FFT summation order) with an absolute floor for exactly-zero bins.
    expectAllClose(psd, expected.psd, { rtol: 1e-10, atol: 1e-14 * Math.max(...expected.psd) });
  });

  it('returns empty arrays for an empty signal, as SciPy does', () => {
    const r = welchPsd(new Float64Array(0), 100);
    expect([r.frequenciesHz.length, r.psd.length]).toEqual([0, 0]);
  });

  it('spreads NaN over the spectrum and leaves its input alone', () => {
    const x = Float64Array.from({ length: 512 }, (_, i) => Math.sin(i / 3));
    const copy = Float64Array.from(x);
    welchPsd(x, 100);
    // Common practice: the estimator does not modify its argument.
    expect(Array.from(x)).toEqual(Array.from(copy));
    x[3] = Number.NaN;
    // NaN in a segment reaches every bin of that segment's FFT, hence the mean.
    expect(welchPsd(x, 100).psd.every(Number.isNaN)).toBe(true);
  });

  it('rejects a bad overlap, segment length, window or rate', () => {
    const x = new Float64Array(100);
    expect(() => welchPsd(x, 100, { segmentLength: 50, overlap: 50 })).toThrow(/overlap/);
    expect(() => welchPsd(x, 100, { segmentLength: 0 })).toThrow(/segmentLength/);
    expect(() => welchPsd(x, 100, { window: 'boxcar' as 'hann' })).toThrow(/window/);
    expect(() => welchPsd(x, -1)).toThrow(/sampleRateHz/);
  });
});

describe('createRealDft', () => {
  it.each([1, 2, 8, 7, 100, 101, 320])('equals the defining sum for n = %i', (n) => {
    const x = Float64Array.from({ length: n }, (_, t) => Math.cos(0.37 * t * t) + 0.1 * t);
    const half = Math.floor(n / 2) + 1;
    const re = new Float64Array(half);
    const im = new Float64Array(half);
    createRealDft(n).transform(x, re, im);
    const eRe: number[] = [];
    const eIm: number[] = [];
    for (let k = 0; k < half; k++) {
      let sr = 0; let si = 0;
      for (let t = 0; t < n; t++) {
        const angle = (2 * Math.PI * ((k * t) % n)) / n;
        sr += x[t]! * Math.cos(angle);
        si -= x[t]! * Math.sin(angle);
      }
      eRe.push(sr); eIm.push(si);
    }
    const scale = Math.max(...eRe.map(Math.abs), ...eIm.map(Math.abs));
    // DFT definition X_k = sum_t x_t exp(-i 2 pi k t / n) (common practice), evaluated directly; 1e-12 of the largest bin.
    expectAllClose(re, eRe, { rtol: 1e-10, atol: 1e-12 * scale });
    // Same, imaginary parts.
    expectAllClose(im, eIm, { rtol: 1e-10, atol: 1e-12 * scale });
  });
});
