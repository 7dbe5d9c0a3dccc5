import { describe, expect, it } from 'vitest';
import { createRng } from '../../../shared/linalg/random';
import type { FeatureRows } from '../../../shared/decoder/pipeline';
import { logisticStage } from '../../../shared/decoder/baselines/logistic';
import { standardizeStage } from '../../../shared/decoder/stages/standardize';
import { anovaF, selectKBestStage } from '../../../shared/decoder/stages/select-k-best';
import { crossValidate, poolFolds } from '../../../shared/evaluation/cross-validate';
import { stratifiedKFold } from '../../../shared/evaluation/folds';
import { nestedCrossValidate } from '../../../shared/evaluation/nested';

// Protocol of ../shared/refvalues/leakage_demo.py (REFERENCES.md §6): 40 trials x 2000 pure-noise
// features, y = [0, 1] x 20, 5-fold stratified CV, top-20 F-score features + logistic regression
// (C = 1). Our own seeded N(0, 1) data (MT19937), not NumPy's stream, so values differ in detail.
const N = 40, P = 2000, K = 20, SEEDS = [0, 1, 2, 3, 4];
const y = Uint8Array.from({ length: N }, (_, i) => i % 2);

function noise(seed: number): FeatureRows {
  const rng = createRng(seed);
  return Array.from({ length: N }, () => Float64Array.from({ length: P }, () => rng.nextNormal()));
}

const mean = (a: number[]) => a.reduce((s, v) => s + v, 0) / a.length;

describe('leakage regression on pure noise (REFERENCES.md §6)', () => {
  const data = SEEDS.map(noise);

  it('selection inside the folds stays near chance; the same selection on all trials first is far above', () => {
    const clean: number[] = [], leaky: number[] = [];
    data.forEach((x, s) => {
      const plan = stratifiedKFold(y, 5, s);
      // Right: scaling and selection are stages, refitted on each training fold.
      const right = crossValidate([standardizeStage(), selectKBestStage({ k: K }), logisticStage({ C: 1 })], x, y, plan);
      clean.push(poolFolds(right, y).accuracy);
      // Deliberately wrong: choose the 20 features by F score on ALL 40 trials, then cross-validate.
      const f = anovaF(x, y);
      const top = Array.from(f, (_, j) => j).sort((a, b) => f[b]! - f[a]!).slice(0, K);
      const preselected = x.map((r) => Float64Array.from(top, (j) => r[j]!));
      leaky.push(poolFolds(crossValidate([logisticStage({ C: 1 })], preselected, y, plan), y).accuracy);
    });
    // Source: REFERENCES.md §6 / leakage_demo.py (clean mean 0.522 over 20 seeds, max 0.700).
    expect(mean(clean)).toBeLessThan(0.65);
    // Source: REFERENCES.md §6 / leakage_demo.py (leaky mean 0.966 over 20 seeds, min 0.900).
    expect(mean(leaky)).toBeGreaterThan(0.85);
  });

  it('nested CV over C stays near chance as well', () => {
    const accs = data.slice(0, 3).map((x, s) => nestedCrossValidate(
      (C: number) => [standardizeStage(), selectKBestStage({ k: K }), logisticStage({ C })],
      [0.01, 0.1, 1, 10, 100], x, y, { outerK: 5, innerK: 5, seed: s }).accuracy);
    // Source: REFERENCES.md §6 / leakage_demo.py (nested CV 0.425 on seed 0; a correct pipeline stays near 0.5).
    expect(mean(accs)).toBeLessThan(0.65);
  });
});
