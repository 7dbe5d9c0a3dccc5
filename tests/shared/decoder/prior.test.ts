import { describe, expect, it } from 'vitest';
import { componentSpectrum, mapMeasures, scoreComponent, spectrumMeasures, type ComponentSpectrum } from '../../../shared/decoder/prior';
import { MONTAGE_1010, positionOf } from '../../../shared/montage';
import { createRng } from '../../../shared/linalg/random';
import { expectClose } from '../../helpers/all-close';

// The 64 channels of the eegmmidb recordings (REFERENCES.md §8 table order, without Nz).
const NAMES = MONTAGE_1010.map((p) => p.name).filter((n) => n !== 'Nz').slice(0, 64);
const BAND = { lowHz: 1, highHz: 40, sampleRateHz: 160 };
const FREQS = Float64Array.from({ length: 81 }, (_, k) => k); // 1 Hz bins, 0..80 Hz

/** A map that is a Gaussian blob (great-circle width in rad) around the given electrodes. */
function blob(centres: string[], width: number): Float64Array {
  return Float64Array.from(NAMES, (n) => {
    const p = positionOf(n)!;
    return centres.reduce((acc, c) => {
      const q = positionOf(c)!;
      const d = Math.acos(Math.min(1, p.x * q.x + p.y * q.y + p.z * q.z));
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

describe('spectrumMeasures', () => {
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
