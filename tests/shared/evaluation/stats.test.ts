import { describe, expect, it } from 'vitest';
import { expectAllClose, expectClose } from '../../helpers/all-close';
import {
  binomialCdf, binomialSf, chanceThreshold, chi2Sf1, mcnemar, normalCdf, normalPpf, normalSf,
  twoProportionZ, wilsonInterval,
} from '../../../shared/evaluation/stats';
import fixture from '../../fixtures/evaluation/stats.json';

describe('chanceThreshold', () => {
  // REFERENCES.md §5 chance-threshold table, 2 classes (Combrisson & Jerbi 2015; [calc] decoding_stats.py):
  // [n, alpha, k0, St %, min correct, exact p (5 decimals), accuracy needed %]
  const rows: [number, number, number, number, number, number, number][] = [
    [20, 0.05, 14, 70.0, 15, 0.02069, 75.0],
    [40, 0.05, 25, 62.5, 26, 0.04035, 65.0],
    [45, 0.05, 28, 62.222, 29, 0.03623, 64.444],
    [80, 0.05, 47, 58.75, 48, 0.04646, 60.0],
    [100, 0.05, 58, 58.0, 59, 0.04431, 59.0],
    [250, 0.05, 138, 55.2, 139, 0.04375, 55.6],
    [500, 0.05, 268, 53.6, 269, 0.04895, 53.8],
    [20, 0.01, 15, 75.0, 16, 0.00591, 80.0],
    [40, 0.01, 27, 67.5, 28, 0.00829, 70.0],
    [45, 0.01, 30, 66.667, 31, 0.00805, 68.889],
    [80, 0.01, 50, 62.5, 51, 0.00916, 63.75],
    [100, 0.01, 62, 62.0, 63, 0.00602, 63.0],
    [250, 0.01, 143, 57.2, 144, 0.00955, 57.6],
    [500, 0.01, 276, 55.2, 277, 0.00884, 55.4],
  ];
  it.each(rows)('n=%i alpha=%f matches the REFERENCES §5 row', (n, alpha, k0, st, minCorrect, p, needed) => {
    const t = chanceThreshold(n, 2, alpha);
    // Source: REFERENCES.md §5 chance-threshold table (values printed to 3 decimals in %, p to 5 decimals).
    expect([t.k0, t.minCorrect]).toEqual([k0, minCorrect]);
    expectClose(100 * t.thresholdAccuracy, st, { atol: 5e-4 });
    expectClose(100 * t.accuracyNeeded, needed, { atol: 5e-4 });
    expectClose(t.exactP, p, { atol: 5e-6 });
  });

  it.each(fixture.chance)('matches scipy binom.ppf/sf for n=$n classes=$classes alpha=$alpha', (c) => {
    const t = chanceThreshold(c.n, c.classes, c.alpha);
    // Source: tests/fixtures/evaluation/stats.json (scipy.stats.binom.ppf and .sf).
    expect(t.k0).toBe(c.k0);
    // Source: same fixture; exact sums agree to rounding.
    expectClose(t.exactP, c.exactP, { rtol: 1e-12, atol: 1e-300 });
  });

  it('45 trials need 29 correct (64.4 %), as REFERENCE-ACCURACY.md states', () => {
    // Source: ../shared/data/eegmmidb/REFERENCE-ACCURACY.md ("29/45 = 64.4 %").
    expect(chanceThreshold(45).minCorrect).toBe(29);
  });

  it('rejects a class count below two', () => {
    // Source: common practice (a chance level needs at least two classes).
    expect(() => chanceThreshold(45, 1)).toThrow(/classes/);
  });
});

describe('wilsonInterval', () => {
  // REFERENCES.md §5 Wilson table ([calc] decoding_stats.py; Newcombe 1998 Table II [mem]).
  const rows: [number, number, number, number][] = [
    [81, 263, 0.255289, 0.366210], [15, 148, 0.062386, 0.160487], [0, 20, 0.0, 0.161125],
    [1, 29, 0.006113, 0.171755], [29, 40, 0.571650, 0.838920], [432, 500, 0.831165, 0.891285],
  ];
  it.each(rows)('%i/%i matches the REFERENCES §5 row', (x, n, lo, hi) => {
    const w = wilsonInterval(x, n);
    // Source: REFERENCES.md §5 Wilson table (6 decimals).
    expectAllClose([w.lower, w.upper], [lo, hi], { atol: 5e-7 });
  });

  it.each(fixture.wilson)('$x/$n at level $level matches the scipy-based fixture', (c) => {
    const w = wilsonInterval(c.x, c.n, c.level);
    // Source: tests/fixtures/evaluation/stats.json (formula with scipy.stats.norm.ppf).
    expectAllClose([w.lower, w.upper], c.interval, { rtol: 1e-13, atol: 1e-15 });
  });
});

