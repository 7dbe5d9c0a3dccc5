import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { COMMON_32, MONTAGE_1010, normaliseChannelName, positionOf } from '../../../shared/montage';
import { expectAllClose, expectClose } from '../../helpers/all-close';
import { readEegmmidb, skipWithoutRealData } from '../../helpers/real-data';

interface FixturePosition { name: string; x: number; y: number; z: number; u: number; v: number;
  thetaDeg: number; phiDeg: number }
const fixture = JSON.parse(readFileSync(new URL('../../fixtures/montage/positions_1010.json', import.meta.url),
  'utf8')) as { source: string; common32: string[]; eegmmidbOrder: string[]; positions: FixturePosition[] };

const FIELDS = ['x', 'y', 'z', 'u', 'v', 'thetaDeg', 'phiDeg'] as const;

function must(name: string) {
  const p = positionOf(name);
  if (!p) throw new Error(`no position for ${name}`);
  return p;
}

describe('10-10 positions', () => {
  it('match the fixture written by make_positions.py, row for row', () => {
    // Reference: tests/fixtures/montage/positions_1010.json; 1e-12 because the table is printed with repr().
    expect(MONTAGE_1010.map((p) => p.name)).toEqual(fixture.positions.map((p) => p.name));
    for (const field of FIELDS) {
      expectAllClose(MONTAGE_1010.map((p) => p[field]), fixture.positions.map((p) => p[field]),
        { rtol: 1e-12, atol: 1e-12 });
    }
  });

  it('puts F3 at theta 59.68° and phi 128.77°, as REFERENCES.md prints', () => {
    const f3 = must('F3');
    // REFERENCES.md section 8, table row 32 (two decimals printed).
    expectClose(f3.thetaDeg, 59.68, { atol: 0.005 });
    // REFERENCES.md section 8, table row 32.
    expectClose(f3.phiDeg, 128.77, { atol: 0.005 });
    // REFERENCES.md section 8, table row 32 (x, y, z, u, v printed with four decimals).
    expectAllClose([f3.x, f3.y, f3.z, f3.u, f3.v], [-0.5405, 0.6730, 0.5049, -0.4152, 0.5170], { atol: 5e-5 });
  });

  it('agrees with the four-decimal values printed in REFERENCES.md for a spread of rows', () => {
    // REFERENCES.md section 8: rows FC5, CP3, AF3, F5, T9, PO4, Iz, Nz (theta, phi 2 dp; x, y, z 4 dp).
    const printed: [string, number, number, number, number, number][] = [
      ['FC5', 69.19, 158.84, -0.8717, 0.3374, 0.3553], ['CP3', 49.10, 208.55, -0.6640, -0.3612, 0.6547],
      ['AF3', 73.86, 111.71, -0.3554, 0.8924, 0.2780], ['F5', 73.94, 138.68, -0.7217, 0.6345, 0.2767],
      ['T9', 112.50, 180.00, -0.9239, 0.0, -0.3827], ['PO4', 73.86, 291.71, 0.3554, -0.8924, 0.2780],
      ['Iz', 112.50, 270.00, 0, -0.9239, -0.3827], ['Nz', 112.50, 90.00, 0, 0.9239, -0.3827],
    ];
    for (const [name, theta, phi, x, y, z] of printed) {
      const p = must(name);
      expectAllClose([p.thetaDeg, p.phiDeg], [theta, phi], { atol: 0.005 });
      expectAllClose([p.x, p.y, p.z], [x, y, z], { atol: 5e-5 });
    }
  });

  it('puts Cz at the vertex and the ring electrodes on the equator', () => {
    const cz = must('Cz');
    // REFERENCES.md section 8: +z is the vertex (Cz), theta measured from Cz.
    expectAllClose([cz.x, cz.y, cz.z, cz.u, cz.v, cz.thetaDeg], [0, 0, 1, 0, 0, 0], { atol: 1e-15 });
    // REFERENCES.md section 8: the Fpz-T7-Oz-T8 circumference is the equator (theta = 90°).
    for (const name of ['Fpz', 'Fp1', 'F7', 'T7', 'T8', 'P8', 'O2', 'Oz']) expectClose(must(name).z, 0, { atol: 1e-15 });
  });

  it('lies on the unit sphere with r = theta/90 in the 2-D layout', () => {
    for (const p of MONTAGE_1010) {
      // REFERENCES.md section 8: unit sphere; azimuthal-equidistant layout r = theta / 90°.
      expectClose(Math.hypot(p.x, p.y, p.z), 1, { atol: 1e-12 });
      expectClose(Math.hypot(p.u, p.v), p.thetaDeg / 90, { atol: 1e-12 });
    }
  });

  it('mirrors odd (left) and even (right) electrodes across the midsagittal plane', () => {
    let pairs = 0;
    for (const p of MONTAGE_1010) {
      const m = /^([A-Za-z]+)(\d+)$/.exec(p.name);
      if (!m || Number(m[2]) % 2 === 0) continue;
      const right = positionOf(m[1]! + String(Number(m[2]) + 1));
      if (!right) continue;
      pairs++;
      // Jasper 1958 / REFERENCES.md section 8: odd numbers left, even right, mirror images.
      expect(p.x, p.name).toBeLessThan(0);
      expectAllClose([right.x, right.y, right.z, right.u, right.v], [-p.x, p.y, p.z, -p.u, p.v], { atol: 1e-12 });
    }
    // REFERENCES.md section 8: 27 odd/even pairs in the 64-channel set, (64 - 10 midline) / 2.
    expect(pairs).toBe(27);
  });

  it('lists the 32-channel subset marked "in 32"', () => {
    // REFERENCES.md section 8, column "in 32" (via the fixture's common32 list).
    expect([...COMMON_32]).toEqual(fixture.common32);
    expect(COMMON_32.every((n) => positionOf(n)?.name === n)).toBe(true);
  });
});

