import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { edfPlusExample } from '../shared/formats/edf-examples';
import { describe, expect, it } from 'vitest';
import { expectAllClose } from '../helpers/all-close';
import { eegmmidbPath, skipWithoutRealData } from '../helpers/real-data';

const root = fileURLToPath(new URL('../../', import.meta.url));
const run = (...args: string[]) =>
  spawnSync(process.execPath, ['--import', 'tsx', 'cli/main.ts', 'edf-info', ...args], { cwd: root, encoding: 'utf8' });
const fixture = JSON.parse(readFileSync(new URL('../fixtures/formats/eegmmidb_edf.json', import.meta.url), 'utf8')) as {
  files: { header: { records: number }; signals: { label: string; physicalMin: number }[];
    annotations: { onsetS: number; durationS: number | null; text: string }[] }[];
};

interface Info {
  format: string; startTime: string; recordDurationS: number; records: number;
  signals: { label: string; transducer: string; physicalDimension: string; sampleRateHz: number; physicalMin: number;
    physicalMax: number; digitalMin: number; digitalMax: number; prefiltering: string }[];
  annotations: { onsetS: number; durationS: number | null; text: string }[];
}

describe('aftercue edf-info', () => {
  it.skipIf(skipWithoutRealData)('prints one JSON object describing a real recording', () => {
    const r = run(eegmmidbPath('S001R04.edf'));
    expect(r.status, r.stderr).toBe(0);
    const info = JSON.parse(r.stdout) as Info;
    // Reference: ../shared/data/eegmmidb/README.md and tests/fixtures/formats/eegmmidb_edf.json (S001R04).
    expect([info.format, info.startTime, info.recordDurationS, info.records]).toEqual(['EDF+C', '2009-08-12T16:15:00', 1, 125]);
    expect(info.signals.map((s) => s.label)).toEqual(fixture.files[0]!.signals.map((s) => s.label));
    expect(Object.keys(info.signals[0]!).sort()).toEqual(['digitalMax', 'digitalMin', 'label', 'physicalDimension',
      'physicalMax', 'physicalMin', 'prefiltering', 'sampleRateHz', 'transducer']);
    expect(info.signals[8]).toEqual({ label: 'C3..', transducer: 'BCI2000', physicalDimension: 'uV', sampleRateHz: 160,
      physicalMin: -8092, physicalMax: 8092, digitalMin: -8092, digitalMax: 8092, prefiltering: 'HP:0Hz LP:0Hz N:0Hz' });
    expect(info.annotations.map((a) => [a.text, a.durationS])).toEqual(fixture.files[0]!.annotations.map((a) => [a.text, a.durationS]));
    expectAllClose(info.annotations.map((a) => a.onsetS), fixture.files[0]!.annotations.map((a) => a.onsetS), { rtol: 1e-12 });
  });

  it('prints the REFERENCES.md §7 example with its null duration', () => {
    const dir = mkdtempSync(join(tmpdir(), 'aftercue-edf-'));
    const file = join(dir, 'edfplus_example.edf');
    writeFileSync(file, edfPlusExample());
    const r = run(file);
    // Reference: REFERENCES.md §7 byte-exact example (edf_examples.py).
    expect(r.status, r.stderr).toBe(0);
    expect((JSON.parse(r.stdout) as Info).annotations).toEqual([
      { onsetS: 0.5, durationS: 2, text: 'T1' }, { onsetS: 0.75, durationS: null, text: 'Eyes closed' }]);
  });

  it('reports a broken file on stderr with a non-zero exit and nothing on stdout', () => {
    const dir = mkdtempSync(join(tmpdir(), 'aftercue-edf-'));
    const example = edfPlusExample();
    const broken = join(dir, 'truncated.edf');
    writeFileSync(broken, example.subarray(0, 900));
    const r = run(broken);
    // Reference: REFERENCES.md §7 size rule (904 bytes expected, 900 given).
    expect(r.status).not.toBe(0);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/fileSize: file truncated/);
    const missing = run(join(dir, 'absent.edf'));
    expect(missing.status).not.toBe(0);
    expect(missing.stderr).toMatch(/ENOENT/);
  });
});
