import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { butterSos, type FilterKind } from '../../../shared/dsp/butter';
import { sosMagnitude } from '../../../shared/dsp/response';
import { sosfilt } from '../../../shared/dsp/sosfilt';
import { ParamError } from '../../../shared/types';
import { expectAllClose, expectClose } from '../../helpers/all-close';

interface ButterCase {
  name: string;
  rowOrderTie: boolean;
  input: { order: number; edgesHz: number | [number, number]; kind: FilterKind; sampleRateHz: number };
  expected: { sos: number[]; sections: number; magnitude: { freqsHz: number[]; values: number[] };
    edgeMagnitude: number[]; impulse: number[]; zi: number[];
    referenceTable?: { freqsHz: number[]; values: number[] } };
}
const fixture = JSON.parse(readFileSync(new URL('../../fixtures/dsp/butter_sos.json', import.meta.url), 'utf8')) as
  { source: string; butter: ButterCase[] };
const design = ({ input: i }: ButterCase) => butterSos(i.order, i.edgesHz, i.kind, i.sampleRateHz);

describe('butterSos against SciPy', () => {
  it('names SciPy and its version as the fixture source', () => {
    expect(fixture.source).toMatch(/make_butter_sos\.py .*scipy \d/);
  });

  // Reference: tests/fixtures/dsp/butter_sos.json (scipy.signal.butter(..., output='sos')).
  // rtol 1e-10: both sides are double precision with the same operations; only libm rounding differs.
  it.each(fixture.butter.filter((c) => !c.rowOrderTie))('matches the coefficients row for row for $name', (c) => {
    const sos = design(c);
    expect(sos).toHaveLength(c.expected.sections);
    expectAllClose(sos.flat(), c.expected.sos, { rtol: 1e-10, atol: 1e-14 });
  });

  // Reference: tests/fixtures/dsp/butter_sos.json, band centred on fs/4: pole radii tie exactly,
  // so SciPy's section order follows last-bit rounding; the rows must agree as a set.
  it.each(fixture.butter.filter((c) => c.rowOrderTie))('matches the coefficient rows as a set for $name', (c) => {
    const byA1 = (rows: number[][]) => [...rows].sort((p, q) => p[4]! - q[4]!).flat();
    const expectedRows = Array.from({ length: c.expected.sections }, (_, i) => c.expected.sos.slice(6 * i, 6 * i + 6));
    expectAllClose(byA1(design(c)), byA1(expectedRows), { rtol: 1e-10, atol: 1e-14 });
  });

  // Reference: tests/fixtures/dsp/butter_sos.json (scipy.signal.sosfreqz at edges, fs/8, fs/4, ...).
  // rtol 1e-9: a product of section gains, each with a few ulps of rounding.
  it.each(fixture.butter)('has the reference magnitude response for $name', (c) => {
    const { freqsHz, values } = c.expected.magnitude;
    expectAllClose(sosMagnitude(design(c), freqsHz, c.input.sampleRateHz), values, { rtol: 1e-9, atol: 1e-15 });
  });

  // Reference: tests/fixtures/dsp/butter_sos.json (scipy.signal.sosfilt of a unit impulse, 64 samples).
  it.each(fixture.butter)('has the reference impulse response for $name', (c) => {
    const impulse = new Float64Array(64);
    impulse[0] = 1;
    const [y] = sosfilt(design(c), [impulse]);
    expectAllClose(y!, c.expected.impulse, { rtol: 1e-9, atol: 1e-13 });
  });

  // REFERENCES.md section 2: |H| = 1/√2 (−3.0103 dB) at every edge for every order (pre-warping).
  it.each(fixture.butter)('is −3.0103 dB at its edges for $name', (c) => {
    const edges = typeof c.input.edgesHz === 'number' ? [c.input.edgesHz] : c.input.edgesHz;
    const db = [...sosMagnitude(design(c), edges, c.input.sampleRateHz)].map((m) => 20 * Math.log10(m));
    expectAllClose(db, edges.map(() => -3.0103), { atol: 5e-5 });
    // Reference: tests/fixtures/dsp/butter_sos.json, edgeMagnitude.
    expectAllClose(sosMagnitude(design(c), edges, c.input.sampleRateHz), c.expected.edgeMagnitude, { rtol: 1e-9 });
  });
});

