import { describe, expect, it } from 'vitest';
import { expectClose } from '../../helpers/all-close';
import { replayFinding } from '../../../shared/review/findings-replay';
import { computeGapReview } from '../../../shared/review/gap-review';

const fig = (f: ReturnType<typeof replayFinding>, label: string) => f.figures.find((x) => x.label === label)!.value;

describe('replayFinding (live path against an offline re-run)', () => {
  it('equal probabilities rule the live path out', () => {
    const f = replayFinding({ trials: [{ online: [0.3, 0.7], offline: [0.3, 0.7 + 1e-12] }, { online: [0.9, 0.1], offline: [0.9, 0.1] }] });
    // Source: constructed; a difference of 1e-12 is float rounding (below the 1e-6 tolerance).
    expect([f.verdict, fig(f, 'Trials re-run'), fig(f, 'Predictions that differ')]).toEqual(['unlikely', 2, 0]);
    // Source: constructed: the largest difference is 1e-12 (shown in exponent form).
    expect(f.figures.find((x) => x.label === 'Largest probability difference')!.text).toBe('1.0e-12');
  });

  it('a changed prediction points at the live path', () => {
    const f = replayFinding({ trials: [{ online: [0.45, 0.55], offline: [0.6, 0.4] }, { online: [0.2, 0.8], offline: null }] });
    // Source: constructed: the first trial flips class (argmax 1 online, 0 offline); the second lies outside the run.
    expect([f.verdict, fig(f, 'Predictions that differ'), fig(f, 'Trials outside the stored run')]).toEqual(['likely', 1, 1]);
    // Source: constructed: |0.55 - 0.4| = 0.15.
    expectClose(fig(f, 'Largest probability difference')!, 0.15, { rtol: 1e-12 });
  });

  it('a small difference without a changed class is possible; no re-run is possible', () => {
    // Source: constructed (1e-3 > 1e-6 tolerance, same class).
    expect(replayFinding({ trials: [{ online: [0.3, 0.7], offline: [0.301, 0.699] }] }).verdict).toBe('possible');
    const u = replayFinding({ unavailable: 'the feed lacks C3' });
    // Source: constructed: the reason is passed on.
    expect([u.verdict, u.text.includes('the feed lacks C3')]).toEqual(['possible', true]);
  });

  it('computeGapReview adds the finding only when a re-run was attempted', () => {
    const base = { classes: ['a', 'b'], trials: [], offline: null, droppedSamples: 0, gapCount: 0, sampleRateHz: 160, durationS: 10, epochEndS: 2 };
    // Source: shared/api/review.ts FINDING_KEYS ('replay' last, present only with a re-run).
    expect(computeGapReview(base).findings.map((f) => f.key)).not.toContain('replay');
    expect(computeGapReview({ ...base, replay: { trials: [] } }).findings.at(-1)!.key).toBe('replay');
  });

  it('with too few trials no accuracy reaches the chance threshold and the figure is not given', () => {
    const trials = [0, 1, 0].map((c) => ({ onsetS: 0, trueClass: c, predictedClass: c, probabilities: [0.5, 0.5], flags: [], markedBad: false,
      totalLatencyMs: 1 }));
    const r = computeGapReview({ classes: ['a', 'b'], trials, offline: null, droppedSamples: 0, gapCount: 0, sampleRateHz: 160, durationS: 10,
      epochEndS: 2 });
    const chance = r.findings[0]!;
    // Source: REFERENCES.md §5 binomial threshold: with n = 3, P(X = 3) = 1/8 > 0.05, so even 3 of 3 is not significant.
    expect([chance.figures.find((f) => f.label.startsWith('Accuracy needed'))!.value, r.onlineChance!.aboveChance]).toEqual([null, false]);
    expect(chance.text).toContain('no accuracy can be told apart from chance');
  });
});
