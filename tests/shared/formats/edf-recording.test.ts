import { describe, expect, it } from 'vitest';
import { edfToRecording, EdfFormatError, readEdf } from '../../../shared/formats/edf';
import { ParamError } from '../../../shared/types';
import { expectAllClose } from '../../helpers/all-close';
import { ANNOTATIONS, concat, header, int16le, slot, smallEdf } from './edf-builder';

/** Two ordinary signals (4 and `n2` samples per 1-s record) + annotations, one record. */
function twoRates(n2: number): Uint8Array {
  return concat(
    header({ signals: [{ label: 'C3..', n: '4' }, { label: 'ECG', n: String(n2) }, ANNOTATIONS] }),
    int16le([1, 2, 3, 4]), int16le(Array.from({ length: n2 }, (_, i) => 10 * i)), slot('+0\x14\x14\x00', 30),
  );
}

describe('edfToRecording', () => {
  it('keeps ordinary signals with their labels and passes annotations through', () => {
    const rec = edfToRecording(readEdf(smallEdf({ tals: ['+0\x14\x14\x00+0.5\x151\x14T1\x14\x00', '+1\x14\x14\x00'] })));
    // Reference: edf-builder.ts smallEdf (4 samples per 1-s record, 0.1 uV per bit; REFERENCES.md §7 scaling).
    expect([rec.channelNames, rec.sampleRateHz, rec.startTime]).toEqual([['Cz'], 4, '2024-01-01T10:00:00']);
    expectAllClose(rec.data[0]!, [0, 0, 0, -100, 0.1, -0.1, 100, -100], { rtol: 0, atol: 1e-9 });
    expect(rec.annotations).toEqual([{ onsetS: 0.5, durationS: 1, text: 'T1' }]);
  });

  it('refuses signals of different rates, naming the signal, unless channels pick one rate', () => {
    const file = readEdf(twoRates(8));
    const e = (() => { try { edfToRecording(file); } catch (err) { return err; } return null; })();
    // Common practice: a Recording has one sample rate; the error names the odd signal.
    expect(e).toBeInstanceOf(EdfFormatError);
    expect((e as EdfFormatError).field).toBe('signals[1].samplesPerRecord');
    expect((e as EdfFormatError).message).toMatch(/'ECG' is sampled at 8 Hz/);
    expect(edfToRecording(file, { channels: ['ECG'] }).sampleRateHz).toBe(8);
    expect(edfToRecording(readEdf(twoRates(4)), { channels: ['ECG', 'C3..'] }).channelNames).toEqual(['ECG', 'C3..']);
  });

  it('refuses an unknown channel label', () => {
    // Common practice (STYLE.md §3): ParamError naming the option.
    expect(() => edfToRecording(readEdf(smallEdf()), { channels: ['C3'] })).toThrow(ParamError);
  });

  it('fills EDF+D gaps with NaN so sample index = time x rate, and keeps onsets', () => {
    const file = readEdf(smallEdf({ reserved: 'EDF+D', records: 3,
      tals: ['+0\x14\x14\x00', '+3\x14\x14\x00+3.25\x14T2\x14\x00', '+4\x14\x14\x00'] }));
    // Reference: Kemp & Olivan 2003 §2.2.4: record times from the time-keeping TALs (gap of 2 s after record 0).
    expectAllClose(file.recordStartsS, [0, 3, 4], { rtol: 0, atol: 0 });
    const rec = edfToRecording(file);
    expect(rec.data[0]!.length).toBe(20);
    // Samples 4-11 (1 s to 3 s) were not recorded.
    expect(Array.from(rec.data[0]!.subarray(4, 12)).every(Number.isNaN)).toBe(true);
    expectAllClose(rec.data[0]!.subarray(12, 16), [0.1, -0.1, 100, -100], { rtol: 0, atol: 1e-9 });
    expect(rec.annotations).toEqual([{ onsetS: 3.25, durationS: null, text: 'T2' }]);
    // Our limit: gap filling beyond maxFilledSamples is refused.
    expect(() => edfToRecording(file, { maxFilledSamples: 12 })).toThrow(EdfFormatError);
  });

  it('moves the start time by a sub-second first record and keeps onsets relative to sample 0', () => {
    const file = readEdf(smallEdf({ tals: ['+0.5\x14\x14\x00+1.5\x14cue\x14\x00', '+1.5\x14\x14\x00'] }));
    const rec = edfToRecording(file);
    // Reference: Kemp & Olivan 2003 §2.2.4 ('+0.X' time keeping = sub-second start after the header time).
    expect(rec.startTime).toBe('2024-01-01T10:00:00.500');
    expect(rec.annotations).toEqual([{ onsetS: 1, durationS: null, text: 'cue' }]);
  });

  it('reads a start date after 2084 from the recording id', () => {
    const bytes = smallEdf();
    const text = (s: string, w: number) => new TextEncoder().encode(s.padEnd(w, ' '));
    bytes.set(text('Startdate 02-MAR-2091 X X X', 80), 88);
    bytes.set(text('02.03.yy', 8), 168);
    // Reference: EDF+ (Kemp & Olivan 2003): after 2084 the header year is 'yy', the recording id has the year.
    expect(readEdf(bytes).startTime).toBe('2091-03-02T10:00:00');
    bytes.set(text('Startdate X X X X', 80), 88);
    expect(() => readEdf(bytes)).toThrow(/'yy'/);
  });

  it('refuses a file with annotations only', () => {
    const onlyAnnotations = concat(header({ duration: '0', signals: [ANNOTATIONS] }), slot('+0\x14\x14\x00+1\x14x\x14\x00', 30));
    const file = readEdf(onlyAnnotations);
    // Reference: Kemp & Olivan 2003: record duration 0 is allowed for an annotation-only file.
    expect(file.annotations).toEqual([{ onsetS: 1, durationS: null, text: 'x' }]);
    expect(() => edfToRecording(file)).toThrow(EdfFormatError);
  });
});
