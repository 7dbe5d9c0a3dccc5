import { describe, expect, it } from 'vitest';
import fixture from '../../fixtures/console/latency_quantiles.json';
import { latencyHistogram, quantile, trialOutcome } from '../../../src/composables/session-stats';
import { expectClose } from '../../helpers/all-close';
import { trial } from '../helpers/live';

describe('latency figures', () => {
  // Reference: tests/fixtures/console/latency_quantiles.json (numpy.percentile, linear interpolation).
  it.each(fixture.cases)('quantile gives NumPy percentile p50 and p99 for $name', ({ values, p50, p99 }) => {
    expectClose(quantile(values, 0.5), p50, { rtol: 1e-12, atol: 1e-12 });
    expectClose(quantile(values, 0.99), p99, { rtol: 1e-12, atol: 1e-12 });
  });

  it('does not reorder its input', () => {
    const values = [4, 1, 3, 2];
    quantile(values, 0.5);
    expect(values).toEqual([4, 1, 3, 2]);
  });

  it('counts every trial into exactly one bin and reports p50/p99 of totalMs', () => {
    const c = fixture.cases[2]!;
    const list = c.values.map((ms) => trial(true, { latency: { receivedMs: 0, epochMs: 0, featuresMs: 0, predictMs: 0, broadcastMs: ms, totalMs: ms } }));
    const h = latencyHistogram(list);
    // Every value lands in one bin (common practice for a histogram).
    expect(h.counts.reduce((a, b) => a + b, 0)).toBe(c.values.length);
    // Reference: same fixture case.
    expectClose(h.p99, c.p99, { rtol: 1e-12 });
    // The last bin holds the maximum: its left edge <= max < edge + width.
    expect(h.edgesMs[h.edgesMs.length - 1]!).toBeLessThanOrEqual(h.max);
    expect(h.max).toBeLessThan(h.edgesMs[h.edgesMs.length - 1]! + h.binMs);
  });
});

describe('trial outcome', () => {
  it('shows an excluded trial as flagged even when it was predicted correctly', () => {
    // shared/api/sessions.ts: excluded trials are kept out of accuracy.
    expect(trialOutcome(trial(true, { excluded: true }))).toBe('flagged');
    expect(trialOutcome(trial(false))).toBe('incorrect');
    expect(trialOutcome(trial(null))).toBe('unscored');
  });
});
