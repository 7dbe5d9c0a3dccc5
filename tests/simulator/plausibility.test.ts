// Plausibility of the simulated EEG against the ranges of REFERENCES.md §8, on the shipped demo
// profile. One 10-minute recording, plus 3-minute runs with one ingredient switched off: the
// generator's streams are independent, so "with" minus "without" isolates that ingredient exactly.
import { beforeAll, describe, expect, it } from 'vitest';
import { simulateRecording } from '../../simulator/offline';
import type { SimulationProfileInput } from '../../simulator/profile';
import type { GroundTruth } from '../../simulator/truth';
import type { Recording } from '../../shared/types';
import { busyProfile, demoProfile } from './fixtures';
import { bandPower, logLogSlope, periodogramAt, welch } from './spectrum';

let main: { recording: Recording; truth: GroundTruth };
let noBlinks: Recording;
let noEffects: Recording;
const fs = 250;
const ch = (rec: Recording, name: string) => rec.data[rec.channelNames.indexOf(name)]!;

beforeAll(() => {
  const demo = demoProfile();
  main = simulateRecording(demo, { seconds: 600 });
  const without = (p: Partial<SimulationProfileInput>) => simulateRecording({ ...demo, ...p }, { seconds: 180 }).recording;
  noBlinks = without({ artifacts: { ...demo.artifacts, blinksPerMin: 0 } });
  noEffects = without({ effects: [] });
});

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

