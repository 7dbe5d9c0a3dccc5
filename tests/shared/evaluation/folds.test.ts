import { describe, expect, it } from 'vitest';
import { deriveSeed, leaveOneGroupOut, repeatedStratifiedKFold, stratifiedKFold } from '../../../shared/evaluation/folds';

const labels = Uint8Array.from([...new Array(21).fill(0), ...new Array(24).fill(1)]);

describe('stratifiedKFold', () => {
  it('puts every trial in exactly one test fold, disjoint from its training set', () => {
    const plan = stratifiedKFold(labels, 10, 7);
    const count = new Uint8Array(labels.length);
    for (const { train, test } of plan.folds) {
      for (const i of test) count[i]!++;
      // Source: definition of k-fold cross-validation (Kohavi 1995).
      expect(train.length + test.length).toBe(labels.length);
      expect(new Set([...train, ...test]).size).toBe(labels.length);
    }
    expect(Array.from(count).every((c) => c === 1)).toBe(true);
  });

  it('keeps per-class counts and fold sizes within one of each other', () => {
    const plan = stratifiedKFold(labels, 10, 3);
    for (const c of [0, 1]) {
      const perFold = plan.folds.map((f) => Array.from(f.test).filter((i) => labels[i] === c).length);
      // Source: definition of stratification (Kohavi 1995).
      expect(Math.max(...perFold) - Math.min(...perFold)).toBeLessThanOrEqual(1);
    }
    const sizes = plan.folds.map((f) => f.test.length);
    expect(Math.max(...sizes) - Math.min(...sizes)).toBeLessThanOrEqual(1);
  });

  it('is deterministic for a seed and differs between seeds', () => {
    const a = stratifiedKFold(labels, 5, 11), b = stratifiedKFold(labels, 5, 11), c = stratifiedKFold(labels, 5, 12);
    // Source: common practice (seeded, reproducible evaluation).
    expect(a).toEqual(b);
    expect(a.folds.map((f) => Array.from(f.test))).not.toEqual(c.folds.map((f) => Array.from(f.test)));
  });

  it('repeats use different plans and derived seeds', () => {
    const plans = repeatedStratifiedKFold(labels, 5, 3, 1);
    // Source: deriveSeed contract (repeat r uses deriveSeed(seed, r)).
    expect(plans.map((p) => p.seed)).toEqual([0, 1, 2].map((r) => deriveSeed(1, r)));
    expect(new Set(plans.map((p) => JSON.stringify(p.folds.map((f) => Array.from(f.test))))).size).toBe(3);
  });

  it('rejects k below 2 or above the trial count', () => {
    // Source: definition (k-fold needs 2 <= k <= n).
    expect(() => stratifiedKFold(labels, 1, 0)).toThrow(/k/);
    expect(() => stratifiedKFold(Uint8Array.of(0, 1, 0), 4, 0)).toThrow(/k/);
  });

  it('deriveSeed gives distinct seeds for distinct paths', () => {
    const seeds = new Set<number>();
    for (let r = 0; r < 20; r++) for (let f = 0; f < 20; f++) seeds.add(deriveSeed(0, r, f));
    for (let r = 0; r < 20; r++) seeds.add(deriveSeed(0, r));
    // Source: common practice (no accidental seed reuse between inner plans).
    expect(seeds.size).toBe(420);
  });
});

describe('leaveOneGroupOut', () => {
  it('tests each run once and never splits a run', () => {
    const runs = Int32Array.of(4, 4, 8, 8, 8, 12, 12);
    const plan = leaveOneGroupOut(runs);
    // Source: REFERENCES.md §6 (keep whole runs together in folds).
    expect(plan.folds.map((f) => Array.from(f.test))).toEqual([[0, 1], [2, 3, 4], [5, 6]]);
    expect(Array.from(plan.folds[1]!.train)).toEqual([0, 1, 5, 6]);
    expect(() => leaveOneGroupOut([1, 1])).toThrow(/groups/);
  });
});
