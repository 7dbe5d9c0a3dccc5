import { describe, expect, it } from 'vitest';
import { readEegmmidb, skipWithoutRealData } from '../../../helpers/real-data';
import { edfToRecording, readEdf } from '../../../../shared/formats/edf';
import { filterRecording } from '../../../../shared/decoder/stages/bandpass';
import { epochRecording } from '../../../../shared/decoder/epochs';
import { cspStage } from '../../../../shared/decoder/baselines/csp';
import { shrinkageLdaStage } from '../../../../shared/decoder/baselines/shrinkage-lda';
import { crossValidate, poolFolds } from '../../../../shared/evaluation/cross-validate';
import { stratifiedKFold } from '../../../../shared/evaluation/folds';
import { chanceThreshold } from '../../../../shared/evaluation/stats';
import type { Epochs } from '../../../../shared/types';

// Real data: PhysioNet eegmmidb S007R04/R08/R12.edf (Schalk et al. 2004; Goldberger et al. 2000),
// T1 (left fist imagery) vs T2 (right), read from ../shared/data/eegmmidb.
describe.skipIf(skipWithoutRealData)('CSP(6) + shrinkage LDA on eegmmidb S007', () => {
  it('reaches the accuracy REFERENCE-ACCURACY.md reports (10-fold, fitted inside folds)', () => {
    let epochs: Epochs = [];
    const labels: number[] = [];
    for (const run of ['R04', 'R08', 'R12']) {
      const rec = edfToRecording(readEdf(readEegmmidb(`S007${run}.edf`)));
      // Reference protocol: Butterworth order 4, 8-30 Hz, zero-phase on the continuous run; 0.5-2.5 s.
      const filtered = filterRecording(rec, { order: 4, lowHz: 8, highHz: 30 }, true);
      const e = epochRecording(filtered, { classes: ['T1', 'T2'] }, 0.5, 2.5);
      epochs = epochs.concat(e.epochs);
      labels.push(...e.labels);
    }
    const y = Uint8Array.from(labels);
    // Source: ../shared/data/eegmmidb/README.md (45 trials per subject over the three runs).
    expect(y.length).toBe(45);
    const plan = stratifiedKFold(y, 10, 0);
    const acc = poolFolds(crossValidate([cspStage({ pairs: 3 }), shrinkageLdaStage()], epochs, y, plan), y).accuracy;
    // Source: ../shared/data/eegmmidb/REFERENCE-ACCURACY.md (S007 CSP(6) + shrinkage LDA 0.969, mean of
    // 5 repeats; one split of 45 trials varies by a few trials, so the bar is 0.8, well above chance).
    expect(acc).toBeGreaterThanOrEqual(0.8);
    // Source: REFERENCES.md §5 / Combrisson & Jerbi 2015 (45 trials need 29 correct at p < 0.05).
    expect(Math.round(acc * 45)).toBeGreaterThanOrEqual(chanceThreshold(45).minCorrect);
  });
});