describe('simulated EEG against REFERENCES.md §8', () => {
  const typical = ['F3', 'F4', 'C3', 'Cz', 'C4', 'P3', 'Pz', 'P4'];

  it('has background amplitudes of 10-100 µV peak-to-peak at typical channels', () => {
    const medians = typical.map((name) => {
      const x = ch(main.recording, name);
      const pp: number[] = [];
      for (let s = 0; s + fs <= x.length; s += fs) {
        let lo = Infinity;
        let hi = -Infinity;
        for (let i = s; i < s + fs; i++) { lo = Math.min(lo, x[i]!); hi = Math.max(hi, x[i]!); }
        pp.push(hi - lo);
      }
      return median(pp);
    });
    for (const m of medians) {
      // REFERENCES.md §8 [mem] (Niedermeyer's Electroencephalography): ~10-100 µV peak-to-peak.
      expect(m).toBeGreaterThanOrEqual(10);
      expect(m).toBeLessThanOrEqual(100);
    }
    // REFERENCES.md §8 [mem]: background typically 20-50 µV.
    expect(median(medians)).toBeGreaterThanOrEqual(20);
    expect(median(medians)).toBeLessThanOrEqual(50);
  });

  it('has a 1/f spectrum: log-log slope between -2.5 and -0.5 over 2-40 Hz', () => {
    for (const name of typical) {
      const { f, pxx } = welch(ch(main.recording, name), fs, 512);
      const slope = logLogSlope(f, pxx, 2, 40);
      // REFERENCES.md §8 [mem] (Pritchard 1992; He et al. 2010): power ∝ 1/f^chi, chi ≈ 1-2; we allow 0.5-2.5.
      expect(slope, name).toBeGreaterThanOrEqual(-2.5);
      expect(slope, name).toBeLessThanOrEqual(-0.5);
    }
  });

  it('has an occipital alpha peak near 10 Hz, above the 1/f trend and stronger than frontally', () => {
    for (const name of ['O1', 'Oz', 'O2']) {
      const { f, pxx } = welch(ch(main.recording, name), fs, 1024);
      let peak = 0;
      f.forEach((fk, k) => { if (fk >= 7 && fk <= 14 && pxx[k]! > pxx[peak]!) peak = k; });
      // REFERENCES.md §8 [mem] (Berger 1929; Kane et al. 2017): alpha 8-13 Hz; the demo's is 10 Hz.
      expect(Math.abs(f[peak]! - 10), name).toBeLessThanOrEqual(1);
      // A peak, not the 1/f tail: at least 3x the power at 14 Hz and above the 7 Hz value.
      const at = (hz: number) => pxx[Math.round((hz * 1024) / fs)]!;
      expect(pxx[peak]!, name).toBeGreaterThan(3 * at(14));
      expect(pxx[peak]!, name).toBeGreaterThan(at(7));
    }
    const alpha = (name: string) => bandPower(ch(main.recording, name).subarray(0, 60 * fs), fs, 8, 12);
    // REFERENCES.md §8 [mem]: alpha is maximal occipital/parietal.
    expect(alpha('Oz')).toBeGreaterThan(3 * alpha('Fz'));
    expect(alpha('O1')).toBeGreaterThan(3 * alpha('F3'));
  });

  it('has blinks of 50-200 µV at Fp1/Fp2 lasting 200-400 ms, largest frontally', () => {
    const n = noBlinks.data[0]!.length;
    const blinks = main.truth.artifacts.filter((a) => a.kind === 'blink' && a.endSample <= n &&
      !main.truth.dropouts.some((d) => d.startSample < a.endSample && d.endSample > a.startSample));
    expect(blinks.length).toBeGreaterThan(20);
    const isolated = (name: string, a: { startSample: number; endSample: number }) => {
      const on = ch(main.recording, name);
      const off = ch(noBlinks, name);
      return Float64Array.from({ length: a.endSample - a.startSample }, (_, i) => on[a.startSample + i]! - off[a.startSample + i]!);
    };
    for (const b of blinks) {
      for (const name of ['Fp1', 'Fp2']) {
        const x = isolated(name, b);
        const peak = Math.max(...x);
        // REFERENCES.md §8 [mem]/[cp]: ~50-200 µV at Fp.
        expect(peak).toBeGreaterThanOrEqual(50);
        expect(peak).toBeLessThanOrEqual(200);
        const above = x.filter((v) => v > 0.05 * peak).length / fs;
        // REFERENCES.md §8 [mem]/[cp]: duration ~200-400 ms (measured above 5 % of the peak).
        expect(above).toBeGreaterThanOrEqual(0.2);
        expect(above).toBeLessThanOrEqual(0.4);
      }
      const ratio = Math.max(...isolated('Cz', b)) / Math.max(...isolated('Fp1', b));
      // REFERENCES.md §8 [src] Corby & Kopell 1972: blink at Cz ≈ 9.3 % of the vertical EOG; Fp1 sits
      // near the EOG site, so Cz/Fp1 must be of that order.
      expect(ratio).toBeGreaterThan(0.05);
      expect(ratio).toBeLessThan(0.2);
      // REFERENCES.md §8 [src] (Verleger 1993): few blinks exceed 50 µV at Pz/Oz.
      expect(Math.max(...isolated('Oz', b))).toBeLessThan(50);
    }
    // The blink shows in the raw data too: Fp1 mid-blink lies well above the preceding half second.
    const fp1 = ch(main.recording, 'Fp1');
    const visible = blinks.filter((b) => {
      const mid = (b.startSample + b.endSample) / 2;
      const before = median(Array.from(fp1.subarray(Math.max(0, b.startSample - fs / 2), b.startSample)));
      return fp1[Math.round(mid)]! - before > 0.4 * b.amplitudeUv;
    });
    // Common practice: blinks are visible by eye at Fp1.
    expect(visible.length / blinks.length).toBeGreaterThan(0.9);
    // REFERENCES.md §8 [cp]: 10-20 blinks/min; the demo asks for 12/min (Poisson over 10 min).
    const perMin = main.truth.artifacts.filter((a) => a.kind === 'blink').length / 10;
    expect(perMin).toBeGreaterThanOrEqual(8);
    expect(perMin).toBeLessThanOrEqual(16);
  });

  it('has a mains line at the configured 50 Hz on every channel', () => {
    for (const name of main.recording.channelNames) {
      // 2-s segments: 0.5 Hz bins, 50 Hz exactly on one; neighbours 1.5-4 Hz away on both sides.
      const hz = [50, 46, 46.5, 47, 47.5, 48, 48.5, 51.5, 52, 52.5, 53, 53.5, 54];
      const [line, ...neighbours] = periodogramAt(ch(main.recording, name).subarray(0, 60 * fs), fs, 2 * fs, hz);
      // REFERENCES.md §8 [cp]: 50 Hz mains in Europe; the demo profile's mainsHz is 50.
      expect(line!, name).toBeGreaterThan(20 * median(neighbours));
    }
  });

  it('moves the line with the profile: 60 Hz mains shows at 60 Hz, not at 50 Hz', () => {
    const rec = simulateRecording(busyProfile(), { seconds: 30 }).recording;
    const [at60, at50, ...neighbours] = periodogramAt(ch(rec, 'Cz'), fs, 2 * fs, [60, 50, 56, 57, 58, 62, 63, 64]);
    // REFERENCES.md §8 [cp]: 60 Hz mains in North America; busyProfile's mainsHz is 60.
    expect(at60!).toBeGreaterThan(20 * median(neighbours));
    expect(at50!).toBeLessThan(3 * median(neighbours));
  });

  it('puts the class effects where the profile says, with about the profile\'s size', () => {
    const effects = main.truth.effects;
    const n = noEffects.data[0]!.length;
    for (const e of effects) {
      const lo = e.frequencyHz - e.bandwidthHz / 2;
      const hi = e.frequencyHz + e.bandwidthHz / 2;
      const a0 = Math.round((e.onsetS + e.rampS) * fs);
      const a1 = Math.round((e.onsetS + e.durationS - e.rampS) * fs);
      const trials = main.truth.cues.filter((c) => c.class === e.class && c.sample + a1 <= n);
      const change = (name: string) => {
        let withP = 0;
        let withoutP = 0;
        for (const c of trials) {
          withP += bandPower(ch(main.recording, name).subarray(c.sample + a0, c.sample + a1), fs, lo, hi);
          withoutP += bandPower(ch(noEffects, name).subarray(c.sample + a0, c.sample + a1), fs, lo, hi);
        }
        return (withP / withoutP - 1) * 100;
      };
      const near = change(e.nearChannel);
      // The profile's changePercent is the source's power change; at its channel the background
      // dilutes it a little (Pfurtscheller & Lopes da Silva 1999 define ERD% = (A - R)/R * 100).
      expect(near / e.changePercent, `effect ${e.index} at ${e.nearChannel}`).toBeGreaterThan(0.75);
      expect(near / e.changePercent, `effect ${e.index} at ${e.nearChannel}`).toBeLessThanOrEqual(1.0);
      const other = e.nearChannel === 'C4' ? 'C3' : 'C4';
      // Contralateral only (Pfurtscheller & Lopes da Silva 1999): the other hemisphere is unchanged.
      expect(Math.abs(change(other)), `effect ${e.index} at ${other}`).toBeLessThan(2);
    }
  });

  it('shows mu ERD after the cue against the pre-cue reference, contralateral to the imagined hand', () => {
    // ERD% = (A - R)/R * 100 with R, A band powers averaged over trials
    // (Pfurtscheller & Lopes da Silva 1999, REFERENCES.md §8 [src]).
    const erd = (pairs: Array<[string, string]>) => {
      let R = 0;
      let A = 0;
      for (const [cls, name] of pairs) {
        const x = ch(main.recording, name);
        for (const c of main.truth.cues.filter((q) => q.class === cls && q.sample + 4 * fs <= x.length)) {
          R += bandPower(x.subarray(c.sample - Math.round(2.5 * fs), c.sample), fs, 9.5, 12.5);
          A += bandPower(x.subarray(c.sample + Math.round(0.75 * fs), c.sample + Math.round(3.25 * fs)), fs, 9.5, 12.5);
        }
      }
      return ((A - R) / R) * 100;
    };
    const contra = erd([['left-hand', 'C4'], ['right-hand', 'C3']]);
    const ipsi = erd([['left-hand', 'C3'], ['right-hand', 'C4']]);
    // The demo profile asks for -40 % mu power (REFERENCES.md §8 [mem]: typical MI mu ERD 20-50 %).
    // A 1.5 Hz-wide rhythm in 2.5-s windows gives each trial's power a coefficient of variation
    // near 0.5, so ~80 trials leave about ±8 % (1 sd) on the ratio: bounds are about 3 sd wide.
    expect(contra).toBeLessThan(-20);
    expect(contra).toBeGreaterThan(-60);
    expect(Math.abs(ipsi)).toBeLessThan(25);
    expect(contra - ipsi).toBeLessThan(-20);
  });
});
