import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import type { GapReview } from '../../../shared/api/review';
import { computeGapReview, type ReviewInput, type ReviewTrial } from '../../../shared/review/gap-review';
import SessionReviewView from '../../../src/views/SessionReviewView.vue';
import { fakeServer, settle } from '../helpers/fake-server';
import { memoryRouter, signInAs } from '../helpers/signed-in';

/** 40 clean trials, 29 correct (19 of the first 20, 10 of the next 20); offline 86.4 % of 500. */
function review(): GapReview {
  const trials: ReviewTrial[] = Array.from({ length: 40 }, (_, i) => {
    const trueClass = i % 2;
    const correct = i < 20 ? i !== 6 : (i - 20) % 2 === 0;
    const pred = correct ? trueClass : 1 - trueClass;
    return { onsetS: 4 * i, trueClass, predictedClass: pred, probabilities: pred ? [0.2, 0.8] : [0.8, 0.2], flags: [], markedBad: false,
      totalLatencyMs: 5 };
  });
  const input: ReviewInput = { classes: ['left-hand', 'right-hand'], trials, offline: { accuracy: 0.864, trials: 500, foldAccuracies: [0.86, 0.87] },
    droppedSamples: 0, gapCount: 0, sampleRateHz: 160, durationS: 160, epochEndS: 2 };
  return { sessionId: 7, studyId: 1, studyName: 'Hand imagery', participantCode: 'P-001', rigName: 'Rig A', decoderId: 3,
    decoderName: 'Demo decoder', decoderSha256: 'b'.repeat(64), classes: ['left-hand', 'right-hand'], startedAt: '2026-01-05T10:00:00.000Z',
    stoppedAt: '2026-01-05T10:03:00.000Z', generatedAt: '2026-01-05T11:00:00.000Z', ...computeGapReview(input),
    caution: 'Research use only. Not a medical device; not for diagnostic or clinical decisions.' };
}

async function mountView() {
  const router = memoryRouter();
  await router.push('/sessions/7/review');
  const w = mount(SessionReviewView, { props: { sessionId: 7 }, global: { plugins: [router] }, attachTo: document.body });
  await settle();
  return w;
}

describe('SessionReviewView', () => {
  beforeEach(() => { setActivePinia(createPinia()); });
  afterEach(() => { vi.unstubAllGlobals(); document.body.innerHTML = ''; });

  it('shows the headline comparison and every finding with its verdict', async () => {
    signInAs('reviewer');
    fakeServer({ 'GET /api/sessions/7/review': { status: 200, body: review() } });
    const w = await mountView();
    const head = w.find('[data-test="review-headline"]').text();
    // Source: the construction (29 of 40 online; REFERENCES.md §5 Wilson 29/40 = 57.2 % to 83.9 %) and the offline figure.
    expect(head).toContain('Online 72.5 % (95 % 57.2 % to 83.9 %, 29 of 40)');
    expect(head).toContain('offline 86.4 %');
    // Source: tests/fixtures/review/newcombe.json case 29/40 - 432/500: -13.9 points, -29.5 to -2.0.
    expect(head).toContain('-13.9 points, 95 % -29.5 to -2.0 points');
    const keys = w.findAll('article[data-test^="finding-"]').map((f) => f.attributes('data-test'));
    // Source: shared/api/review.ts FINDING_KEYS order.
    expect(keys).toEqual(['finding-chance', 'finding-excluded', 'finding-gaps', 'finding-latency', 'finding-drift', 'finding-overfitting']);
    // Source: the construction: halves 19/20 vs 10/20 -> drift 'Likely'; no exclusions -> 'Unlikely'.
    expect(w.find('[data-test="finding-drift"] [data-test="finding-verdict"]').text()).toBe('Likely');
    expect(w.find('[data-test="finding-excluded"] [data-test="finding-verdict"]').text()).toBe('Unlikely');
    // Source: DESIGN.md cautions; roles.ts: a reviewer lacks session:run, so no mail button.
    expect(w.text()).toContain('Research use only');
    expect(w.find('[data-test="review-mail"]').exists()).toBe(false);
    expect(w.find('[data-test="review-pdf"]').attributes('href')).toBe('/api/sessions/7/review.pdf');
  });

  it('lets an experimenter send it to the investigator', async () => {
    signInAs('experimenter');
    const { sent } = fakeServer({
      'GET /api/sessions/7/review': { status: 200, body: review() },
      'POST /api/sessions/7/review/mail': { status: 201, body: { to: 'investigator@lab.test', subject: 'Gap review', messageId: '<m1>' } },
    });
    const w = await mountView();
    await w.find('[data-test="review-mail"]').trigger('click');
    await settle();
    // Source: the API contract in shared/api/review.ts (POST /api/sessions/:id/review/mail with the CSRF token).
    const post = sent.find((r) => r.method === 'POST')!;
    expect([post.path, post.headers['x-csrf-token']]).toEqual(['/api/sessions/7/review/mail', 'csrf-1']);
  });

  it('shows the refusal while the session runs', async () => {
    signInAs('reviewer');
    fakeServer({ 'GET /api/sessions/7/review': { status: 409, body: { error: { code: 'session-not-stopped',
      message: 'The gap review is available once the session has stopped' } } } });
    const w = await mountView();
    // Source: the API's 409 session-not-stopped answer (server/services/review.ts).
    expect(w.find('[data-test="review-error"]').text()).toContain('once the session has stopped');
  });
});
