import { describe, expect, it } from 'vitest';
import { createRng } from '../../../shared/linalg/random';
import type { FeatureRows, FitContext, Fitted, Stage } from '../../../shared/decoder/pipeline';
import { logisticStage } from '../../../shared/decoder/baselines/logistic';
import { crossValidate, poolFolds } from '../../../shared/evaluation/cross-validate';
import { stratifiedKFold } from '../../../shared/evaluation/folds';
import { chooseHyper, nestedCrossValidate } from '../../../shared/evaluation/nested';

/**
 * Data whose column 0 is the trial id; columns 1.. are features, class 1 shifted by `shift`.
 */
function idData(n: number, p: number, seed: number, shift: number): { x: FeatureRows; y: Uint8Array } {
  const rng = createRng(seed);
  const y = Uint8Array.from({ length: n }, (_, i) => (i * 7) % 3 === 0 ? 1 : 0);
  const x = Array.from({ length: n }, (_, i) => {
    const r = new Float64Array(p + 1);
    r[0] = i;
    for (let j = 1; j <= p; j++) r[j] = rng.nextNormal() + (j <= 2 ? shift * y[i]! : 0);
    return r;
  });
  return { x, y };
}

/** Spy: records the trial ids (column 0) each fit saw and the context it got; drops column 0. */
function spyStage(log: { ids: number[]; ctx?: FitContext }[]): Stage<FeatureRows, FeatureRows> {
  const fitted: Fitted<FeatureRows, FeatureRows> = {
    kind: 'test-spy',
    transform: (x) => x.map((r) => r.slice(1)),
    toArtifact: () => ({ kind: 'test-spy', version: 1, params: {}, learned: {} }),
  };
  return { kind: 'test-spy', params: {}, fit(x, _labels, ctx) { log.push({ ids: x.map((r) => r[0]!), ctx }); return fitted; } };
}

describe('crossValidate', () => {
  it('never lets a test-fold trial reach fit', () => {
    const { x, y } = idData(45, 4, 1, 1.5);
    const log: { ids: number[] }[] = [];
    const plan = stratifiedKFold(y, 10, 5);
    const res = crossValidate([spyStage(log), logisticStage()], x, y, plan);
    // Source: STYLE.md §4 (spy stage; no test-fold index ever reaches fit) and REFERENCES.md §6 rule.
    expect(log).toHaveLength(10);
    log.forEach((entry, f) => {
      const test = new Set(plan.folds[f]!.test);
      expect(entry.ids.some((id) => test.has(id))).toBe(false);
      expect(entry.ids).toEqual(Array.from(plan.folds[f]!.train));
    });
    expect(res.map((r) => Array.from(r.test))).toEqual(plan.folds.map((f) => Array.from(f.test)));
  });

  it('pools a probability for every trial and scores separable data well', () => {
    const { x, y } = idData(60, 4, 2, 3);
    const log: { ids: number[] }[] = [];
    const res = crossValidate([spyStage(log), logisticStage()], x, y, stratifiedKFold(y, 5, 1));
    const pooled = poolFolds(res, y);
    // Source: common practice (a linear model separates classes shifted by 3 SD in two features).
    expect(pooled.tested).toBe(60);
    expect(pooled.probabilities.every((p) => p >= 0 && p <= 1)).toBe(true);
    expect(pooled.accuracy).toBeGreaterThan(0.85);
  });

  it('calls a recipe factory once per fold', () => {
    const { x, y } = idData(20, 2, 3, 1);
    let calls = 0;
    crossValidate(() => { calls++; return [spyStage([]), logisticStage()]; }, x, y, stratifiedKFold(y, 4, 0));
    // Source: crossValidate contract (a factory is called once per fit).
    expect(calls).toBe(4);
  });
});

