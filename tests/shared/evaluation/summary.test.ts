import { describe, expect, it } from 'vitest';
import { expectAllClose, expectClose } from '../../helpers/all-close';
import { foldTable, summarizeDecoding } from '../../../shared/evaluation/summary';
import { crossValidate } from '../../../shared/evaluation/cross-validate';
import { stratifiedKFold } from '../../../shared/evaluation/folds';
import { logisticStage } from '../../../shared/decoder/baselines/logistic';

describe('summarizeDecoding', () => {
  // 100 trials, confusion [[45, 5], [5, 45]]: class-1 trials get 0.8 when right, 0.3 when wrong.
  const labels = Array.from({ length: 100 }, (_, i) => (i < 50 ? 0 : 1));
  const probs = labels.map((y, i) => (y === 0 ? (i < 45 ? 0.2 : 0.7) : (i < 95 ? 0.8 : 0.3)));

  it('reports the REFERENCES §5 values for a 90 % result on 100 trials', () => {
    const s = summarizeDecoding(labels, probs, 4);
    expect(s.confusion).toEqual([[45, 5], [5, 45]]);
    // Source: REFERENCES.md §5 kappa row [[45,5],[5,45]] -> 0.8.
    expectClose(s.kappa, 0.8, { rtol: 1e-12 });
    // Source: REFERENCES.md §5 ITR row N=2, P=0.9, T=4 s -> 0.531004 bits/trial, 7.965066 bits/min.
    expectAllClose([s.itr!.bitsPerTrial, s.itr!.bitsPerMin], [0.531004, 7.965066], { atol: 5e-7 });
    // Source: REFERENCES.md §5 chance table, n = 100, alpha 0.05 -> 59 correct needed.
    expect(s.chanceThreshold95.minCorrect).toBe(59);
    expect(s.aboveChance).toBe(true);
    // Source: Hanley & McNeil 1982 (AUC = P(score1 > score0) + ½ P(tie)), counted over all 2500 pairs.
    let wins = 0;
    for (let a = 50; a < 100; a++) for (let b = 0; b < 50; b++) wins += probs[a]! > probs[b]! ? 1 : probs[a] === probs[b] ? 0.5 : 0;
    expectClose(s.auc, wins / 2500, { rtol: 1e-12 });
    // Source: Brier 1950 (mean squared error of the probabilities), computed directly.
    expectClose(s.brier, probs.reduce((t, p, i) => t + (p - labels[i]!) ** 2, 0) / 100, { rtol: 1e-12 });
  });

  it('gives the REFERENCES §5 Wilson interval for 29 of 40', () => {
    const y = Array.from({ length: 40 }, (_, i) => i % 2);
    const p = y.map((v, i) => (i < 29 ? (v === 1 ? 0.9 : 0.1) : (v === 1 ? 0.1 : 0.9)));
    const s = summarizeDecoding(y, p);
    // Source: REFERENCES.md §5 Wilson row 29/40 -> (0.571650, 0.838920).
    expectAllClose(s.wilson95, [0.571650, 0.838920], { atol: 5e-7 });
    expect(s.itr).toBeNull();
  });

  it('builds a per-fold table', () => {
    const y = Uint8Array.from({ length: 20 }, (_, i) => i % 2);
    const x = Array.from(y, (v, i) => Float64Array.of(v * 2 + Math.sin(i)));
    const res = crossValidate([logisticStage()], x, y, stratifiedKFold(y, 4, 0));
    const t = foldTable(res, y);
    // Source: definition (a row per fold; trials add up to the data set).
    expect(t).toHaveLength(4);
    expect(t.reduce((s, r) => s + r.trials, 0)).toBe(20);
  });
});
