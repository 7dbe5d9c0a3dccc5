import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { edfToRecording, readEdf } from '../../../shared/formats/edf';
import { edgeMask } from '../../../shared/tf/coi';
import { cwtPower } from '../../../shared/tf/cwt';
import { logSpacedFrequencies } from '../../../shared/tf/frequencies';
import { createMorletPlan, type MorletPlan } from '../../../shared/tf/morlet-plan';
import { welchPsd } from '../../../shared/tf/welch';
import { expectAllClose } from '../../helpers/all-close';
import { readEegmmidb, skipWithoutRealData } from '../../helpers/real-data';

interface RealSpectrum {
  file: string; label: string; sampleRateHz: number; nSamples: number; firstSamples: number[]; mean: number;
  variance: number; segmentLength: number; overlap: number; frequenciesHz: number[]; psd: number[];
}
const fixture = JSON.parse(readFileSync(new URL('../../fixtures/tf/welch.json', import.meta.url), 'utf8')) as {
  source: string; real: RealSpectrum[] };

// Time-averaged CWT power per frequency outside the cone of influence
// (T&C 1998 time-averaged wavelet spectrum, eq. 22 [number from memory]).
function averagePower(plan: MorletPlan, x: Float64Array): number[] {
  const power = cwtPower(plan, x);
  const mask = edgeMask(plan);
  return Array.from(plan.frequenciesHz, (_, j) => {
    let sum = 0; let n = 0;
    for (let t = 0; t < plan.nTimes; t++) {
      if (mask[j * plan.nTimes + t] === 0) { sum += power[j * plan.nTimes + t]!; n++; }
    }
    return sum / n;
  });
}

function interpolate(xs: number[], ys: number[], at: number): number {
  const k = xs.findIndex((v) => v >= at);
  if (xs[k] === at) return ys[k]!;
  const w = (at - xs[k - 1]!) / (xs[k]! - xs[k - 1]!);
  return ys[k - 1]! * (1 - w) + ys[k]! * w;
}

function ranks(v: number[]): number[] {
  const order = v.map((x, i) => [x, i] as const).sort((a, b) => a[0] - b[0]);
  const r = new Array<number>(v.length);
  order.forEach(([, i], rank) => { r[i] = rank; });
  return r;
}

function pearson(a: number[], b: number[]): number {
  const ma = a.reduce((s, v) => s + v, 0) / a.length;
  const mb = b.reduce((s, v) => s + v, 0) / b.length;
  let sab = 0; let saa = 0; let sbb = 0;
  a.forEach((v, i) => { sab += (v - ma) * (b[i]! - mb); saa += (v - ma) ** 2; sbb += (b[i]! - mb) ** 2; });
  return sab / Math.sqrt(saa * sbb);
}

function slope(x: number[], y: number[]): number {
  return (pearson(x, y) * Math.sqrt(variance(y))) / Math.sqrt(variance(x));
}

function variance(v: number[]): number {
  const m = v.reduce((s, x) => s + x, 0) / v.length;
  return v.reduce((s, x) => s + (x - m) ** 2, 0) / v.length;
}

