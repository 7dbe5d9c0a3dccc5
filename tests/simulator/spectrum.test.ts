import { describe, expect, it } from 'vitest';
import reference from '../fixtures/simulator/spectrum_reference.json';
import { expectAllClose, expectClose } from '../helpers/all-close';
import { bandPower, welch } from './spectrum';

describe('the plausibility tests\' spectral estimates', () => {
  it('welch matches scipy.signal.welch with default settings', () => {
    const { fs, nperseg, x, f, pxx } = reference.welch;
    const r = welch(x, fs, nperseg);
    // Reference: tests/fixtures/simulator/spectrum_reference.json (make_spectrum_reference.py, SciPy).
    expectAllClose(r.f, f, { rtol: 1e-12 });
    // rtol 1e-9: same arithmetic, different FFT summation order.
    expectAllClose(r.pxx, pxx, { rtol: 1e-9, atol: 1e-12 });
    expect(reference.source).toMatch(/SciPy/);
  });

  it('bandPower matches the Hann periodogram band sum of scipy.signal.periodogram', () => {
    const { fs, x, loHz, hiHz, power } = reference.bandPower;
    // Reference: tests/fixtures/simulator/spectrum_reference.json (make_spectrum_reference.py, SciPy).
    expectClose(bandPower(x, fs, loHz, hiHz), power, { rtol: 1e-9 });
  });
});
