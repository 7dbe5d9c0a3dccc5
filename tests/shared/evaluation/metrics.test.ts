import { describe, expect, it } from 'vitest';
import { expectAllClose, expectClose } from '../../helpers/all-close';
import {
  accuracy, brierScore, cohenKappa, confusionMatrix, logLoss, reliabilityCurve, rocAuc, wolpawItr,
} from '../../../shared/evaluation/metrics';
import fixture from '../../fixtures/evaluation/metrics.json';

describe('wolpawItr', () => {
  // REFERENCES.md §5 ITR table ([calc] decoding_stats.py): [N, P, T s, bits/trial, bits/min].
  const rows: [number, number, number, number, number][] = [
    [2, 0.864, 5, 0.426333, 5.116002], [2, 0.9, 4, 0.531004, 7.965066], [4, 0.7, 4, 0.643220, 9.648305],
    [36, 0.9, 15, 4.188001, 16.752004], [2, 0.5, 5, 0, 0], [2, 1.0, 5, 1, 12],
  ];
  it.each(rows)('N=%i P=%f T=%f matches the REFERENCES §5 row', (n, p, t, bits, perMin) => {
    const r = wolpawItr(n, p, t);
    // Source: REFERENCES.md §5 ITR table (Wolpaw et al. 2002), 6 decimals.
    expectAllClose([r.bitsPerTrial, r.bitsPerMin], [bits, perMin], { atol: 5e-7 });
  });
  it('gives zero below chance', () => {
    // Source: REFERENCES.md §5 convention, B = 0 for P <= 1/N.
    expect(wolpawItr(4, 0.2, 4).bitsPerTrial).toBe(0);
  });
});

describe('cohenKappa', () => {
  // REFERENCES.md §5 kappa rows (Cohen 1960; [calc], sklearn cohen_kappa_score agrees).
  it.each([
    [[[40, 10], [15, 35]], 0.5], [[[45, 5], [5, 45]], 0.8], [[[30, 20], [10, 40]], 0.4],
  ])('%j gives %f', (c, k) => {
    // Source: REFERENCES.md §5 Cohen's kappa worked values.
    expectClose(cohenKappa(c), k, { rtol: 1e-12 });
  });
  it('equals 2·acc - 1 for two balanced classes predicted in balance', () => {
    // Source: REFERENCES.md §5 ("for 2 balanced classes p_e = 0.5 and kappa = 2 acc - 1").
    expectClose(cohenKappa([[40, 10], [10, 40]]), 2 * 0.8 - 1, { rtol: 1e-12 });
  });
});

describe('Brier score and reliability curve', () => {
  it('matches the REFERENCES §5 worked Brier score', () => {
    // Source: REFERENCES.md §5: f = [0.9, 0.8, 0.3, 0.6], o = [1, 1, 0, 0] -> BS = 0.125.
    expectClose(brierScore([1, 1, 0, 0], [0.9, 0.8, 0.3, 0.6]), 0.125, { rtol: 1e-12 });
  });
  it('matches calibration_curve on the REFERENCES §5 set', () => {
    const p = [0.05, 0.15, 0.25, 0.35, 0.45, 0.55, 0.65, 0.75, 0.85, 0.95, 0.12, 0.88];
    const y = [0, 0, 1, 0, 0, 1, 1, 1, 1, 1, 0, 1];
    const c = reliabilityCurve(y, p, 5);
    // Source: REFERENCES.md §5, calibration_curve(n_bins=5, 'uniform') prob_true.
    expectAllClose(c.probTrue, [0, 0.5, 0.5, 1, 1], { rtol: 1e-12 });
    // Source: same, prob_pred (6 decimals).
    expectAllClose(c.probPred, [0.106667, 0.3, 0.5, 0.7, 0.893333], { atol: 5e-7 });
    // Source: same, BS = 0.1128166667.
    expectClose(brierScore(y, p), 0.1128166667, { atol: 5e-11 });
  });
});

describe('against scikit-learn on seeded data with ties', () => {
  it.each(fixture.cases)('$name', (c) => {
    const e = c.expected;
    // Source: tests/fixtures/evaluation/metrics.json (sklearn roc_auc_score; ties by mid-rank).
    expectClose(rocAuc(c.labels, c.scores), e.rocAuc, { rtol: 1e-12 });
    // Source: same fixture: AUC depends only on the ranking, so the probabilities give the same value.
    expectClose(rocAuc(c.labels, c.probabilities), e.rocAuc, { rtol: 1e-12 });
    // Source: same fixture (sklearn confusion_matrix, rows true).
    expect(confusionMatrix(c.labels, c.predictions)).toEqual(e.confusion);
    // Source: same fixture (sklearn cohen_kappa_score).
    expectClose(cohenKappa(confusionMatrix(c.labels, c.predictions)), e.cohenKappa, { rtol: 1e-12 });
    // Source: same fixture (sklearn brier_score_loss, log_loss).
    expectClose(brierScore(c.labels, c.probabilities), e.brier, { rtol: 1e-12 });
    expectClose(logLoss(c.labels, c.probabilities), e.logLoss, { rtol: 1e-12 });
    // Source: same fixture (sklearn calibration_curve, n_bins=5, strategy='uniform').
    const rc = reliabilityCurve(c.labels, c.probabilities, 5);
    expectAllClose(rc.probTrue, e.calibration5.probTrue, { rtol: 1e-12 });
    expectAllClose(rc.probPred, e.calibration5.probPred, { rtol: 1e-12 });
  });
});

describe('rocAuc edge cases', () => {
  it('is 1 for perfect ranking, 0 for reversed, 0.5 for all-tied scores', () => {
    // Source: Hanley & McNeil 1982 (AUC = P(score1 > score0) + ½ P(tie)).
    expect(rocAuc([0, 0, 1, 1], [0.1, 0.2, 0.8, 0.9])).toBe(1);
    expect(rocAuc([0, 0, 1, 1], [0.9, 0.8, 0.2, 0.1])).toBe(0);
    expect(rocAuc([0, 1, 0, 1], [0.5, 0.5, 0.5, 0.5])).toBe(0.5);
  });
  it('is NaN with one class and does not modify its input', () => {
    // Source: common practice (AUC undefined without both classes).
    expect(rocAuc([1, 1], [0.2, 0.3])).toBeNaN();
    const s = Float64Array.of(0.3, 0.1, 0.2);
    rocAuc([0, 1, 0], s);
    // Source: STYLE.md §4 ("does not modify its input").
    expect(Array.from(s)).toEqual([0.3, 0.1, 0.2]);
  });
  it('accuracy counts matches and rejects mismatched lengths', () => {
    // Source: definition.
    expect(accuracy([0, 1, 1, 0], [0, 1, 0, 0])).toBe(0.75);
    expect(() => accuracy([0, 1], [0])).toThrow(/predictions/);
  });
});
