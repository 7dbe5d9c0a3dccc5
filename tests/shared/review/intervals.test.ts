import { describe, expect, it } from 'vitest';
import { expectAllClose, expectClose } from '../../helpers/all-close';
import { chanceThreshold, wilsonInterval } from '../../../shared/evaluation/stats';
import { meanShift } from '../../../shared/review/findings-model';
import { meanSd, newcombeDifference, quantile } from '../../../shared/review/intervals';
import { accuracyEstimate } from '../../../shared/review/gap-review';
import fixture from '../../fixtures/review/newcombe.json';

describe('newcombeDifference (Newcombe 1998, method 10)', () => {
  it('gives the worked example 56/70 vs 48/80', () => {
    const d = newcombeDifference(56, 70, 48, 80);
    // Newcombe 1998, Stat Med 17:873-890, Table II example (56/70 - 48/80), method 10: 0.0524 to 0.3339
    // (from memory, unchecked against the printed table; the SciPy-based fixture below agrees to 4 decimals).
    expectAllClose([d.lower, d.upper], [0.0524, 0.3339], { atol: 5e-5 });
    // Source: same example, the point difference 0.8 - 0.6.
    expectClose(d.difference, 0.2, { atol: 1e-12 });
  });

  it.each(fixture.cases)('matches the SciPy-based fixture for $x1/$n1 - $x2/$n2', (c) => {
    const d = newcombeDifference(c.x1, c.n1, c.x2, c.n2);
    // Source: tests/fixtures/review/newcombe.json (make_newcombe.py: SciPy's Wilson limits combined by method 10).
    expectAllClose([d.difference, d.lower, d.upper], [c.difference, c.lower, c.upper], { rtol: 1e-9, atol: 1e-12 });
  });

  it('refuses an empty sample', () => {
    // Source: common practice (a proportion of no trials is undefined).
    expect(() => newcombeDifference(0, 0, 1, 2)).toThrow();
  });
});

describe('accuracy and chance figures the review reuses', () => {
  it('online accuracy 29/40 has the REFERENCES §5 Wilson interval', () => {
    const a = accuracyEstimate(29, 40);
    // Source: REFERENCES.md §5 Wilson table, 29/40 -> (0.571650, 0.838920).
    expectAllClose(a.wilson95, [0.571650, 0.838920], { atol: 5e-7 });
  });
  it('offline 86.4 % of 500 has the REFERENCES §5 Wilson interval', () => {
    const a = accuracyEstimate(0.864 * 500, 500);
    // Source: REFERENCES.md §5 Wilson table, 432/500 -> (0.831165, 0.891285).
    expectAllClose(a.wilson95, [0.831165, 0.891285], { atol: 5e-7 });
  });
  it('chance threshold for 40 trials needs 26 correct', () => {
    // Source: REFERENCES.md §5 chance table, n = 40, α = 0.05: min correct 26, accuracy needed 65 %.
    expect(chanceThreshold(40).minCorrect).toBe(26);
    const w = wilsonInterval(81, 263);
    // Source: REFERENCES.md §5 Wilson table, 81/263 -> (0.255289, 0.366210).
    expectAllClose([w.lower, w.upper], [0.255289, 0.366210], { atol: 5e-7 });
  });
});

describe('quantile, meanSd and meanShift', () => {
  it.each(fixture.quantiles)('quantile q=$q matches NumPy', ({ q, value }) => {
    // Source: tests/fixtures/review/newcombe.json quantiles (numpy.quantile, linear).
    expectClose(quantile(fixture.latencies, q), value, { rtol: 1e-12 });
  });
  it('meanShift matches Welch statistic from SciPy', () => {
    const s = meanShift(fixture.welch.a, fixture.welch.b)!;
    // Source: tests/fixtures/review/newcombe.json welch (scipy.stats.ttest_ind equal_var=False, p = 2·norm.sf(|t|)).
    expectAllClose([s.shift, s.p], [fixture.welch.shift, fixture.welch.p], { rtol: 1e-9 });
    // Source: common practice (no spread estimate from one value).
    expect(meanShift([1], [2, 3])).toBeNull();
  });
  it('meanSd uses the n-1 denominator', () => {
    // Source: from memory, unchecked: sample SD of 2,4,4,4,5,5,7,9 is sqrt(32/7) (population SD 2).
    expectClose(meanSd([2, 4, 4, 4, 5, 5, 7, 9]).sd, Math.sqrt(32 / 7), { rtol: 1e-12 });
  });
});
