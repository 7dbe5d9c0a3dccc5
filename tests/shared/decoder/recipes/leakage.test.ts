import { describe, expect, it } from 'vitest';
import { epochRecording } from '../../../../shared/decoder/epochs';
import { preprocessRecording } from '../../../../shared/decoder/online';
import type { AnyStage } from '../../../../shared/decoder/pipeline';
import { planRecipe } from '../../../../shared/decoder/recipes';
import type { MatrixTrials } from '../../../../shared/decoder/recipes/matrix-trials';
import { crossValidate } from '../../../../shared/evaluation/cross-validate';
import { stratifiedKFold } from '../../../../shared/evaluation/folds';
import { syntheticRecording } from '../../../fixtures/decoder/synthetic';

describe.each(['covariance', 'component-tf'] as const)('the %s recipe under cross-validation', (recipe) => {
  it('never fits any stage on a test-fold trial', () => {
    const rec = syntheticRecording({ seed: 5, trials: 30 });
    const plan = planRecipe({ recipe, components: recipe === 'component-tf' ? 5 : 8, lambda: { count: 4 } }, rec.sampleRateHz, rec.channelNames);
    const e = epochRecording(preprocessRecording(plan.preprocess, rec), { classes: ['left', 'right'] }, plan.window.tminS, plan.window.tmaxS);
    const seen: Set<unknown>[] = [];
    const classifierTrials: number[] = [];
    // Spies: the first stage records which trial objects its fit received (take() shares them);
    // the classifier records how many trials its fit (with its inner lambda search) received.
    const spied = (): AnyStage[] => {
      const stages = plan.stages();
      const first = stages[0]!, last = stages[stages.length - 1]!;
      return [
        { kind: first.kind, params: first.params, fit(x, y, ctx) { seen.push(new Set(x as unknown[])); return first.fit(x, y, ctx); } },
        ...stages.slice(1, -1),
        { kind: last.kind, params: last.params, fit(x, y, ctx) { classifierTrials.push((x as MatrixTrials).features.nTrials); return last.fit(x, y, ctx); } },
      ];
    };
    const folds = stratifiedKFold(e.labels, 3, 7);
    crossValidate(spied, e.epochs, e.labels, folds, { innerK: 3 });
    folds.folds.forEach(({ train, test }, f) => {
      // Source: STYLE.md §4 and REFERENCES.md §6 (every fitted step sees the outer training fold only).
      for (const i of test) expect(seen[f]!.has(e.epochs[i]!), `fold ${f} test trial ${i}`).toBe(false);
      expect(seen[f]!.size).toBe(train.length);
      expect(classifierTrials[f]).toBe(train.length);
    });
  });
});
