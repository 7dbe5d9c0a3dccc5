import { describe, expect, it } from 'vitest';
import { edfToRecording, readEdf, readEdfHeader, writeEdfPlus, type EdfFile } from '../../../shared/formats/edf';
import { parseTals } from '../../../shared/formats/edf-tal';
import { ParamError, ShapeError, type Recording } from '../../../shared/types';
import { expectAllClose } from '../../helpers/all-close';
import { readEegmmidb, skipWithoutRealData } from '../../helpers/real-data';

/** Deterministic pseudo-random numbers (LCG, Numerical Recipes constants), uniform in [0, 1). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => { s = (Math.imul(s, 1664525) + 1013904223) >>> 0; return s / 2 ** 32; };
}

function synthetic(n: number, channels: number, rateHz: number, seed = 1): Recording {
  const rnd = lcg(seed);
  return {
    channelNames: Array.from({ length: channels }, (_, c) => ['Fp1', 'C3', 'Cz', 'C4', 'O2'][c] ?? `E${c}`),
    sampleRateHz: rateHz,
    // Invented data: random walk plus noise, amplitudes of tens of uV with an offset per channel.
    data: Array.from({ length: channels }, (_, c) => {
      const x = new Float64Array(n);
      let w = 0;
      for (let i = 0; i < n; i++) { w += rnd() - 0.5; x[i] = 40 * (rnd() - 0.5) + 5 * w + 13.7 * c; }
      return x;
    }),
    annotations: [
      { onsetS: 0, durationS: 4.5, text: 'left' },
      { onsetS: 1.0625, durationS: null, text: 'Augen zu — ü' },
      { onsetS: 2.3333333333, durationS: 0, text: 'right' },
      { onsetS: 2.5, durationS: 1, text: 'left' },
      { onsetS: n / rateHz - 0.01, durationS: 0.5, text: 'end' },
    ],
    startTime: '2024-05-06T07:08:09',
  };
}

/** One digital step of each written signal: (pmax - pmin) / (dmax - dmin), from the file itself. */
function steps(f: EdfFile): number[] {
  return f.dataSignalIndex.map((i) => {
    const s = f.signals[i]!;
    return (s.physicalMax - s.physicalMin) / (s.digitalMax - s.digitalMin);
  });
}

function expectRoundTrip(rec: Recording, back: Recording, file: EdfFile): void {
  const step = steps(file);
  // Common practice (EDF quantisation): within one digital step; the writer rounds to nearest, so half a step.
  rec.data.forEach((x, c) => expectAllClose(back.data[c]!.subarray(0, x.length), x, { rtol: 0, atol: 0.5 * step[c]! * (1 + 1e-6) }));
  expect(back.channelNames).toEqual(rec.channelNames);
  expect(back.sampleRateHz).toBe(rec.sampleRateHz);
  expect(back.annotations.map((a) => [a.text, a.durationS])).toEqual(rec.annotations.map((a) => [a.text, a.durationS]));
  // From memory, unchecked: TAL onsets are decimal text; 1e-9 s covers the nanosecond rounding of shifted onsets.
  expectAllClose(back.annotations.map((a) => a.onsetS), rec.annotations.map((a) => a.onsetS), { rtol: 0, atol: 1e-9 });
}