describe('nestedCrossValidate', () => {
  it('no outer test trial reaches any inner or outer fit', () => {
    const { x, y } = idData(45, 4, 4, 1);
    const log: { ids: number[] }[] = [];
    const grid = [0.1, 1, 10];
    const res = nestedCrossValidate((C: number) => [spyStage(log), logisticStage({ C })], grid, x, y,
                                    { outerK: 5, innerK: 4, seed: 9, repeats: 2 });
    const perFold = grid.length * 4 + 1;
    // Source: REFERENCES.md §6 (Varma & Simon 2006: selection inside each outer training fold).
    expect(log).toHaveLength(2 * 5 * perFold);
    res.folds.forEach((fold, k) => {
      const test = new Set(fold.test);
      const train = new Set(fold.train);
      const fits = log.slice(k * perFold, (k + 1) * perFold);
      for (const fit of fits) {
        expect(fit.ids.some((id) => test.has(id))).toBe(false);
        expect(fit.ids.every((id) => train.has(id))).toBe(true);
      }
      // The last fit of the block is the refit on the whole outer training set; inner fits see less.
      expect(fits[perFold - 1]!.ids).toEqual(Array.from(fold.train));
      for (const fit of fits.slice(0, -1)) expect(fit.ids.length).toBeLessThan(fold.train.length);
    });
  });

  it('returns per-fold choices, a probability for every trial per repeat, and progress to the end', () => {
    const { x, y } = idData(40, 3, 5, 2);
    const events: number[] = [];
    const res = nestedCrossValidate((C: number) => [spyStage([]), logisticStage({ C })], [0.01, 1], x, y,
      { outerK: 4, innerK: 3, repeats: 2, seed: 1, onProgress: (p) => { events.push(p.done); expect(p.total).toBe(2 * 4 * 7); } });
    // Source: nestedCrossValidate contract.
    expect(res.folds).toHaveLength(8);
    expect(res.repeats).toHaveLength(2);
    for (const r of res.repeats) expect(r.probabilities.every((p) => p >= 0 && p <= 1)).toBe(true);
    expect(res.folds.every((f) => [0.01, 1].includes(f.chosen) && f.innerScores.length === 2)).toBe(true);
    expect(events.at(-1)).toBe(56);
    expect(res.accuracy).toBeCloseTo((res.repeatAccuracies[0]! + res.repeatAccuracies[1]!) / 2, 12);
    // Source: common practice (classes 2 SD apart are decodable).
    expect(res.accuracy).toBeGreaterThan(0.75);
  });

  it('hands self-tuning stages a per-fold seed and inner fold count through FitContext', () => {
    const { x, y } = idData(30, 2, 6, 1);
    const log: { ids: number[]; ctx?: FitContext }[] = [];
    nestedCrossValidate(() => [spyStage(log), logisticStage()], [null], x, y, { outerK: 3, innerK: 4, seed: 2 });
    // Source: FitContext contract in pipeline.ts (seed and innerK reach fit).
    expect(log).toHaveLength(3);
    expect(log.every((e) => e.ctx?.innerK === 4)).toBe(true);
    expect(new Set(log.map((e) => e.ctx?.seed)).size).toBe(3);
  });
});

describe('chooseHyper', () => {
  it('picks the best accuracy, breaks ties by log-loss, then by the earliest grid entry', () => {
    // Source: tie rule documented on chooseHyper (nested.ts).
    expect(chooseHyper([{ accuracy: 0.6, logLoss: 0.5 }, { accuracy: 0.7, logLoss: 0.9 }])).toBe(1);
    expect(chooseHyper([{ accuracy: 0.7, logLoss: 0.6 }, { accuracy: 0.7, logLoss: 0.5 }])).toBe(1);
    expect(chooseHyper([{ accuracy: 0.7, logLoss: 0.5 }, { accuracy: 0.7, logLoss: 0.5 }])).toBe(0);
    expect(chooseHyper([{ accuracy: 0.9, logLoss: 0.6 }, { accuracy: 0.7, logLoss: 0.5 }], 'logLoss')).toBe(1);
  });
});

describe('self-tuning stages (FitContext hook)', () => {
  /**
   * A classifier stage that picks its own C by inner CV inside fit, as a warm-started path search
   * would: inner plan from ctx, scores per C, chooseHyper, refit on everything it was given.
   */
  function selfTuningLogistic(grid: number[], log: { ids: number[] }[], chosen: number[]): Stage<FeatureRows, Float64Array> {
    return {
      kind: 'test-self-tuning', params: { grid },
      fit(x, labels, ctx) {
        const y = labels!;
        const plan = stratifiedKFold(y, ctx?.innerK ?? 5, ctx?.seed ?? 0);
        const scores = grid.map((C) => {
          const res = crossValidate([spyStage(log), logisticStage({ C })], x, y, plan);
          const pooled = poolFolds(res, y);
          return { accuracy: pooled.accuracy, logLoss: 0 };
        });
        const C = grid[chooseHyper(scores)]!;
        chosen.push(C);
        return logisticStage({ C }).fit(x, y);
      },
    };
  }

  it('an inner search inside fit never sees the outer test fold', () => {
    const { x, y } = idData(40, 3, 8, 1.5);
    const log: { ids: number[] }[] = [], chosen: number[] = [];
    const plan = stratifiedKFold(y, 5, 3);
    const outer: FeatureRows[] = [];
    const recorder: Stage<FeatureRows, FeatureRows> = {
      kind: 'test-recorder', params: {},
      fit(xx) { outer.push(xx); return { kind: 'test-recorder', transform: (z) => z, toArtifact: () => ({ kind: 'test-recorder', version: 1, params: {}, learned: {} }) }; },
    };
    const res = crossValidate([recorder, selfTuningLogistic([0.01, 1, 100], log, chosen)], x, y, plan, { innerK: 4 });
    // Source: REFERENCES.md §6 (tuning inside the outer training fold only).
    expect(chosen).toHaveLength(5);
    expect(log).toHaveLength(5 * 3 * 4);
    log.forEach((fit, k) => {
      const f = Math.floor(k / 12);
      const test = new Set(plan.folds[f]!.test);
      expect(fit.ids.some((id) => test.has(id))).toBe(false);
    });
    expect(res.every((r) => r.probabilities.length === r.test.length)).toBe(true);
    expect(outer.map((o) => o.length)).toEqual(plan.folds.map((f) => f.train.length));
  });
});
