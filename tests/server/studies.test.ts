import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CreateStudyRequest } from '../../shared/api';
import type { ServerHandle } from '../../server/index';
import { EMAILS, signIn, snapshotCounts, startTestServer, type Client } from './helpers/server';

let h: ServerHandle;
let investigator: Client;
let experimenter: Client;
beforeAll(async () => {
  h = await startTestServer();
  investigator = await signIn(h, EMAILS.investigator);
  experimenter = await signIn(h, EMAILS.experimenter);
});
afterAll(async () => { await h.stop(); });

function study(overrides: Partial<CreateStudyRequest> = {}): CreateStudyRequest {
  return {
    name: 'Feet vs tongue', ethicsReference: 'IRB-2026-0142', cueClasses: ['feet', 'tongue'],
    epochStartS: 0, epochEndS: 3, channelNames: ['C3', 'Cz', 'C4'], sampleRateHz: 500, powerLineHz: 60,
    recipe: 'covariance', ...overrides,
  };
}

describe('studies', () => {
  it('creates a study and reads it back, channel names in canonical 10-10 spelling', async () => {
    const res = await investigator.post('/api/studies', study({ channelNames: ['c3', 'CZ', 'fc5'], description: 'Pilot' }));
    // API contract (shared/api/studies.ts); spelling per shared/montage normaliseChannelName.
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ name: 'Feet vs tongue', status: 'active', channelNames: ['C3', 'Cz', 'FC5'],
      description: 'Pilot', createdByName: 'Demo Investigator' });
    expect((await experimenter.get(`/api/studies/${res.body.id}`)).body).toEqual(res.body);
  });

  it('returns field errors for every broken rule and saves nothing', async () => {
    const before = snapshotCounts(h);
    const res = await investigator.post('/api/studies', {
      name: 'ab', ethicsReference: ' ', cueClasses: ['only'], epochStartS: -3, epochEndS: 11,
      channelNames: ['C3', 'C3'], sampleRateHz: 20, powerLineHz: 55, recipe: 'magic', name_of_participant: 'x',
    });
    // Foundation issue: zod failures -> 400 'validation' with fields {path: message}; limits from the study definition.
    expect([res.status, res.body.error.code]).toEqual([400, 'validation']);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['channelNames', 'cueClasses', 'epochEndS', 'epochStartS',
      'ethicsReference', 'name', 'name_of_participant', 'powerLineHz', 'recipe', 'sampleRateHz']);
    expect(snapshotCounts(h)).toEqual(before);
  });

  it('refuses an epoch that ends before it starts, naming epochEndS', async () => {
    const res = await investigator.post('/api/studies', study({ epochStartS: 2, epochEndS: 1 }));
    // Foundation issue: epochEndS > epochStartS.
    expect(res.body.error.fields).toEqual({ epochEndS: 'End the epoch after its start' });
  });

  it('checks a partial change against the stored study', async () => {
    const { id } = (await investigator.post('/api/studies', study()).expect(201)).body as { id: number };
    const res = await investigator.patch(`/api/studies/${id}`, { epochStartS: 5 });
    // The merged study (start 5 s, stored end 3 s) breaks the epoch rule.
    expect([res.status, res.body.error.fields?.epochEndS]).toEqual([400, 'End the epoch after its start']);
    const ok = await investigator.patch(`/api/studies/${id}`, { epochEndS: 8, epochStartS: 5 });
    expect(ok.body).toMatchObject({ epochStartS: 5, epochEndS: 8, name: 'Feet vs tongue' });
  });

  it('makes an archived study read-only (409 study-archived) and hides it from the default list', async () => {
    const { id } = (await investigator.post('/api/studies', study({ name: 'To archive' })).expect(201)).body as { id: number };
    const archived = await investigator.post(`/api/studies/${id}/archive`);
    expect(archived.body.status).toBe('archived');
    const edit = await investigator.patch(`/api/studies/${id}`, { name: 'Renamed' });
    // Foundation issue: archived -> 409 'study-archived'.
    expect([edit.status, edit.body.error.code]).toEqual([409, 'study-archived']);
    const add = await experimenter.post(`/api/studies/${id}/participants`, { code: 'P-100', consentStatus: 'pending' });
    expect([add.status, add.body.error.code]).toEqual([409, 'study-archived']);
    const active = (await investigator.get('/api/studies')).body as { id: number }[];
    const all = (await investigator.get('/api/studies?includeArchived=true')).body as { id: number }[];
    expect(active.some((s) => s.id === id)).toBe(false);
    expect(all.some((s) => s.id === id)).toBe(true);
    expect((await investigator.get(`/api/studies/${id}`)).body.name).toBe('To archive');
  });

  it('answers 404 for a study that does not exist or an id that is not one', async () => {
    // Common practice: a path id that cannot name a row is 404.
    expect((await investigator.get('/api/studies/9999')).status).toBe(404);
    expect((await investigator.get('/api/studies/abc')).status).toBe(404);
    expect((await investigator.get('/api/studies/9999/participants')).status).toBe(404);
  });
});

