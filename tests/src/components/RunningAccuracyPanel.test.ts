import { describe, expect, it } from 'vitest';
import { mount } from '@vue/test-utils';
import RunningAccuracyPanel from '../../../src/components/RunningAccuracyPanel.vue';
import { runningAccuracy } from '../../../src/composables/session-stats';
import { expectClose } from '../../helpers/all-close';
import { trial, trials } from '../helpers/live';

function panel(list: ReturnType<typeof trials>, offlineAccuracy: number | null = 0.78) {
  return mount(RunningAccuracyPanel, { props: { trials: list, classes: 2, offlineAccuracy } });
}

describe('RunningAccuracyPanel', () => {
  it('shows 29 of 40 as 72.5 % with its Wilson interval and the 40-trial chance threshold', () => {
    const w = panel(trials(29, 40));
    expect(w.get('[data-test="accuracy"]').text()).toBe('72.5 %');
    expect(w.get('[data-test="accuracy-counts"]').text()).toBe('29 of 40 correct');
    // REFERENCES.md §5 Wilson table: 29/40 -> (0.571650, 0.838920).
    expect(w.get('[data-test="wilson"]').text()).toBe('57.2 % – 83.9 %');
    // REFERENCES.md §5 chance table, 2 classes, n = 40, α = 0.05: min. correct 26, accuracy needed 65.000 %.
    expect(w.get('[data-test="chance"]').text()).toBe('65.0 % (≥ 26 of 40)');
    // 29 >= 26 correct: significant at 0.05 (same table row).
    expect(w.get('[data-test="verdict"]').text()).toContain('Above chance');
    // The offline estimate is shown as given (the decoder's nested CV accuracy).
    expect(w.get('[data-test="offline"]').text()).toBe('78.0 %');
  });

  it('shows 0 of 20 with the Wilson upper bound 16.1 % and the 20-trial threshold of 75 %', () => {
    const w = panel(trials(0, 20));
    // REFERENCES.md §5 Wilson table: 0/20 -> (0.000000, 0.161125).
    expect(w.get('[data-test="wilson"]').text()).toBe('0.0 % – 16.1 %');
    // REFERENCES.md §5 chance table, n = 20, α = 0.05: min. correct 15, accuracy needed 75.000 %.
    expect(w.get('[data-test="chance"]').text()).toBe('75.0 % (≥ 15 of 20)');
    expect(w.get('[data-test="verdict"]').text()).toContain('Not yet above chance');
  });

  it('leaves flagged, marked-bad and unlabelled trials out of the accuracy', () => {
    const list = [...trials(29, 40), trial(true, { excluded: true, flags: ['artifact'] }),
      trial(false, { excluded: true, markedBad: true }), trial(null)];
    const w = panel(list);
    // Excluded and unknown-class trials are not scored (shared/api/sessions.ts trialSchema.excluded), so 29 of 40 remain.
    expect(w.get('[data-test="accuracy-counts"]').text()).toBe('29 of 40 correct');
  });

  it('says so before any trial is scored', () => {
    const w = panel([], null);
    expect(w.get('[data-test="accuracy-counts"]').text()).toBe('no scored trials yet');
    expect(w.get('[data-test="wilson"]').text()).toBe('—');
    expect(w.find('[data-test="verdict"]').exists()).toBe(false);
  });
});

describe('runningAccuracy', () => {
  it('gives the Wilson bounds and threshold after every scored trial', () => {
    const r = runningAccuracy(trials(432, 500), 2);
    const last = r.last!;
    // REFERENCES.md §5 Wilson table: 432/500 -> (0.831165, 0.891285), printed to 6 decimals.
    expectClose(last.lower, 0.831165, { atol: 5e-7 });
    expectClose(last.upper, 0.891285, { atol: 5e-7 });
    // REFERENCES.md §5 chance table, n = 500, α = 0.05: accuracy needed 53.800 %.
    expectClose(last.needed, 0.538, { atol: 1e-12 });
    // After the 100th scored trial: REFERENCES.md §5 chance table, n = 100, α = 0.05: 59.000 %.
    expectClose(r.needed[99]!, 0.59, { atol: 1e-12 });
    // Running accuracy is cumulative: 432 correct then 68 wrong ends at 0.864 (common practice).
    expectClose(r.accuracy[499]!, 0.864, { atol: 1e-12 });
    expect(r.n.length).toBe(500);
  });
});

describe('RunningAccuracyPanel with very few trials', () => {
  it('says from how many trials significance becomes reachable instead of a threshold above 100 %', () => {
    const w = mount(RunningAccuracyPanel, { props: { trials: trials(2, 2), classes: 2, offlineAccuracy: null } });
    // 2 classes: (1/2)^4 = 0.0625 > 0.05 >= (1/2)^5 = 0.03125, so 5 trials (binomial tail, common practice).
    expect(w.get('[data-test="chance"]').text()).toBe('from 5 scored trials');
    // REFERENCES.md §5 method: with n = 2, k0 = 2 and no count can exceed it.
    expect(w.get('[data-test="verdict"]').text()).toContain('Not yet above chance');
  });
});