describe('normaliseChannelName', () => {
  it.each([
    ['C3..', 'C3'], ['Fc5.', 'FC5'], ['FPZ', 'Fpz'], ['cz', 'Cz'], ['Fcz.', 'FCz'], ['T10.', 'T10'],
    ['Iz..', 'Iz'], ['EEG Fp1-REF', 'Fp1'], ['EEG C4-LE', 'C4'], ['eeg o2', 'O2'], [' Afz ', 'AFz'],
    ['Cp3-A2', 'CP3'], ['TP9', 'TP9'],
  ])('turns %j into %j', (label, expected) => {
    // Common practice (issue 3 part 5, eegmmidb README: labels padded with dots; "EEG x-REF" labels).
    expect(normaliseChannelName(label)).toBe(expected);
  });

  it('leaves labels that are not one 10-10 electrode alone, trimmed', () => {
    // Common practice: a bipolar pair or an annotation channel is not an electrode position.
    expect(normaliseChannelName('Fp1-F7')).toBe('Fp1-F7');
    expect(normaliseChannelName(' EDF Annotations ')).toBe('EDF Annotations');
    expect(positionOf('EDF Annotations')).toBeUndefined();
  });

  it('resolves the old temporal names to their modern positions', () => {
    // Acharya et al. 2016 (ACNS Guideline 2), from REFERENCES.md section 8: T3/T4/T5/T6 -> T7/T8/P7/P8.
    expect(['T3', 'T4', 'T5', 'T6'].map((n) => positionOf(n)?.name)).toEqual(['T7', 'T8', 'P7', 'P8']);
  });
});

describe.skipIf(skipWithoutRealData)('eegmmidb channel labels', () => {
  it('all 64 labels of S001R04.edf normalise to known positions, in the table order', () => {
    const bytes = readEegmmidb('S001R04.edf');
    const ascii = (from: number, len: number) => String.fromCharCode(...bytes.subarray(from, from + len));
    // EDF header (Kemp et al. 1992): number of signals at bytes 252-255, labels 16 bytes each from 256.
    const ns = Number(ascii(252, 4).trim());
    const labels = Array.from({ length: ns }, (_, i) => ascii(256 + 16 * i, 16).trim())
      .filter((l) => l !== 'EDF Annotations');
    // Real data file S001R04.edf: 64 EEG labels in the order of REFERENCES.md section 8.
    expect(labels).toHaveLength(64);
    expect(labels.map((l) => positionOf(l)?.name)).toEqual(fixture.eegmmidbOrder);
  });
});
