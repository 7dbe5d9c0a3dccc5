import { readFileSync, readdirSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { edfToRecording, readEdf, readEdfAnnotations, type EdfFile } from '../../../shared/formats/edf';
import { expectAllClose } from '../../helpers/all-close';
import { EEGMMIDB_DIR, readEegmmidb, skipWithoutRealData } from '../../helpers/real-data';

interface FixtureFile {
  file: string;
  fileSize: number;
  header: { version: string; patientId: string; recordingId: string; startDate: string; startTime: string;
    headerBytes: number; reserved: string; records: number; recordDurationS: number; signalCount: number; recordBytes: number };
  signals: { label: string; transducer: string; physicalDimension: string; physicalMin: number; physicalMax: number;
    digitalMin: number; digitalMax: number; prefiltering: string; samplesPerRecord: number }[];
  samples: { signal: number; label: string; length: number; first5: number[]; last5: number[] }[];
  annotations: { onsetS: number; durationS: number | null; text: string }[];
  recordStartsS: number[];
}
const fixture = JSON.parse(readFileSync(new URL('../../fixtures/formats/eegmmidb_edf.json', import.meta.url), 'utf8')) as
  { files: FixtureFile[] };

describe.skipIf(skipWithoutRealData)('EDF+ reader on the real eegmmidb recordings', () => {
  describe.each(fixture.files)('$file', (ref) => {
    let f: EdfFile;
    // Read inside beforeAll: a skipped describe still runs its body to collect tests.
    beforeAll(() => { f = readEdf(readEegmmidb(ref.file)); });

    it('matches the independent Python reader on every header field', () => {
      // Reference: tests/fixtures/formats/eegmmidb_edf.json (make_eegmmidb_fixture.py, struct parsing).
      expect({ version: f.version, patientId: f.patientId, recordingId: f.recordingId, startDate: f.startDateField,
        startTime: f.startTimeField, headerBytes: f.headerBytes, reserved: f.reserved, records: f.records,
        recordDurationS: f.recordDurationS, signalCount: f.signals.length, recordBytes: f.recordBytes }).toEqual(ref.header);
      // Reference: eegmmidb_edf.json signal table (labels keep their dots: 'C3..').
      expect(f.signals.map(({ label, transducer, physicalDimension, physicalMin, physicalMax, digitalMin, digitalMax,
        prefiltering, samplesPerRecord }) => ({ label, transducer, physicalDimension, physicalMin, physicalMax, digitalMin,
        digitalMax, prefiltering, samplesPerRecord }))).toEqual(ref.signals);
    });

    it('is EDF+C with 64 EEG channels at 160 Hz, one-second records, and the size the header implies', () => {
      // Reference: ../shared/data/eegmmidb/README.md (EDF+C, 64 channels + 'EDF Annotations', 160 Hz, 1-s records).
      expect(f.format).toBe('EDF+C');
      expect(f.data.length).toBe(64);
      expect(f.signals[64]!.label).toBe('EDF Annotations');
      expect(new Set(f.signals.slice(0, 64).map((s) => s.sampleRateHz))).toEqual(new Set([160]));
      expect(f.recordDurationS).toBe(1);
      // Reference: REFERENCES.md §7 integrity rule: size = 256 * (ns + 1) + records * record bytes.
      expect(256 * 66 + f.records * 20640).toBe(ref.fileSize);
      expect(f.startTime).toBe('2009-08-12T16:15:00');
    });

    it('gives the first and last five physical samples of four channels as the Python reader', () => {
      for (const s of ref.samples) {
        const k = f.dataSignalIndex.indexOf(s.signal);
        const x = f.data[k]!;
        // Reference: eegmmidb_edf.json samples (Python, (d - dmin) * gain + pmin); rtol 1e-12 per brief.
        expect(x.length).toBe(s.length);
        expectAllClose(x.subarray(0, 5), s.first5, { rtol: 1e-12, atol: 0 });
        expectAllClose(x.subarray(x.length - 5), s.last5, { rtol: 1e-12, atol: 0 });
      }
    });

    it('gives the T0/T1/T2 annotations with their onsets and durations, and record starts +r s', () => {
      // Reference: eegmmidb_edf.json annotation list (time-keeping TALs excluded).
      expect(f.annotations.map((a) => a.text)).toEqual(ref.annotations.map((a) => a.text));
      expectAllClose(f.annotations.map((a) => a.onsetS), ref.annotations.map((a) => a.onsetS), { rtol: 1e-12, atol: 0 });
      expectAllClose(f.annotations.map((a) => a.durationS ?? NaN), ref.annotations.map((a) => a.durationS ?? NaN), { rtol: 1e-12, atol: 0 });
      // Reference: REFERENCES.md §7 / README: the time-keeping TAL of record r reads +r s.
      expectAllClose(f.recordStartsS, Array.from({ length: f.records }, (_, r) => r), { rtol: 0, atol: 0 });
      expectAllClose(f.recordStartsS, ref.recordStartsS, { rtol: 0, atol: 0 });
    });
  });

  it('reads S001R04 record 0 as REFERENCES.md §7 observed: T0 at +0 lasting 4.2 s', () => {
    const { annotations } = readEdfAnnotations(readEegmmidb('S001R04.edf'));
    // Reference: REFERENCES.md §7 real-file observation '+0' 0x15 '4.2' 0x14 'T0'.
    expect(annotations[0]).toEqual({ onsetS: 0, durationS: 4.2, text: 'T0' });
  });

  it('finds 15 task cues (T1/T2) and a size-consistent header in each of the 30 files', () => {
    const files = readdirSync(EEGMMIDB_DIR).filter((n) => n.endsWith('.edf'));
    // Reference: ../shared/data/eegmmidb/README.md: 30 files, 15 task cues per run, T0/T1/T2 only.
    expect(files.length).toBe(30);
    for (const name of files) {
      const bytes = readEegmmidb(name);
      const { header, annotations, recordStartsS } = readEdfAnnotations(bytes);
      expect(header.headerBytes + header.records * header.recordBytes, name).toBe(bytes.length);
      expect(annotations.filter((a) => a.text === 'T1' || a.text === 'T2').length, name).toBe(15);
      expect(new Set(annotations.map((a) => a.text)), name).toEqual(new Set(['T0', 'T1', 'T2']));
      expect(recordStartsS[header.records - 1], name).toBe(header.records - 1);
    }
  });

  it('turns S001R04 into a 64-channel 160 Hz recording with labels as in the file', () => {
    const rec = edfToRecording(readEdf(readEegmmidb('S001R04.edf')));
    // Reference: README (125 one-second records at 160 Hz = 20000 samples); labels from eegmmidb_edf.json.
    expect(rec.sampleRateHz).toBe(160);
    expect(rec.channelNames).toEqual(fixture.files[0]!.signals.slice(0, 64).map((s) => s.label));
    expect(rec.data.every((x) => x.length === 20000)).toBe(true);
    expect(rec.annotations.length).toBe(fixture.files[0]!.annotations.length);
    expect(rec.startTime).toBe('2009-08-12T16:15:00');
    expect(rec.channelNames.slice(8, 13)).toEqual(['C3..', 'C1..', 'Cz..', 'C2..', 'C4..']);
  });
});
