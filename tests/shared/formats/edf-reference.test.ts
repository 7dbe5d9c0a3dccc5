import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { readEdf, readEdfHeader, writeEdfPlus } from '../../../shared/formats/edf';
import { parseTals } from '../../../shared/formats/edf-tal';
import { expectAllClose, expectClose } from '../../helpers/all-close';

const dir = new URL('../../fixtures/formats/', import.meta.url);
import { bdfExample, edfPlusExample } from './edf-examples';
interface Examples {
  edfplus: { gain: number; digital: number[]; physical: number[]; record0AnnotationHex: string;
    record1AnnotationHex: string; eegRecord0Hex: string; eegRecord1Hex: string };
  bdf: { triplesHex: string[]; digital: number[] };
  files: Record<string, { size: number; sha256: string }>;
}
const fixture = JSON.parse(readFileSync(new URL('edf_examples.json', dir), 'utf8')) as Examples;
const hex = (b: Uint8Array) => Buffer.from(b).toString('hex');

/** The example files, built in the test (edf-examples.ts). */
const built: Record<string, Uint8Array> = {
  'edfplus_example.edf': edfPlusExample(), 'bdf_example.bdf': bdfExample(false), 'bdfplus_example.bdf': bdfExample(true),
};
const load = (name: string) => built[name]!;

describe('the example files built here', () => {
  it.each(Object.keys(built))('are byte for byte the Python scripts\' %s', (name) => {
    // Reference: edf_examples.json sha256 and size (../shared/refvalues/edf_examples.py, make_edf_examples.py).
    expect([built[name]!.length, createHash('sha256').update(built[name]!).digest('hex')])
      .toEqual([fixture.files[name]!.size, fixture.files[name]!.sha256]);
  });
});

describe('EDF+ byte-exact example (REFERENCES.md §7)', () => {
  const bytes = load('edfplus_example.edf');

  it('reads every header field of the example file', () => {
    const f = readEdf(bytes);
    // Reference: REFERENCES.md §7 byte-exact example (edf_examples.py), 904 bytes = 768 + 2 * 68.
    expect(bytes.length).toBe(fixture.files['edfplus_example.edf']!.size);
    expect({ format: f.format, headerBytes: f.headerBytes, records: f.records, recordBytes: f.recordBytes,
      recordDurationS: f.recordDurationS, patientId: f.patientId, recordingId: f.recordingId, startTime: f.startTime })
      .toEqual({ format: 'EDF+C', headerBytes: 768, records: 2, recordBytes: 68, recordDurationS: 1,
        patientId: 'X X X X', recordingId: 'Startdate 01-JAN-2024 X X X', startTime: '2024-01-01T10:00:00' });
    // Reference: the signal table written by edf_examples.py.
    expect(f.signals.map((s) => [s.label, s.transducer, s.physicalDimension, s.prefiltering, s.samplesPerRecord,
      s.sampleRateHz, s.isAnnotation])).toEqual([
      ['EEG Cz', 'AgAgCl electrode', 'uV', 'HP:0.1Hz LP:75Hz', 4, 4, false],
      ['EDF Annotations', '', '', '', 30, 30, true],
    ]);
  });

  it('scales digital to physical as the worked values say', () => {
    const f = readEdf(bytes);
    // Reference: edf_examples.json (Python, phys = (d - dmin) * gain + pmin), same formula so exact.
    expectAllClose(f.data[0]!, fixture.edfplus.physical, { rtol: 1e-12, atol: 0 });
    // Reference: REFERENCES.md §7 worked values: 0 -> 0.0, 1000 -> 100.0, -32768 -> -3276.8, 32767 -> 3276.7.
    expectAllClose(f.data[0]!.subarray(0, 4), [0, 100, -3276.8, 3276.7], { rtol: 0, atol: 1e-9 });
    // Reference: REFERENCES.md §7, gain 0.1 uV/bit.
    const s = f.signals[0]!;
    expectClose((s.physicalMax - s.physicalMin) / (s.digitalMax - s.digitalMin), 0.1, { rtol: 1e-12 });
  });

  it('reads the same values from an unaligned view of the bytes', () => {
    const padded = new Uint8Array(bytes.length + 1);
    padded.set(bytes, 1);
    // Reference: edf_examples.json physical values; an odd byteOffset takes the DataView path.
    expectAllClose(readEdf(padded.subarray(1)).data[0]!, fixture.edfplus.physical, { rtol: 1e-12, atol: 0 });
  });

  it('parses the annotations and the time-keeping TALs', () => {
    const f = readEdf(bytes);
    // Reference: REFERENCES.md §7 record 0 = '+0' time keeping, '+0.5' 0x15 '2' 'T1', '+0.75' 'Eyes closed'.
    expect(f.annotations).toEqual([
      { onsetS: 0.5, durationS: 2, text: 'T1' },
      { onsetS: 0.75, durationS: null, text: 'Eyes closed' },
    ]);
    // Reference: REFERENCES.md §7, record 1 opens with '+1' 0x14 0x14 0x00.
    expectAllClose(f.recordStartsS, [0, 1], { rtol: 0, atol: 0 });
  });

  it('splits record 0 annotation bytes into three TALs', () => {
    const rec0 = Uint8Array.from(Buffer.from(fixture.edfplus.record0AnnotationHex, 'hex'));
    // Reference: REFERENCES.md §7 hex of record 0 (edf_examples.json).
    expect(parseTals(rec0, 0, rec0.length, 'record 0')).toEqual([
      { onsetS: 0, durationS: null, texts: [''] },
      { onsetS: 0.5, durationS: 2, texts: ['T1'] },
      { onsetS: 0.75, durationS: null, texts: ['Eyes closed'] },
    ]);
  });

  it('writes the same fixed header, sample bytes and TAL bytes as the example', () => {
    const f = readEdf(bytes);
    const out = writeEdfPlus({ channelNames: ['EEG Cz'], sampleRateHz: 4, data: [f.data[0]!], startTime: '2024-01-01T10:00:00',
      annotations: f.annotations }, { physicalRange: [-3276.8, 3276.7] });
    // Reference: edfplus_example.edf, fixed header bytes 0-255 (REFERENCES.md §7 field table).
    expect(hex(out.subarray(0, 256))).toBe(hex(bytes.subarray(0, 256)));
    const h = readEdfHeader(out);
    const rb = h.recordBytes;
    // Reference: edf_examples.json, int16 little-endian sample bytes of both records (e8 03 = 1000, 00 80 = -32768).
    expect(hex(out.subarray(768, 776))).toBe(fixture.edfplus.eegRecord0Hex);
    expect(hex(out.subarray(768 + rb, 776 + rb))).toBe(fixture.edfplus.eegRecord1Hex);
    // Reference: edf_examples.json annotation bytes; our slot is sized to the fullest record (36 bytes, not 60).
    const slot = rb - 8;
    expect(hex(out.subarray(776, 776 + slot))).toBe(fixture.edfplus.record0AnnotationHex.slice(0, 2 * slot));
    expect(hex(out.subarray(776 + rb, 776 + rb + slot))).toBe(fixture.edfplus.record1AnnotationHex.slice(0, 2 * slot));
  });
});