describe('normal distribution', () => {
  it('z for 95 % is the REFERENCES value', () => {
    // Source: REFERENCES.md §5, z = 1.959963984540054.
    expectClose(normalPpf(0.975), 1.959963984540054, { rtol: 1e-15 });
  });
  it.each(fixture.normal)('cdf and sf at $x match scipy', ({ x, cdf, sf }) => {
    // Source: tests/fixtures/evaluation/stats.json (scipy.stats.norm.cdf/sf); relative in both tails.
    expectClose(normalCdf(x), cdf, { rtol: 1e-13 });
    expectClose(normalSf(x), sf, { rtol: 1e-13 });
  });
  it.each(fixture.ppf)('ppf at $p matches scipy', ({ p, ppf }) => {
    // Source: tests/fixtures/evaluation/stats.json (scipy.stats.norm.ppf).
    expectClose(normalPpf(p), ppf, { rtol: 1e-13, atol: 1e-15 });
  });
  it.each(fixture.chi2)('chi-square(1) upper tail at $x matches scipy', ({ x, sf }) => {
    // Source: tests/fixtures/evaluation/stats.json (scipy.stats.chi2.sf(x, 1)).
    expectClose(chi2Sf1(x), sf, { rtol: 1e-12 });
  });
});

describe('binomial distribution', () => {
  it.each(fixture.binom)('cdf and sf for n=$n p=$p match scipy', ({ n, p, k, cdf, sf }) => {
    // Source: tests/fixtures/evaluation/stats.json (scipy.stats.binom.cdf/sf); tails relative.
    expectAllClose(k.map((kk) => binomialCdf(kk, n, p)), cdf, { rtol: 1e-11, atol: 1e-300 });
    expectAllClose(k.map((kk) => binomialSf(kk, n, p)), sf, { rtol: 1e-11, atol: 1e-300 });
  });
});

describe('mcnemar', () => {
  // REFERENCES.md §5 McNemar table: [b, c, chi2, p, corrected chi2, corrected p, exact p].
  const rows: [number, number, number, number, number, number, number][] = [
    [15, 5, 5.0, 0.025347, 4.05, 0.044171, 0.041389],
    [10, 3, 3.769231, 0.052204, 2.769231, 0.096092, 0.092285],
    [25, 15, 2.5, 0.113846, 2.025, 0.154729, 0.153860],
  ];
  it.each(rows)('b=%i c=%i matches the REFERENCES §5 row', (b, c, chi2, p, chi2c, pc, exact) => {
    const r = mcnemar(b, c);
    // Source: REFERENCES.md §5 McNemar table (6 decimals).
    expectAllClose([r.chi2, r.p, r.chi2Corrected, r.pCorrected, r.exactP], [chi2, p, chi2c, pc, exact], { atol: 5e-7 });
  });
  it('exact p for 15 vs 5 equals scipy binomtest to full precision', () => {
    // Source: REFERENCES.md §5, scipy.stats.binomtest(5, 20, 0.5).pvalue = 0.04138946533203125.
    expectClose(mcnemar(15, 5).exactP, 0.04138946533203125, { rtol: 1e-14 });
  });
  it('is symmetric in b and c and gives p = 1 without discordant trials', () => {
    // Source: McNemar 1947 (only |b - c| and b + c enter).
    expect(mcnemar(5, 15)).toEqual(mcnemar(15, 5));
    // Source: common practice (no discordant pairs, no evidence).
    expect(mcnemar(0, 0).exactP).toBe(1);
  });
});

describe('twoProportionZ', () => {
  it('matches the REFERENCES §5 worked values', () => {
    // Source: REFERENCES.md §5: 85/100 vs 70/100 -> z = 2.540003, p = 0.011085.
    const a = twoProportionZ(85, 100, 70, 100);
    expectAllClose([a.z, a.p], [2.540003, 0.011085], { atol: 5e-7 });
    // Source: REFERENCES.md §5: 45/60 vs 36/60 -> z = 1.754116, p = 0.079411.
    const b = twoProportionZ(45, 60, 36, 60);
    expectAllClose([b.z, b.p], [1.754116, 0.079411], { atol: 5e-7 });
  });
  it('differs from McNemar on paired data (the unpaired test is the wrong one there)', () => {
    // Source: REFERENCES.md §5 ("using the unpaired z test on paired data is a test bug"):
    // 100 paired trials, A right on 85, B on 70, discordant b = 15, c = 0.
    expect(twoProportionZ(85, 100, 70, 100).p).not.toBeCloseTo(mcnemar(15, 0).exactP, 3);
  });
});