describe('EDF+C / BDF+C write then read', () => {
  it.each(['EDF+C', 'BDF+C'] as const)('keeps samples within one digital step and annotations equal (%s)', (format) => {
    const rec = synthetic(1234, 5, 250);
    const file = readEdf(writeEdfPlus(rec, { format, patientCode: 'P-007', recordingCode: 'MI pilot' }));
    const back = edfToRecording(file);
    expectRoundTrip(rec, back, file);
    // Reference: writer contract (EDF+C/BDF+C, 1-s records at an integer rate, last record padded).
    expect([file.format, file.recordDurationS, file.records, back.data[0]!.length]).toEqual([format, 1, 5, 1250]);
    // Reference: Kemp & Olivan 2003 patient/recording subfields; spaces in a subfield become '_'.
    expect(file.patientId).toBe('P-007 X X X');
    expect(file.recordingId).toBe('Startdate 06-MAY-2024 MI_pilot X X');
    expect(back.startTime).toBe('2024-05-06T07:08:09');
  });

  it('makes BDF+C about 256 times finer than EDF+C on the same data', () => {
    const rec = synthetic(500, 2, 100);
    const edf = steps(readEdf(writeEdfPlus(rec)));
    const bdf = steps(readEdf(writeEdfPlus(rec, { format: 'BDF+C' })));
    // Common practice: 24 bits vs 16 bits = 2^8 finer steps over the same physical range (to 8-char rounding).
    edf.forEach((s, c) => expect(s / bdf[c]!).toBeGreaterThan(250));
  });

  it('keeps a sub-second start time through the time-keeping TALs', () => {
    const rec = { ...synthetic(800, 2, 160), startTime: '2024-05-06T07:08:09.250' };
    const file = readEdf(writeEdfPlus(rec));
    // Reference: Kemp & Olivan 2003 §2.2.4: record 0's time-keeping TAL holds the sub-second start ('+0.25').
    expectAllClose(file.recordStartsS, [0.25, 1.25, 2.25, 3.25, 4.25], { rtol: 0, atol: 1e-12 });
    const back = edfToRecording(file);
    expect(back.startTime).toBe('2024-05-06T07:08:09.250');
    expectRoundTrip(rec, back, file);
  });

  it('handles a flat channel, a given physical range, a 0.5-s record and a null start time', () => {
    const rec: Recording = { channelNames: ['flat', 'ramp'], sampleRateHz: 10, startTime: null, annotations: [],
      data: [new Float64Array(20).fill(-7.25), Float64Array.from({ length: 20 }, (_, i) => i * 10 - 100)] };
    const file = readEdf(writeEdfPlus(rec, { physicalRange: [-200, 200], recordDurationS: 0.5, physicalDimension: 'mV' }));
    // Reference: writer contract: given range used as written; EDF start date 01.01.85 when unknown (EDF+ clipping date).
    expect([file.signals[0]!.physicalMin, file.signals[0]!.physicalMax, file.signals[0]!.physicalDimension]).toEqual([-200, 200, 'mV']);
    expect([file.recordDurationS, file.records, file.startTime]).toEqual([0.5, 4, '1985-01-01T00:00:00']);
    expectRoundTrip(rec, edfToRecording(file), file);
    // Common practice: a flat channel written with its own range still gets pmax != pmin.
    const own = readEdf(writeEdfPlus(rec));
    expect(own.signals[0]!.physicalMax).toBeGreaterThan(own.signals[0]!.physicalMin);
    expectAllClose(own.data[0]!, new Float64Array(20).fill(-7.25), { rtol: 0, atol: steps(own)[0]! });
  });

  it('sizes the annotation slot for the busiest record', () => {
    const rec = synthetic(320, 1, 160);
    rec.annotations = Array.from({ length: 40 }, (_, i) => ({ onsetS: 1 + i / 100, durationS: null, text: `cue ${i}` }));
    const file = readEdf(writeEdfPlus(rec));
    // Reference: Kemp & Olivan 2003 §2.2.2: a TAL never crosses a record, so record 1 holds all 40.
    expect(file.annotations.length).toBe(40);
    expect(file.annotations.map((a) => a.text)).toEqual(rec.annotations.map((a) => a.text));
  });

  it('puts each annotation in the record its onset falls in, after the time-keeping TAL', () => {
    const rec = synthetic(480, 1, 160);
    rec.annotations = [{ onsetS: 2.5, durationS: 1, text: 'b' }, { onsetS: 0.25, durationS: null, text: 'a' }];
    const bytes = writeEdfPlus(rec);
    const h = readEdfHeader(bytes);
    const slotBytes = h.signals[1]!.samplesPerRecord * 2;
    const texts = Array.from({ length: h.records }, (_, r) => {
      const from = h.headerBytes + r * h.recordBytes + 160 * 2;
      return parseTals(bytes, from, from + slotBytes, `record ${r}`).map((t) => [t.onsetS, t.texts.join('|')]);
    });
    // Reference: Kemp & Olivan 2003 §2.2.4 (first TAL of every record keeps time); our rule: onset's own record.
    expect(texts).toEqual([[[0, ''], [0.25, 'a']], [[1, '']], [[2, ''], [2.5, 'b']]]);
  });

  it('does not modify its input', () => {
    const rec = synthetic(300, 2, 100);
    const copy = rec.data.map((x) => x.slice());
    const annotations = structuredClone(rec.annotations);
    writeEdfPlus(rec);
    // Common practice (STYLE.md §4): inputs stay untouched.
    rec.data.forEach((x, c) => expectAllClose(x, copy[c]!, { rtol: 0, atol: 0 }));
    expect(rec.annotations).toEqual(annotations);
  });

  it('refuses what EDF cannot hold, naming the field', () => {
    const rec = synthetic(100, 2, 100);
    const bad = (patch: Partial<Recording>) => () => writeEdfPlus({ ...rec, ...patch });
    // Common practice (STYLE.md §3): typed errors naming the field.
    expect(bad({ data: [rec.data[0]!, Float64Array.of(1, NaN)] })).toThrow(ShapeError);
    const nan = rec.data[0]!.slice(); nan[5] = NaN;
    expect(bad({ data: [nan, rec.data[1]!] })).toThrow(/sample 5 is NaN/);
    expect(bad({ channelNames: ['a-label-of-seventeen', 'b'] })).toThrow(ParamError);
    expect(bad({ channelNames: ['EDF Annotations', 'b'] })).toThrow(/reserved/);
    expect(bad({ annotations: [{ onsetS: 1, durationS: null, text: 'a\x14b' }] })).toThrow(ParamError);
    expect(bad({ startTime: '1970-01-01T00:00:00' })).toThrow(/before 1985/);
    expect(() => writeEdfPlus(rec, { recordDurationS: 0.015 })).toThrow(/whole number of samples/);
    expect(() => writeEdfPlus({ ...rec, sampleRateHz: Math.PI })).toThrow(ParamError);
    expect(() => writeEdfPlus(rec, { patientCode: 'Jöns' })).toThrow(ParamError);
  });
});

describe.skipIf(skipWithoutRealData)('EDF+C round trip of a real recording', () => {
  it('reads S001R04, writes EDF+C, reads back: samples within one step, annotations equal', () => {
    const original = edfToRecording(readEdf(readEegmmidb('S001R04.edf')));
    const file = readEdf(writeEdfPlus(original));
    const back = edfToRecording(file);
    // Reference: real data file S001R04.edf (eegmmidb); one digital step of the written file.
    expectRoundTrip(original, back, file);
    expect(back.data[0]!.length).toBe(20000);
    expect(back.startTime).toBe(original.startTime);
  });
});
