import { describe, expect, it } from 'vitest';
import { componentSpectrum, logLogSlope, mapMeasures, scoreComponent, spectrumMeasures, type ComponentSpectrum } from '../../../shared/decoder/prior';
import { MONTAGE_1010, positionOf } from '../../../shared/montage';
import { createRng } from '../../../shared/linalg/random';
import { expectClose } from '../../helpers/all-close';

// The 64 channels of the eegmmidb recordings (REFERENCES.md §8 table order, without Nz).
const NAMES = MONTAGE_1010.map((p) => p.name).filter((n) => n !== 'Nz').slice(0, 64);
const BAND = { lowHz: 1, highHz: 40, sampleRateHz: 160 };
const FREQS = Float64Array.from({ length: 81 }, (_, k) => k); // 1 Hz bins, 0..80 Hz

// The 32 channels of the simulator's demo and decodability profiles (a common 10-20 subset, REFERENCES.md §8 "in 32").
const NAMES_32 = ['Fp1', 'Fp2', 'AF3', 'AF4', 'F7', 'F3', 'Fz', 'F4', 'F8', 'FC5', 'FC1', 'FC2', 'FC6', 'T7', 'C3', 'Cz', 'C4', 'T8',
  'CP5', 'CP1', 'CP2', 'CP6', 'P7', 'P3', 'Pz', 'P4', 'P8', 'PO3', 'PO4', 'O1', 'Oz', 'O2'];

/** A map that is a Gaussian blob (great-circle width in rad) around the given electrodes. */
function blob(centres: string[], width: number, names: readonly string[] = NAMES): Float64Array {
  return Float64Array.from(names, (n) => {
    const p = positionOf(n)!;
    return centres.reduce((acc, c) => {
      const q = positionOf(c)!;
      const d = Math.acos(Math.max(-1, Math.min(1, p.x * q.x + p.y * q.y + p.z * q.z)));
      return acc + Math.exp(-(d * d) / (2 * width * width));
    }, 0);
  });
}

function spectrum(f: (hz: number) => number): ComponentSpectrum {
  return { frequenciesHz: FREQS, psd: FREQS.map((hz) => (hz === 0 ? 0 : f(hz))) };
}

describe('mapMeasures', () => {
  it('gives the uniform map the fractions of the montage\'s electrode counts', () => {
    const m = mapMeasures(new Float64Array(64).fill(1), NAMES);
    // Source: prior.ts module comment (8 of 64 electrodes within 40° of Fpz; 1/C per channel), REFERENCES.md §8 positions.
    expectClose(m.frontalFraction, 8 / 64, { atol: 1e-12 });
    expectClose(m.maxChannelFraction, 1 / 64, { atol: 1e-12 });
  });
});

describe('mapMeasures: eye movements and single electrodes', () => {
  it('reads a left-right mirror map at F7/F8 as fully antisymmetric on the lateral frontal sites', () => {
    const l = blob(['F7'], 0.3), r = blob(['F8'], 0.3);
    const m = mapMeasures(l.map((v, i) => v - r[i]!), NAMES);
    // Source: REFERENCES.md §8 positions (the 10-10 layout is mirror-symmetric in x), so S_R = -S_L exactly.
    expectClose(m.lateralAntisymmetry, 1, { atol: 1e-12 });
    expect(m.lateralFrontalFraction).toBeGreaterThan(0.6);
    // A blink-like map (same sign on both sides) is not antisymmetric. Source: prior.ts definition (0 for equal signs).
    expect(mapMeasures(blob(['Fp1', 'Fp2'], 0.3), NAMES).lateralAntisymmetry).toBe(0);
  });

  it('tells a smooth C3 source on 32 channels from a single electrode by its neighbours', () => {
    // A 22° Gaussian source (the simulator's mu spread) on the 32-channel subset: its nearest electrodes lie 25-35° away.
    const smooth = mapMeasures(blob(['C3'], (22 * Math.PI) / 180, NAMES_32), NAMES_32);
    // Source: the Gaussian fall-off at the neighbours' distances (REFERENCES.md §8 positions): well above 0.2 of the peak.
    expect(smooth.neighbourRatio).toBeGreaterThan(0.2);
    const single = mapMeasures(Float64Array.from(NAMES_32, (n) => (n === 'C3' ? 1 : 0)), NAMES_32);
    // Source: prior.ts definition (neighbours at 0 give ratio 0).
    expect(single.neighbourRatio).toBe(0);
  });
});

