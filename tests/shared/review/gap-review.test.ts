import { describe, expect, it } from 'vitest';
import { expectAllClose, expectClose } from '../../helpers/all-close';
import { computeGapReview, type ReviewInput, type ReviewTrial } from '../../../shared/review/gap-review';
import type { FindingKey, ReviewFinding } from '../../../shared/api/review';
import fixture from '../../fixtures/review/newcombe.json';

/**
 * A constructed session: 48 trials alternating left/right, one cue every 4 s, epoch ending 2 s
 * after the cue. Trials 0-39 are clean: 19 of the first 20 correct, 10 of the next 20 (so 29/40
 * online). Trials 40-47 are excluded: 4 artifact, 2 gap, 1 dropout, 1 marked bad without a class;
 * 3 of the 7 labelled excluded trials are correct. Trial 5 took 2500 ms (its feedback lands after
 * cue 6); the others 5 ms.
 */
function constructed(over: Partial<ReviewInput> = {}): ReviewInput {
  const trials: ReviewTrial[] = [];
  for (let i = 0; i < 48; i++) {
    const trueClass = i % 2;
    let correct: boolean;
    if (i < 20) correct = i !== 6;
    else if (i < 40) correct = (i - 20) % 2 === 0; // 10 of 20, errors all on true class 1 -> bias
    else correct = i < 43;
    const predictedClass = correct ? trueClass : 1 - trueClass;
    const p1 = predictedClass === 1 ? 0.8 : 0.2;
    const flags: ReviewTrial['flags'] = i >= 40 && i < 44 ? ['artifact'] : i === 44 || i === 45 ? ['gap'] : i === 46 ? ['dropout'] : [];
    trials.push({ onsetS: 4 * i, trueClass: i === 47 ? null : trueClass, predictedClass, probabilities: [1 - p1, p1], flags,
      markedBad: i === 47, totalLatencyMs: i === 5 ? 2500 : 5 });
  }
  return { classes: ['left', 'right'], trials, offline: { accuracy: 0.864, trials: 500, foldAccuracies: [0.86, 0.88, 0.84, 0.87, 0.862] },
    droppedSamples: 160, gapCount: 2, sampleRateHz: 160, durationS: 200, epochEndS: 2, ...over };
}

const find = (fs: ReviewFinding[], key: FindingKey) => fs.find((f) => f.key === key)!;
const fig = (f: ReviewFinding, label: string) => f.figures.find((x) => x.label === label)!;

