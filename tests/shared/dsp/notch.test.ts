import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { iirNotchSos } from '../../../shared/dsp/notch';
import { sosMagnitude } from '../../../shared/dsp/response';
import { ParamError } from '../../../shared/types';
import { expectAllClose, expectClose } from '../../helpers/all-close';

interface NotchCase {
  name: string;
  input: { f0Hz: number; q: number; sampleRateHz: number };
  expected: { b: number[]; a: number[]; magnitude: { freqsHz: number[]; values: number[] } };
}
const fixture = JSON.parse(readFileSync(new URL('../../fixtures/dsp/butter_sos.json', import.meta.url), 'utf8')) as
  { notch: NotchCase[] };

describe('iirNotchSos', () => {
  // Reference: tests/fixtures/dsp/butter_sos.json (scipy.signal.iirnotch); rtol 1e-10 as for butterSos.
  it.each(fixture.notch)('matches SciPy b and a for $name', ({ input, expected }) => {
    const sos = iirNotchSos(input.f0Hz, input.q, input.sampleRateHz);
    expect(sos).toHaveLength(1);
    expectAllClose(sos[0]!, [...expected.b, ...expected.a], { rtol: 1e-10, atol: 1e-14 });
  });

  // Reference: tests/fixtures/dsp/butter_sos.json (scipy.signal.sosfreqz); the value at f0 is
  // rounding noise (~1e-16) on both sides, hence the absolute tolerance.
  it.each(fixture.notch)('has the reference magnitude response for $name', ({ input, expected }) => {
    const sos = iirNotchSos(input.f0Hz, input.q, input.sampleRateHz);
    expectAllClose(sosMagnitude(sos, expected.magnitude.freqsHz, input.sampleRateHz), expected.magnitude.values,
      { rtol: 1e-9, atol: 1e-12 });
  });

  // REFERENCES.md section 2, "Notch": b and a printed for 50 and 60 Hz, Q = 30, fs = 250.
  it('reproduces the printed 50 Hz and 60 Hz designs', () => {
    expectAllClose(iirNotchSos(50, 30, 250)[0]!, [0.9794827609814495, -0.6053536376811253, 0.9794827609814495,
      1.0, -0.6053536376811253, 0.958965521962899], { rtol: 1e-10, atol: 1e-14 });
    expectAllClose(iirNotchSos(60, 30, 250)[0]!, [0.975478390750534, -0.12250158988968944, 0.975478390750534,
      1.0, -0.12250158988968944, 0.950956781501068], { rtol: 1e-10, atol: 1e-14 });
  });

  // REFERENCES.md section 2, notch magnitude table (10 significant digits printed).
  it('has the tabulated magnitudes', () => {
    expectAllClose(sosMagnitude(iirNotchSos(50, 30, 250), [0, 45, 49.5, 50.5, 55, 125], 250),
      [1, 0.9870800883, 0.5152352642, 0.5136904905, 0.9859922388, 1], { rtol: 1e-9, atol: 1e-12 });
    expectAllClose(sosMagnitude(iirNotchSos(60, 30, 250), [0, 55, 59, 59.5, 60.5, 61, 65, 125], 250),
      [1, 0.9809204439, 0.7073866833, 0.4472986176, 0.4470157524, 0.7068274318, 0.9806223664, 1],
      { rtol: 1e-9, atol: 1e-12 });
    // REFERENCES.md section 2: 0 at F0 (< −280 dB).
    expectClose(sosMagnitude(iirNotchSos(50, 30, 250), [50], 250)[0]!, 0, { atol: 1e-13 });
  });

  it('rejects a notch outside (0, Nyquist) or a non-positive Q', () => {
    // Common practice: the design has no meaning there.
    expect(() => iirNotchSos(125, 30, 250)).toThrow(ParamError);
    expect(() => iirNotchSos(0, 30, 250)).toThrow(/f0Hz/);
    expect(() => iirNotchSos(50, 0, 250)).toThrow(/q/);
  });
});
