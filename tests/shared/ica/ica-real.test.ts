import { describe, expect, it } from 'vitest';
import { edfToRecording, readEdf } from '../../../shared/formats/edf';
import { fitIca, type IcaMethod } from '../../../shared/ica/ica';
import { readEegmmidb, skipWithoutRealData } from '../../helpers/real-data';

describe.skipIf(skipWithoutRealData)('ICA on real EEG (eegmmidb)', () => {
  it.each(['extended-infomax', 'fastica'] as IcaMethod[])('finds an eye-blink component on S001R04 (%s)', (method) => {
    const rec = edfToRecording(readEdf(readEegmmidb('S001R04.edf')));
    const f = fitIca(rec.data, { nComponents: 15, method, seed: 0 });
    // Real data file S001R04.edf: the fit converges and every number is finite.
    expect(f.converged).toBe(true);
    expect(f.mixing.every((row) => row.every(Number.isFinite))).toBe(true);
    const peakChannel = (j: number) => {
      let best = 0;
      f.mixing.forEach((row, c) => { if (Math.abs(row[j]!) > Math.abs(f.mixing[best]![j]!)) best = c; });
      return rec.channelNames[best]!.replace(/\./g, '').toUpperCase();
    };
    const frontal = Array.from({ length: 5 }, (_, j) => j).filter((j) => /^(FP|AF)/.test(peakChannel(j)));
    // Common practice (EEG): blinks are a large, super-Gaussian source peaking at the frontal poles,
    // so one of the five strongest components peaks at an Fp/AF channel with kurtosis sign +1.
    expect(frontal.some((j) => f.kurtosisSigns[j] === 1)).toBe(true);
  });

  it('converges with FastICA on S005R04, where the plain fixed point wanders', () => {
    const rec = edfToRecording(readEdf(readEegmmidb('S005R04.edf')));
    const f = fitIca(rec.data, { nComponents: 15, method: 'fastica', seed: 0 });
    // Real data file S005R04.edf (without stabilisation: no convergence in 1000 iterations, shared/ica/fastica.ts).
    expect(f.converged).toBe(true);
  });
});
