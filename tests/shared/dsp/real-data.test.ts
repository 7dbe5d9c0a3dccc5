import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { butterSos } from '../../../shared/dsp/butter';
import { iirNotchSos } from '../../../shared/dsp/notch';
import { commonAverageReferenceInPlace } from '../../../shared/dsp/reference';
import type { Sos } from '../../../shared/dsp/sos';
import { createSosState, sosfiltChunk } from '../../../shared/dsp/sosfilt';
import { edfToRecording, readEdf } from '../../../shared/formats/edf';
import type { ChannelMajor } from '../../../shared/types';
import { expectAllClose } from '../../helpers/all-close';
import { readEegmmidb, skipWithoutRealData } from '../../helpers/real-data';

interface RealCase { name: string; expected: Record<string, number[]> }
const fx = JSON.parse(readFileSync(new URL('../../fixtures/dsp/real_filter.json', import.meta.url), 'utf8')) as
  { file: string; samples: number; step: number; channels: string[]; cases: RealCase[] };

/** The live path: 50 ms chunks (8 samples at 160 Hz), optional CAR per chunk, filter state carried. */
function stream(x: ChannelMajor, sos: Sos, car: boolean): ChannelMajor {
  const state = createSosState(sos, x.length);
  const out = x.map((c) => new Float64Array(c.length));
  const chunk = 8;
  for (let i = 0; i < x[0]!.length; i += chunk) {
    const part = x.map((c) => c.slice(i, i + chunk));
    if (car) commonAverageReferenceInPlace(part);
    sosfiltChunk(sos, part, state).forEach((y, ch) => out[ch]!.set(y, i));
  }
  return out;
}

describe.skipIf(skipWithoutRealData)('streaming filters on a real recording', () => {
  const rec = edfToRecording(readEdf(readEegmmidb(fx.file)));
  const bp = butterSos(4, [8, 30], 'bandpass', rec.sampleRateHz);
  const designs: Record<string, { sos: Sos; car: boolean }> = {
    'bandpass': { sos: bp, car: false },
    'notch60-then-bandpass': { sos: [...iirNotchSos(60, 30, rec.sampleRateHz), ...bp], car: false },
    'car-then-bandpass': { sos: bp, car: true },
  };

  it.each(fx.cases)('equals SciPy on S001R04.edf in 50 ms chunks: $name', ({ name, expected }) => {
    // Real data file S001R04.edf: 64 channels, 160 Hz, 125 one-second records.
    expect(rec.sampleRateHz).toBe(160);
    expect(rec.data[0]!.length).toBe(fx.samples);
    const { sos, car } = designs[name]!;
    const y = stream(rec.data, sos, car);
    for (const label of fx.channels) {
      const got = y[rec.channelNames.indexOf(label)]!.filter((_, i) => i % fx.step === 0);
      // Reference: tests/fixtures/dsp/real_filter.json (scipy sosfilt of the whole channel, own EDF reader);
      // atol 1e-9 µV: same coefficients to ~1e-15, 20 000 recursive steps of rounding.
      expectAllClose(got, expected[label]!, { rtol: 1e-9, atol: 1e-9 });
    }
  });
});
