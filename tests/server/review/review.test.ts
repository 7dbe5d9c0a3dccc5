import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expectAllClose } from '../../helpers/all-close';
import { gapReviewSchema } from '../../../shared/api/review';
import type { ServerHandle } from '../../../server/index';
import { EMAILS, signIn, startTestServer, type Client } from '../helpers/server';
import { insertReviewDecoder, insertReviewSession } from './fixture';
import fixture from '../../fixtures/review/newcombe.json';

let h: ServerHandle;
let reviewer: Client;
let stopped: number, ready: number;

beforeAll(async () => {
  h = await startTestServer();
  reviewer = await signIn(h, EMAILS.reviewer);
  const s = h.seeded!;
  const p = h.db.sqlite.prepare("SELECT id FROM participants WHERE study_id = ? AND code = 'P-001'").get(s.studyId) as { id: number };
  const decoderId = insertReviewDecoder(h, s.studyId);
  const ids = { studyId: s.studyId, participantId: p.id, rigId: s.rig.id, decoderId };
  stopped = insertReviewSession(h, ids, 'stopped');
  ready = insertReviewSession(h, { ...ids }, 'ready', false);
});
afterAll(async () => { await h.stop(); });

describe('GET /api/sessions/:id/review', () => {
  it('gives the review of a stopped session to a reviewer', async () => {
    const res = await reviewer.get(`/api/sessions/${stopped}/review`).expect(200);
    const r = gapReviewSchema.parse(res.body);
    // Source: the construction in tests/server/review/fixture.ts (29 of 40 clean trials correct).
    expect([r.online!.correct, r.online!.trials, r.offline!.trials]).toEqual([29, 40, 500]);
    const c = fixture.cases.find((x) => x.x1 === 29 && x.n2 === 500)!;
    // Source: tests/fixtures/review/newcombe.json case 29/40 - 432/500 (SciPy Wilson limits, Newcombe 1998 method 10).
    expectAllClose([r.difference!.value, ...r.difference!.newcombe95], [c.difference, c.lower, c.upper], { rtol: 1e-9 });
    // Source: the construction: 19/20 then 10/20 (drift likely), 8 of 48 excluded (possible), interval excludes 0 (chance unlikely).
    expect(Object.fromEntries(r.findings.map((f) => [f.key, f.verdict]))).toEqual({
      chance: 'unlikely', excluded: 'possible', gaps: 'unlikely', latency: 'unlikely', drift: 'likely', overfitting: 'unlikely' });
    // Source: DESIGN.md "Cautions the product shows".
    expect(r.caution).toMatch(/Research use only.*not a medical device/i);
  });

  it('refuses while the session has not stopped (409) and for an unknown session (404)', async () => {
    // Source: the brief's API contract (409 while not stopped) and the API's 404 convention.
    const res = await reviewer.get(`/api/sessions/${ready}/review`).expect(409);
    expect(res.body.error.code).toBe('session-not-stopped');
    await reviewer.get('/api/sessions/99999/review').expect(404);
  });
});