describe('spectrumMeasures', () => {
  it('measures the log-log slope of a power law exactly', () => {
    const f = Float64Array.from({ length: 81 }, (_, k) => k);
    // Source: log10(f^-1.5) = -1.5 log10 f, a straight line (least squares recovers it exactly).
    expectClose(logLogSlope(f, f.map((hz) => (hz === 0 ? 0 : hz ** -1.5)), 20, 35), -1.5, { atol: 1e-12 });
    // Source: prior.ts (a fitting range narrower than 8 Hz gives NaN).
    expect(logLogSlope(f, f.map((hz) => hz + 1), 20, 25)).toBeNaN();
    // Source: prior.ts: over [20, f1 - 5] = [20, 35] Hz for the 1-40 Hz band.
    expectClose(spectrumMeasures(spectrum((hz) => hz ** -2), BAND).highFrequencySlope, -2, { atol: 1e-12 });
  });

  it('reads the low- and high-frequency fractions of a 1/f² spectrum', () => {
    const s = spectrumMeasures(spectrum((hz) => 1 / hz ** 2), BAND);
    const total = Array.from({ length: 40 }, (_, k) => 1 / (k + 1) ** 2).reduce((a, b) => a + b);
    // Source: direct sums of 1/f² over the 1 Hz bins 1-4, 20-40 and 1-40 Hz (prior.ts definitions).
    expectClose(s.lowFrequencyFraction, (1 + 1 / 4 + 1 / 9 + 1 / 16) / total, { rtol: 1e-12 });
    expectClose(s.highFrequencyFraction, Array.from({ length: 21 }, (_, k) => 1 / (k + 20) ** 2).reduce((a, b) => a + b) / total, { rtol: 1e-12 });
  });

  it('finds a narrow mains peak and how much of the component it is', () => {
    const s = spectrumMeasures(spectrum((hz) => 1 / hz + (Math.abs(hz - 60) < 0.5 ? 5 : 0)), BAND);
    // Source: prior.ts definitions; the peak bin holds 5 + 1/60 over a 1/f floor.
    expect(s.lineNoiseDb).toBeGreaterThan(10);
    expect(s.lineNoiseFraction).toBeGreaterThan(0.5);
  });
});