describe('computeGapReview on a constructed session', () => {
  const r = computeGapReview(constructed());

  it('headline: online 29/40, offline 86.4 % of 500, Newcombe difference', () => {
    // Source: the construction above (29 correct of 40 clean trials).
    expect([r.online!.correct, r.online!.trials]).toEqual([29, 40]);
    // Source: REFERENCES.md §5 Wilson table, 29/40 and 432/500.
    expectAllClose([...r.online!.wilson95, ...r.offline!.wilson95], [0.571650, 0.838920, 0.831165, 0.891285], { atol: 5e-7 });
    const c = fixture.cases.find((x) => x.x1 === 29 && x.n2 === 500)!;
    // Source: tests/fixtures/review/newcombe.json case 29/40 - 432/500 (SciPy Wilson limits, Newcombe method 10).
    expectAllClose([r.difference!.value, ...r.difference!.newcombe95], [c.difference, c.lower, c.upper], { rtol: 1e-9 });
    // Source: REFERENCES.md §5 chance table, n = 40, α = 0.05: 26 correct needed (65 %).
    expect(r.onlineChance).toEqual({ minCorrect: 26, accuracyNeeded: 0.65, aboveChance: true });
  });

  it('(a) chance: the interval excludes zero, so chance alone is unlikely', () => {
    // Source: fixture interval above (-0.295 to -0.020) excludes 0.
    expect(find(r.findings, 'chance').verdict).toBe('unlikely');
  });

  it('(b) excluded trials by flag, with accuracy on the labelled ones', () => {
    const f = find(r.findings, 'excluded');
    // Source: the construction (4 artifact, 2 gap, 1 dropout, 1 marked bad; 8 of 48 = 16.7 % -> 'possible' by the 10 % rule of thumb).
    expect([fig(f, 'Artifact').value, fig(f, 'Gap in the feed').value, fig(f, 'Dropout (flat or non-finite channel)').value,
      fig(f, 'Marked bad').value, fig(f, 'Excluded trials').value]).toEqual([4, 2, 1, 1, 8]);
    expect(f.verdict).toBe('possible');
    // Source: the construction (trials 40-42 correct of the 7 labelled excluded ones).
    expectClose(fig(f, 'Accuracy on excluded trials (class known)').value!, 3 / 7, { rtol: 1e-12 });
  });

  it('(c) dropped samples: 1 s of 200 s is below the 1 % rule of thumb', () => {
    const f = find(r.findings, 'gaps');
    // Source: the construction (160 samples at 160 Hz = 1 s; 2 trials flagged gap).
    expect([fig(f, 'Dropped time').value, fig(f, 'Trials overlapping a gap').value, f.verdict]).toEqual([1, 2, 'unlikely']);
    const g = computeGapReview(constructed({ droppedSamples: 1600 }));
    // Source: 10 s of 200 s = 5 % >= 1 %.
    expect(find(g.findings, 'gaps').verdict).toBe('possible');
  });

  it('(d) latency: max 2500 ms, one feedback after the next cue', () => {
    const f = find(r.findings, 'latency');
    // Source: the construction (onset 20 s + 2 s epoch + 2.5 s > next cue at 24 s; all others 5 ms).
    expect([fig(f, 'Latency max').value, fig(f, 'Latency p50').value, fig(f, 'Feedback after the next cue').value, f.verdict])
      .toEqual([2500, 5, 1, 'unlikely']);
  });

  it('(e) drift: 19/20 then 10/20 is a likely change, errors one-sided', () => {
    const f = find(r.findings, 'drift');
    // Source: tests/fixtures/review/newcombe.json case 10/20 - 19/20 (second minus first half).
    const c = fixture.cases.find((x) => x.x1 === 10 && x.x2 === 19)!;
    expectAllClose([fig(f, 'Second minus first half').value!, ...fig(f, 'Second minus first half').interval!], [c.difference, c.lower, c.upper],
      { rtol: 1e-9 });
    // Source: interval excludes 0 -> 'likely' (the finding's rule).
    expect(f.verdict).toBe('likely');
    // Source: the construction: 11 errors, 1 on a true-left trial (trial 6), 10 on true-right trials;
    // exact McNemar p = 2·P(Bin(11, ½) <= 1) = 2·12/2048 (McNemar 1947; REFERENCES.md §5 exact form).
    expectClose(fig(f, 'Class bias p (McNemar, exact)').value!, (2 * 12) / 2048, { rtol: 1e-12 });
    // Source: the construction: in the second half true-right trials read log-odds ln(0.2/0.8) on errors.
    expectClose(fig(f, 'Mean log-odds, true right, second half').value!, Math.log(0.2 / 0.8), { rtol: 1e-9 });
  });

  it('(f) over-fitting: 500 calibration trials with a tight fold spread is unlikely; 44 trials is possible', () => {
    // Source: the construction (SD of the five folds ~0.015 < 0.1; 500 >= 100 trials).
    expect(find(r.findings, 'overfitting').verdict).toBe('unlikely');
    const small = computeGapReview(constructed({ offline: { accuracy: 0.75, trials: 44, foldAccuracies: [0.6, 0.9, 0.75, 0.8] } }));
    // Source: 44 < 100 calibration trials (the review's rule of thumb).
    expect(find(small.findings, 'overfitting').verdict).toBe('possible');
    // Source: tests/fixtures/review/newcombe.json case 29/40 - 33/44 includes 0 -> chance 'likely'.
    expect(find(small.findings, 'chance').verdict).toBe('likely');
  });

  it('without an offline estimate the difference is null and the findings say so', () => {
    const n = computeGapReview(constructed({ offline: null }));
    // Source: common practice (nothing to compare).
    expect([n.offline, n.difference, find(n.findings, 'chance').verdict, find(n.findings, 'overfitting').verdict])
      .toEqual([null, null, 'possible', 'possible']);
  });
});