describe('BDF 24-bit worked values (REFERENCES.md §7)', () => {
  it('decodes the five worked byte triples of a plain BDF file', () => {
    const f = readEdf(load('bdf_example.bdf'));
    // Reference: REFERENCES.md §7 BDF version field ff 'BIOSEMI', reserved '24BIT'.
    expect([f.format, f.version, f.reserved, f.bytesPerSample]).toEqual(['BDF', 'BIOSEMI', '24BIT', 3]);
    // Reference: edf_examples.json bdf.digital: 01 00 80 -> -8388607, ff ff 7f -> 8388607, ff ff ff -> -1,
    // 00 00 00 -> 0, 10 27 00 -> 10000; physical range = digital range, so physical = digital.
    expectAllClose(f.data[0]!, fixture.bdf.digital, { rtol: 0, atol: 0 });
  });

  it('reads a BDF+C file with its BDF Annotations signal', () => {
    const f = readEdf(load('bdfplus_example.bdf'));
    // Reference: make_edf_examples.py (BDF+C, 10 three-byte annotation slots).
    expect(f.format).toBe('BDF+C');
    expect(f.annotations).toEqual([{ onsetS: 0.25, durationS: 0.5, text: 'Cue left' }]);
    expectAllClose(f.data[0]!, fixture.bdf.digital, { rtol: 0, atol: 0 });
    expect(f.startTime).toBe('2002-03-02T13:14:15');
  });

  it('writes 24-bit samples that read back to the same digital values', () => {
    const phys = Float64Array.from(fixture.bdf.digital);
    const out = writeEdfPlus({ channelNames: ['Status'], sampleRateHz: 5, data: [phys], annotations: [], startTime: null },
      { format: 'BDF+C', physicalRange: [-8388608, 8388607] });
    const h = readEdfHeader(out);
    // Reference: edf_examples.json triples (little-endian two's complement, 3 bytes each).
    expect(hex(out.subarray(h.headerBytes, h.headerBytes + 15))).toBe(fixture.bdf.triplesHex.join(''));
    expect(h.format).toBe('BDF+C');
  });
});