describe('participants', () => {
  it('lists the seeded demo participants', async () => {
    const list = (await experimenter.get('/api/studies/1/participants')).body as { code: string; consentStatus: string }[];
    // Foundation issue: demo study has P-001 (consent given) and P-002 (pending).
    expect(list.map((p) => [p.code, p.consentStatus])).toEqual([['P-001', 'given'], ['P-002', 'pending']]);
  });

  it('creates a participant, refusing a duplicate code in the same study regardless of case', async () => {
    const res = await experimenter.post('/api/studies/1/participants', { code: 'P-010', consentStatus: 'given', consentDate: '2026-03-01' });
    expect(res.status).toBe(201);
    const dup = await experimenter.post('/api/studies/1/participants', { code: 'p-010', consentStatus: 'pending' });
    // Foundation issue: unique within its study (409 'duplicate-code').
    expect([dup.status, dup.body.error.code, dup.body.error.fields?.code]).toEqual([409, 'duplicate-code', 'Already in use in this study']);
    const other = (await investigator.post('/api/studies', study({ name: 'Other study' })).expect(201)).body as { id: number };
    expect((await experimenter.post(`/api/studies/${other.id}/participants`, { code: 'P-010', consentStatus: 'pending' })).status).toBe(201);
  });

  it('requires a real consent date when consent is given', async () => {
    const missing = await experimenter.post('/api/studies/1/participants', { code: 'P-011', consentStatus: 'given' });
    // Foundation issue: consentDate required when given; YYYY-MM-DD.
    expect(missing.body.error.fields).toEqual({ consentDate: 'Give the date consent was given' });
    const bad = await experimenter.post('/api/studies/1/participants', { code: 'P-011', consentStatus: 'given', consentDate: '2026-02-30' });
    expect(bad.body.error.fields).toEqual({ consentDate: 'Not a calendar date' });
  });

  it('has no name field: a name is refused, and codes look pseudonymous', async () => {
    const before = snapshotCounts(h);
    const named = await experimenter.post('/api/studies/1/participants', { code: 'P-012', consentStatus: 'pending', name: 'Jane Doe' });
    // Foundation issue: a code is pseudonymous, never a name; no name field exists.
    expect([named.status, named.body.error.fields]).toEqual([400, { name: 'Unknown field' }]);
    const spaced = await experimenter.post('/api/studies/1/participants', { code: 'Jane Doe', consentStatus: 'pending' });
    expect(Object.keys(spaced.body.error.fields)).toEqual(['code']);
    expect(snapshotCounts(h)).toEqual(before);
  });

  it('updates consent, re-checking the merged participant', async () => {
    const p = (await experimenter.post('/api/studies/1/participants', { code: 'P-013', consentStatus: 'pending' }).expect(201)).body as { id: number };
    const noDate = await experimenter.patch(`/api/studies/1/participants/${p.id}`, { consentStatus: 'given' });
    expect(noDate.body.error.fields).toEqual({ consentDate: 'Give the date consent was given' });
    const given = await experimenter.patch(`/api/studies/1/participants/${p.id}`, { consentStatus: 'given', consentDate: '2026-04-02' });
    expect(given.body).toMatchObject({ code: 'P-013', consentStatus: 'given', consentDate: '2026-04-02' });
    const clash = await experimenter.patch(`/api/studies/1/participants/${p.id}`, { code: 'P-001' });
    expect(clash.body.error.code).toBe('duplicate-code');
    // A participant is addressed within its study only.
    const other = (await investigator.post('/api/studies', study({ name: 'Third study' })).expect(201)).body as { id: number };
    expect((await experimenter.patch(`/api/studies/${other.id}/participants/${p.id}`, { notes: 'x' })).status).toBe(404);
  });

  it('writes audit rows for study and participant changes', async () => {
    const { id } = (await investigator.post('/api/studies', study({ name: 'Audited' })).expect(201)).body as { id: number };
    await investigator.patch(`/api/studies/${id}`, { description: 'Changed' }).expect(200);
    const p = (await experimenter.post(`/api/studies/${id}/participants`, { code: 'A-1', consentStatus: 'pending' }).expect(201)).body;
    await investigator.post(`/api/studies/${id}/archive`).expect(200);
    const rows = h.db.sqlite.prepare(`SELECT action, actor_email AS actor, details FROM audit_log
      WHERE (target_type = 'study' AND target_id = ?) OR (target_type = 'participant' AND target_id = ?) ORDER BY id`)
      .all(String(id), String(p.id)) as { action: string; actor: string; details: string }[];
    // Foundation issue: every state change writes an audit row (actor, action, target, details).
    expect(rows.map((r) => [r.action, r.actor])).toEqual([
      ['study.create', EMAILS.investigator], ['study.update', EMAILS.investigator],
      ['participant.create', EMAILS.experimenter], ['study.archive', EMAILS.investigator]]);
    expect(JSON.parse(rows[1]!.details)).toEqual({ changed: ['description'] });
  });
});
