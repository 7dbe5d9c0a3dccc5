import { describe, expect, it } from 'vitest';
import { trainDecoder } from '../../../../shared/decoder/train';
import { edfToRecording, readEdf } from '../../../../shared/formats/edf';
import { readEegmmidb, skipWithoutRealData } from '../../../helpers/real-data';

describe('the covariance recipe on real recordings', () => {
  it.skipIf(skipWithoutRealData)('decodes S007 (R04+R08+R12, T1 vs T2) above chance in a single 5-fold cross-validation', () => {
    const runs = ['S007R04.edf', 'S007R08.edf', 'S007R12.edf'].map((f) => edfToRecording(readEdf(readEegmmidb(f))));
    // The default full-rank 64×64 covariance; a smaller search than the defaults (6 λ, 5 outer and 3 inner folds) keeps it fast.
    const { report } = trainDecoder(runs, { recipe: 'covariance', classes: ['T1', 'T2'], folds: 5, inner: 3, repeats: 1, seed: 1,
                                             baselines: false, recipeOptions: { lambda: { count: 6 } } });
    // Source: ../shared/data/eegmmidb/README.md (45 task cues over the three runs).
    expect(report.trials).toBe(45);
    // Source: REFERENCES.md §5 (n = 45, α = 0.05: 29 of 45 correct needed, 64.4 %).
    expect(report.chanceThreshold95).toBeCloseTo(29 / 45, 12);
    // Source: REFERENCE-ACCURACY.md (S007: CSP 0.969, covariance 1.000 outside the project): well above chance.
    expect(report.nestedCvAccuracy).toBeGreaterThan(29 / 45);
    // Source: ../shared/data/eegmmidb/README.md (64 EEG channels): the default keeps every whitened direction.
    expect(report.settings.rank).toBe(64);
  });
});
