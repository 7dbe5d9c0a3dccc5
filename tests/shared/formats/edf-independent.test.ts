import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { writeEdfPlus } from '../../../shared/formats/edf';
import { expectAllClose } from '../../helpers/all-close';
import { writtenRecording } from './edf-builder';

interface PythonRead {
  sha256: string;
  header: Record<string, string>;
  annotationLabel: string;
  signals: { label: string; physicalDimension: string; step: number; digitalMin: number; digitalMax: number; physical: number[] }[];
  annotations: { onsetS: number; durationS: number | null; text: string }[];
  recordStartsS: number[];
}
const fixture = JSON.parse(readFileSync(new URL('../../fixtures/formats/written_read.json', import.meta.url), 'utf8')) as
  { files: Record<string, PythonRead> };

const cases = [
  { name: 'written_edfplus.edf', format: 'EDF+C' as const, label: 'EDF Annotations', digital: [-32768, 32767] },
  { name: 'written_bdfplus.bdf', format: 'BDF+C' as const, label: 'BDF Annotations', digital: [-8388608, 8388607] },
];

describe.each(cases)('files our writer makes, read by an independent Python reader ($format)', ({ name, format, label, digital }) => {
  const ref = fixture.files[name]!;
  const rec = writtenRecording();

  it('are byte for byte the files the Python reader read', () => {
    const bytes = writeEdfPlus(rec, { format, patientCode: 'P-042', recordingCode: 'pilot-7' });
    // Reference: tests/fixtures/formats/written_read.json sha256 (make_written_edf.ts -> read_written_edf.py).
    // When the writer's output changes on purpose, rerun both scripts and review the new JSON.
    expect(createHash('sha256').update(bytes).digest('hex')).toBe(ref.sha256);
  });

  it('carry the EDF+ header fields we meant to write', () => {
    // Reference: written_read.json (Python struct reader); Kemp & Olivan 2003 subfields and date rules.
    expect(ref.header).toMatchObject({ patient: 'P-042 X X X', recording: 'Startdate 05-NOV-2023 pilot-7 X X',
      startdate: '05.11.23', starttime: '14.03.27', reserved: format, n_records: '3', record_duration: '1', ns: '4' });
    expect(ref.annotationLabel).toBe(label);
    expect(ref.signals.map((s) => [s.label, s.physicalDimension, s.digitalMin, s.digitalMax]))
      .toEqual(rec.channelNames.map((c) => [c, 'uV', digital[0], digital[1]]));
  });

  it('hold samples within half a digital step of the recording, as the Python reader scales them', () => {
    rec.data.forEach((x, c) => {
      const s = ref.signals[c]!;
      // Reference: written_read.json physical values; half a step = round-to-nearest quantisation.
      expectAllClose(s.physical.slice(0, x.length), x, { rtol: 0, atol: 0.5 * s.step * (1 + 1e-6) });
      // The padded tail (150 samples) repeats the last sample, within the same tolerance.
      expectAllClose(s.physical.slice(x.length), new Array(150).fill(x[x.length - 1]!), { rtol: 0, atol: 0.5 * s.step * (1 + 1e-6) });
    });
  });

  it('hold the annotations and time-keeping TALs shifted by the 0.5-s sub-second start', () => {
    // Reference: written_read.json; Kemp & Olivan 2003 §2.2.4: onsets count from the header second.
    expect(ref.annotations.map((a) => [a.text, a.durationS])).toEqual(rec.annotations.map((a) => [a.text, a.durationS]));
    expectAllClose(ref.annotations.map((a) => a.onsetS), rec.annotations.map((a) => a.onsetS + 0.5), { rtol: 0, atol: 1e-12 });
    expectAllClose(ref.recordStartsS, [0.5, 1.5, 2.5], { rtol: 0, atol: 1e-12 });
  });
});