describe('butterSos against the numbers printed in REFERENCES.md section 2', () => {
  // REFERENCES.md section 2, "bp4 8-30 Hz, fs=160" (SciPy 1.10.1 repr, 17 significant digits).
  it('reproduces the 4th-order 8-30 Hz band-pass at 160 Hz', () => {
    expectAllClose(butterSos(4, [8, 30], 'bandpass', 160).flat(), [
      0.013977425590721182, 0.027954851181442364, 0.013977425590721182, 1.0, -0.8160147868591654, 0.3112202785898096,
      1.0, 2.0, 1.0, 1.0, -1.4180793140405759, 0.5614248698642595,
      1.0, -2.0, 1.0, 1.0, -0.6691559641450513, 0.6400830173610834,
      1.0, -2.0, 1.0, 1.0, -1.7615861237988146, 0.8580027030590058], { rtol: 1e-10, atol: 1e-14 });
  });

  // REFERENCES.md section 2, "bp4 8-30 Hz, fs=250".
  it('reproduces the 4th-order 8-30 Hz band-pass at 250 Hz', () => {
    expectAllClose(butterSos(4, [8, 30], 'bandpass', 250).flat(), [
      0.003111903604586019, 0.006223807209172038, 0.003111903604586019, 1.0, -1.2672931915575452, 0.493789184143714,
      1.0, 2.0, 1.0, 1.0, -1.6370396227024675, 0.7019629536078331,
      1.0, -2.0, 1.0, 1.0, -1.2863770965150896, 0.7317912749111386,
      1.0, -2.0, 1.0, 1.0, -1.8683294067657878, 0.9091564065038225], { rtol: 1e-10, atol: 1e-14 });
  });

  // REFERENCES.md section 2, "hp2 1 Hz, fs=250".
  it('reproduces the 2nd-order 1 Hz high-pass at 250 Hz', () => {
    expectAllClose(butterSos(2, 1, 'highpass', 250).flat(), [0.9823854385260917, -1.9647708770521835,
      0.9823854385260917, 1.0, -1.9644605802052324, 0.9650811738991353], { rtol: 1e-10, atol: 1e-14 });
  });

  // REFERENCES.md section 2, magnitude table (|H| printed with 10 significant digits or 6 for ~1e-5).
  it('has the tabulated magnitudes', () => {
    expectAllClose(sosMagnitude(butterSos(4, [8, 30], 'bandpass', 160), [1, 4, 8, 20, 30, 40, 50, 60], 160),
      [8.12538e-5, 0.0262854801, 0.7071067812, 0.9999558608, 0.7071067812, 0.1050719426, 0.0163370567, 0.0021394805],
      { rtol: 1e-5, atol: 1e-10 });
    expectAllClose(sosMagnitude(butterSos(4, [8, 30], 'bandpass', 250), [1, 4, 8, 20, 30, 40, 50, 60, 100], 250),
      [7.54931e-5, 0.0247874793, 0.7071067812, 0.9999041860, 0.7071067812, 0.1447300988, 0.0372348280, 0.0117308167,
        8.59148e-5], { rtol: 1e-5, atol: 1e-10 });
    expectAllClose(sosMagnitude(butterSos(2, 1, 'highpass', 250), [0.1, 0.5, 1, 2, 10, 50], 250),
      [0.0099984580, 0.2425176014, 0.7071067812, 0.9701605217, 0.9999510389, 0.9999999552], { rtol: 1e-8, atol: 1e-10 });
  });

  // REFERENCES.md section 2: unity gain at the geometric centre f0 = (fs/π)·atan(√(tan(πf1/fs)·tan(πf2/fs))).
  it('has unit gain at the warped geometric centre of the band', () => {
    expectClose(sosMagnitude(butterSos(4, [8, 30], 'bandpass', 160), [16.0181550], 160)[0]!, 1, { atol: 1e-12 });
    expectClose(sosMagnitude(butterSos(4, [8, 30], 'bandpass', 250), [15.6963091], 250)[0]!, 1, { atol: 1e-12 });
  });

  // REFERENCES.md section 2, impulse responses n = 0..7.
  it('has the tabulated impulse responses', () => {
    const imp = new Float64Array(8);
    imp[0] = 1;
    expectAllClose(sosfilt(butterSos(4, [8, 30], 'bandpass', 250), [imp])[0]!, [0.003111903604586019,
      0.018855146292583908, 0.05052161401926723, 0.07727231385717324, 0.0663667728070262, 0.005731172431072198,
      -0.08292430134336069, -0.15851001370483325], { rtol: 1e-10, atol: 1e-15 });
    expectAllClose(sosfilt(butterSos(4, [8, 30], 'bandpass', 160), [imp])[0]!, [0.013977425590721182,
      0.06520240072246491, 0.10655703943344938, 0.025013986680940632, -0.1681594911528151, -0.2847386363995577,
      -0.18923788782745835, 0.035817782697023154], { rtol: 1e-10, atol: 1e-15 });
    expectAllClose(sosfilt(butterSos(2, 1, 'highpass', 250), [imp])[0]!, [0.9823854385260917,
      -0.03491340850004554, -0.034282268427027404, -0.03365189166486578, -0.033022642767484976,
      -0.032394872859068474, -0.0317689198851042, -0.031145108862842302], { rtol: 1e-10, atol: 1e-15 });
  });
});