describe.skipIf(skipWithoutRealData)('CWT on the real recording S001R04 (eegmmidb)', () => {
  const recording = skipWithoutRealData ? null
    : edfToRecording(readEdf(readEegmmidb('S001R04.edf')), { channels: fixture.real.map((r) => r.label) });

  describe.each(fixture.real)('channel $label', (ref) => {
    const x = () => recording!.data[recording!.channelNames.indexOf(ref.label)]!;

    it('reads the same samples as the fixture script, and gives SciPy\'s Welch spectrum', () => {
      const samples = x();
      expect(samples.length).toBe(ref.nSamples);
      // Reference: tests/fixtures/tf/welch.json (make_welch.py parses the EDF with struct from the spec).
      expectAllClose(samples.subarray(0, 8), ref.firstSamples, { rtol: 1e-12 });
      // Same source: the channel mean and variance (whole-record check of the read).
      const mean = samples.reduce((s, v) => s + v, 0) / samples.length;
      const variance = samples.reduce((s, v) => s + (v - mean) ** 2, 0) / samples.length;
      expectAllClose([mean, variance], [ref.mean, ref.variance], { rtol: 1e-9 });
      const { frequenciesHz, psd } = welchPsd(samples, ref.sampleRateHz, { segmentLength: ref.segmentLength, overlap: ref.overlap });
      // Same source: scipy.signal.welch(x, 160, nperseg=320, noverlap=160); FFT rounding only.
      expectAllClose(frequenciesHz, ref.frequenciesHz, { rtol: 1e-14 });
      // Same source, PSD values.
      expectAllClose(psd, ref.psd, { rtol: 1e-9 });
    });

    it('has time-averaged power that follows the shape and level of the Welch spectrum, 2-70 Hz', () => {
      const plan = createMorletPlan({ sampleRateHz: ref.sampleRateHz, nSamples: ref.nSamples,
        frequenciesHz: logSpacedFrequencies(2, 70, 20), cycles: 7, normalisation: 'unit-energy', padding: 'zero', decimation: 4 });
      const cwtMean = averagePower(plan, x());
      const welchAt = Array.from(plan.frequenciesHz, (f) => interpolate(ref.frequenciesHz, ref.psd, f));
      const logF = Array.from(plan.frequenciesHz, Math.log);
      // Reference: tests/fixtures/tf/welch.json (SciPy Welch of the same channel). Rank correlation of the shapes:
      // the brief's bound 0.9 (measured 0.99+).
      expect(pearson(ranks(cwtMean), ranks(welchAt))).toBeGreaterThan(0.9);
      // Same source: log-log correlation (1/f-like shape), common-practice bound 0.95.
      expect(pearson(cwtMean.map(Math.log), welchAt.map(Math.log))).toBeGreaterThan(0.95);
      // Same source: the log-log spectral slopes agree within 0.15 (7-cycle wavelets smooth over ±f/7 Hz).
      expect(Math.abs(slope(logF, cwtMean.map(Math.log)) - slope(logF, welchAt.map(Math.log)))).toBeLessThan(0.15);
      // T&C 1998 eq. 6 normalisation: E|W|^2 = variance of white noise = one-sided density * fs/2, so the level
      // matches fs/2 * Welch up to the wavelet's spectral smoothing; within a factor 2 (measured 0.69-1.6).
      cwtMean.forEach((p, j) => {
        const ratio = p / ((welchAt[j]! * ref.sampleRateHz) / 2);
        expect(ratio, `${plan.frequenciesHz[j]!.toFixed(2)} Hz`).toBeGreaterThan(0.5);
        expect(ratio, `${plan.frequenciesHz[j]!.toFixed(2)} Hz`).toBeLessThan(2);
      });
    });

    it('shows the 60 Hz mains line above 55 and 65 Hz where Welch shows it', () => {
      const welchAt = [55, 60, 65].map((f) => interpolate(ref.frequenciesHz, ref.psd, f));
      // Reference: tests/fixtures/tf/welch.json: the line stands out in SciPy's Welch spectrum of this channel.
      expect(welchAt[1]).toBeGreaterThan(Math.max(welchAt[0]!, welchAt[2]!));
      // Narrow wavelets (sigma_f = f/n = 0.5 Hz, the Welch bin width) resolve the line (Tallon-Baudry et al. 1997).
      const plan = createMorletPlan({ sampleRateHz: ref.sampleRateHz, nSamples: ref.nSamples, frequenciesHz: [55, 60, 65],
        cycles: [110, 120, 130], normalisation: 'unit-energy', padding: 'zero', decimation: 4 });
      const [p55, p60, p65] = averagePower(plan, x());
      // Same source: CWT power at 60 Hz exceeds both neighbours, as in the Welch spectrum.
      expect(p60).toBeGreaterThan(Math.max(p55!, p65!));
    });
  });
});