describe('scoreComponent', () => {
  it('scores a pure Fp1/Fp2 map with a 1/f² spectrum as an eye component', () => {
    const map = Float64Array.from(NAMES, (n) => (n === 'Fp1' || n === 'Fp2' ? 1 : 0));
    const r = scoreComponent(map, NAMES, spectrum((hz) => 1 / hz ** 2), BAND);
    // Source: REFERENCES.md §8 (blinks largest at Fp1/Fp2, slow); prior.ts formulas: eye = 1 here.
    expect(r.subScores.eye).toBe(1);
    expect(r.plausibility).toBeLessThan(0.2);
    expect(r.weight).toBeGreaterThan(5);
  });

  it('scores a T7-focal map with broadband high-frequency power as a muscle component', () => {
    const map = blob(['T7'], 0.25);
    const r = scoreComponent(map, NAMES, spectrum(() => 1), BAND);
    // Source: prior.ts (flat spectrum: high-frequency fraction 21/40; temporal edge map); common practice for EMG.
    expect(r.subScores.muscle).toBeGreaterThan(0.9);
    expect(r.subScores.eye).toBe(0);
    expect(r.plausibility).toBeLessThan(0.2);
  });

  it('scores a C3-centred mu map with a 1/f spectrum and a 10 Hz peak as plausible', () => {
    const map = blob(['C3'], 0.35);
    const r = scoreComponent(map, NAMES, spectrum((hz) => 1 / hz + 2 * Math.exp(-((hz - 10) ** 2) / 2)), BAND);
    // Source: REFERENCES.md §8 (mu 8-13 Hz over C3/C4); prior.ts: no artifact criterion fires (a 20° blob is
    // slightly focal: its largest channel holds ~37 % of the map energy, just above the 0.35 ramp start).
    expect([r.subScores.eye, r.subScores.muscle, r.subScores.line]).toEqual([0, 0, 0]);
    expect(r.plausibility).toBeGreaterThan(0.9);
    expect(r.measures.peakFrequencyHz).toBe(10);
  });

  it('scores an F7/F8 mirror map with a 1/f² spectrum as a horizontal eye movement, not a blink', () => {
    const l = blob(['F7'], 0.3), r = blob(['F8'], 0.3);
    const res = scoreComponent(l.map((v, i) => v - r[i]!), NAMES, spectrum((hz) => 1 / hz ** 2), BAND);
    // Source: horizontal EOG opposite at F7/F8, a step's 1/f² spectrum (prior.ts module comment); low fraction of
    // 1/f² on 1-40 Hz is 0.77 (above), saccade = 1 when the lateral fraction exceeds 0.6.
    expect(res.subScores.saccade).toBeGreaterThan(0.9);
    expect(res.subScores.eye).toBe(0);
    expect(res.plausibility).toBeLessThan(0.2);
  });

  it('scores a temporal map whose spectrum stops falling above 20 Hz as muscle, even with little power there', () => {
    // 1/f² background plus a small flat floor: P(20-40)/P(1-40) stays below 0.3, the slope over 20-35 Hz is near 0.
    const spec = spectrum((hz) => 1 / hz ** 2 + 4e-3);
    const s = spectrumMeasures(spec, BAND);
    expect(s.highFrequencyFraction).toBeLessThan(0.3);
    const r = scoreComponent(blob(['T7'], 0.25), NAMES, spec, BAND);
    // Source: prior.ts (slope ramp -1 -> 0; EMG spectra flat above 20 Hz, Goncharova et al. 2003; cortical 1/f^chi,
    // chi >= 1, REFERENCES.md §8).
    expect(s.highFrequencySlope).toBeGreaterThan(-1);
    expect(r.subScores.muscle).toBeGreaterThan(0.3);
    // The same spectrum without the floor (pure 1/f²) is not muscle. Source: prior.ts formulas.
    expect(scoreComponent(blob(['T7'], 0.25), NAMES, spectrum((hz) => 1 / hz ** 2), BAND).subScores.muscle).toBe(0);
  });

  it('does not call a smooth C3 mu source on 32 channels focal', () => {
    const map = blob(['C3'], (22 * Math.PI) / 180, NAMES_32);
    const r = scoreComponent(map, NAMES_32, spectrum((hz) => 1 / hz + 2 * Math.exp(-((hz - 10) ** 2) / 2)), BAND);
    // Source: prior.ts (focal needs most energy on one electrode AND neighbours below 0.2 of the peak).
    expect(r.measures.maxChannelFraction).toBeGreaterThan(0.35);
    expect(r.subScores.focal).toBe(0);
    expect(r.plausibility).toBe(1);
  });

  it('scores a single-electrode map as focal', () => {
    const map = Float64Array.from(NAMES, (n) => (n === 'PO7' ? 1 : 0.02));
    const r = scoreComponent(map, NAMES, spectrum((hz) => 1 / hz), BAND);
    // Source: prior.ts (max channel fraction above 0.7 gives focal = 1).
    expect(r.subScores.focal).toBe(1);
  });

  it('gives weight 1 to every component when switched off, keeping the sub-scores', () => {
    const map = Float64Array.from(NAMES, (n) => (n === 'Fp1' || n === 'Fp2' ? 1 : 0));
    const r = scoreComponent(map, NAMES, spectrum((hz) => 1 / hz ** 2), BAND, false);
    // Source: issue 4 part 3 (switchable: --no-prior means all w_k = 1).
    expect(r.weight).toBe(1);
    expect(r.subScores.eye).toBe(1);
  });
});

describe('componentSpectrum', () => {
  it('puts a 10 Hz sinusoid\'s power at 10 Hz', () => {
    const rng = createRng(4);
    const trials = Array.from({ length: 5 }, () => Float64Array.from({ length: 320 }, (_, t) => Math.sin(2 * Math.PI * 10 * t / 160) + 0.1 * rng.nextNormal()));
    const s = componentSpectrum(trials, 160);
    // Source: common practice (Welch PSD of a sinusoid peaks at its frequency; 1 s segments give 1 Hz bins).
    expect(s.frequenciesHz[s.psd.indexOf(Math.max(...s.psd))]).toBe(10);
  });
});