describe('butterSos invariants and errors', () => {
  it('has DC gain 1 for a low-pass and 0 at Nyquist', () => {
    for (const order of [1, 2, 3, 6, 9]) {
      // Common practice (Butterworth: maximally flat, |H(0)| = 1; zeros at z = −1).
      expectClose(sosMagnitude(butterSos(order, 30, 'lowpass', 250), [0], 250)[0]!, 1, { atol: 1e-12 });
      expectClose(sosMagnitude(butterSos(order, 30, 'lowpass', 250), [125], 250)[0]!, 0, { atol: 1e-12 });
    }
  });

  it('has all poles inside the unit circle for every fixture design', () => {
    for (const c of fixture.butter) {
      for (const row of design(c)) {
        // Common practice: a biquad 1 + a1 z^-1 + a2 z^-2 is stable iff |a2| < 1 and |a1| < 1 + a2.
        expect(Math.abs(row[5]!)).toBeLessThan(1);
        expect(Math.abs(row[4]!)).toBeLessThan(1 + row[5]!);
      }
    }
  });

  it('rejects orders, edges and kinds out of range, naming the argument', () => {
    // Common practice: a design outside (0, Nyquist) has no meaning.
    expect(() => butterSos(0, 10, 'lowpass', 250)).toThrow(ParamError);
    expect(() => butterSos(2.5, 10, 'lowpass', 250)).toThrow(/order/);
    expect(() => butterSos(2, 125, 'lowpass', 250)).toThrow(/edgesHz/);
    expect(() => butterSos(2, 0, 'highpass', 250)).toThrow(/edgesHz/);
    expect(() => butterSos(2, [30, 8], 'bandpass', 250)).toThrow(/edgesHz/);
    expect(() => butterSos(2, 10, 'bandpass', 250)).toThrow(/edgesHz/);
    expect(() => butterSos(2, 10, 'notch' as FilterKind, 250)).toThrow(/kind/);
    expect(() => butterSos(2, 10, 'lowpass', 0)).toThrow(/sampleRateHz/);
  });
});
