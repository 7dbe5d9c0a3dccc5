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
    // Source: the construction: 19/20 then 10/20 (drift likely), 8 of 48 excluded (possible), interval excludes 0 (chance unlikely);
    // the rows were written straight to SQLite without a feed, so there are no stored samples to re-run (replay possible).
    expect(Object.fromEntries(r.findings.map((f) => [f.key, f.verdict]))).toEqual({
      chance: 'unlikely', excluded: 'possible', gaps: 'unlikely', latency: 'unlikely', drift: 'likely', overfitting: 'unlikely',
      replay: 'possible' });
    expect(r.findings.at(-1)!.text).toContain('never received samples');
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

describe('review PDF and mail', () => {
  it('serves the review as a PDF', async () => {
    const res = await reviewer.get(`/api/sessions/${stopped}/review.pdf`).buffer(true)
      .parse((r, cb) => { const parts: Buffer[] = []; r.on('data', (c: Buffer) => parts.push(c)); r.on('end', () => cb(null, Buffer.concat(parts))); })
      .expect(200);
    // Source: PDF 32000-1:2008 §7.5.2 (a PDF file begins with the header %PDF-).
    expect((res.body as Buffer).subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(res.headers['content-type']).toMatch(/application\/pdf/);
  });

  it('mails it to the study investigator with the PDF attached, and audits it', async () => {
    const experimenter = await signIn(h, EMAILS.experimenter);
    const res = await experimenter.post(`/api/sessions/${stopped}/review/mail`).expect(201);
    // Source: the seeded demo study is created by the investigator account (server/services/seed.ts).
    expect(res.body.to).toBe(EMAILS.investigator);
    const admin = await signIn(h, EMAILS.admin);
    const list = (await admin.get('/api/outbox').expect(200)).body as Array<{ id: number; to: string; subject: string }>;
    const mail = list.find((m) => m.subject === res.body.subject)!;
    const full = (await admin.get(`/api/outbox/${mail.id}`).expect(200)).body as { to: string; text: string;
      attachments: Array<{ id: number; fileName: string; contentType: string; size: number }> };
    // Source: the brief: the mail lands in the outbox with the PDF attached.
    expect(full.to).toContain(EMAILS.investigator);
    expect(full.text).toContain('Change over the session: Likely');
    expect(full.attachments).toHaveLength(1);
    expect(full.attachments[0]).toMatchObject({ fileName: `session-${stopped}-gap-review.pdf`, contentType: 'application/pdf' });
    const file = await admin.get(`/api/outbox/${mail.id}/attachments/${full.attachments[0]!.id}`).buffer(true)
      .parse((r, cb) => { const parts: Buffer[] = []; r.on('data', (c: Buffer) => parts.push(c)); r.on('end', () => cb(null, Buffer.concat(parts))); })
      .expect(200);
    // Source: PDF 32000-1:2008 §7.5.2 header; the stored size matches the bytes served.
    expect((file.body as Buffer).subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect((file.body as Buffer).length).toBe(full.attachments[0]!.size);
    const audit = h.db.sqlite.prepare("SELECT actor_email AS who, target_id AS target FROM audit_log WHERE action = 'session.review-mail'").all();
    // Source: the brief (audit-log the mail).
    expect(audit).toEqual([{ who: EMAILS.experimenter, target: String(stopped) }]);
  });

  it('refuses the mail to a reviewer (403) and before the session stopped (409)', async () => {
    // Source: shared/api/roles.ts (reviewer lacks session:run); the review's 409 contract.
    await reviewer.post(`/api/sessions/${stopped}/review/mail`).expect(403);
    const experimenter = await signIn(h, EMAILS.experimenter);
    await experimenter.post(`/api/sessions/${ready}/review/mail`).expect(409);
  });
});

describe('the replay finding on the server', () => {
  it('waits while a session decodes live, then reports why the decoder could not re-run', async () => {
    const s = h.seeded!;
    const p = h.db.sqlite.prepare("SELECT id FROM participants WHERE study_id = ? AND code = 'P-001'").get(s.studyId) as { id: number };
    const decoderId = insertReviewDecoder(h, s.studyId);
    const id = insertReviewSession(h, { studyId: s.studyId, participantId: p.id, rigId: s.rig.id, decoderId }, 'stopped');
    const feedId = Number(h.db.sqlite.prepare(`INSERT INTO feeds (rig_id, bridge_session_id, channel_names, units, sample_rate_hz, start_time,
      next_sample, created_at, last_seen_at) VALUES (?, 'review-test', '["C3","Cz","C4"]', '["uV","uV","uV"]', 160, '2026-01-05T10:00:00.000Z',
      32000, ?, ?)`).run(s.rig.id, Date.now(), Date.now()).lastInsertRowid);
    h.db.sqlite.prepare('UPDATE pilot_sessions SET feed_id = ?, start_sample = 0, stop_sample = 32000 WHERE id = ?').run(feedId, id);
    const sessions = h.services.live.sessions as Map<number, unknown>;
    // A stand-in for a session decoding live on another rig (only its status is read).
    sessions.set(987654, { status: 'running' });
    try {
      const busy = gapReviewSchema.parse((await reviewer.get(`/api/sessions/${id}/review`).expect(200)).body);
      // Source: server/services/review.ts (the re-run waits while a session is running).
      expect(busy.findings.at(-1)).toMatchObject({ key: 'replay', verdict: 'possible' });
      expect(busy.findings.at(-1)!.text).toContain('decoding live');
      // Source: the feed row above: 160 dropped samples at 160 Hz = 1 s of a 32000-sample (200 s) run.
      expect(busy.findings.find((f) => f.key === 'gaps')!.figures.find((f) => f.label === 'Dropped time')!.value).toBe(1);
    } finally {
      sessions.delete(987654);
    }
    const idle = gapReviewSchema.parse((await reviewer.get(`/api/sessions/${id}/review`).expect(200)).body);
    // Source: the fixture's decoder artifact is '{}', which no loader accepts: the reason is reported, not hidden.
    expect(idle.findings.at(-1)).toMatchObject({ key: 'replay', verdict: 'possible' });
    expect(idle.findings.at(-1)!.text).not.toContain('decoding live');
    expect(idle.findings.at(-1)!.text).toContain('could not be re-run through the decoder');
  });
});
