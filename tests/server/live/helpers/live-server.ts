/**
 * Live-session test setup: a real server on a temporary data directory (so the live store runs
 * in its worker thread on a SQLite file), a rig with its key, a frozen decoder row, and helpers
 * to read what the session stored.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { ServerHandle } from '../../../../server/index';
import { EMAILS, signIn, startTestServer, type Client } from '../../helpers/server';
import type { TrainedDecoder } from './decoder';

export interface LiveFixture {
  h: ServerHandle;
  dataDir: string;
  admin: Client;
  experimenter: Client;
  cleanup(): Promise<void>;
}

export async function startLive(dataDir = mkdtempSync(join(tmpdir(), 'aftercue-live-'))): Promise<LiveFixture> {
  const h = await startTestServer({ dataDir });
  const admin = await signIn(h, EMAILS.admin);
  const experimenter = await signIn(h, EMAILS.experimenter);
  return {
    h, dataDir, admin, experimenter,
    async cleanup() { await h.stop(); rmSync(dataDir, { recursive: true, force: true }); },
  };
}

/** A new rig (through the API) and its key. */
export async function newRig(admin: Client, name: string): Promise<{ id: number; key: string }> {
  const res = await admin.post('/api/rigs', { name }).expect(201);
  return { id: res.body.rig.id as number, key: res.body.rigKey as string };
}

/** Inserts a frozen (or draft) decoder of `studyId` whose sealed artifact is `d` (as an import would store it). */
export function insertFrozenDecoder(h: ServerHandle, studyId: number, d: TrainedDecoder, name = 'Test decoder',
                                    status: 'frozen' | 'draft' = 'frozen'): number {
  const { text } = d;
  const a = d.artifact;
  const sha = a.sha256;
  const now = Date.now();
  const r = h.db.sqlite.prepare(`INSERT INTO decoders (study_id, name, recipe, classes, channel_names, sample_rate_hz, epoch_start_s,
    epoch_end_s, artifact, sha256, status, metrics, source, created_at, frozen_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?,
    '{}', 'import', ?, ?)`).run(studyId, name, a.recipe, JSON.stringify(a.classes), JSON.stringify(a.channelNames), a.sampleRateHz,
    a.epoch.tminS, a.epoch.tmaxS, text, sha, status, now, status === 'frozen' ? now : null);
  return Number(r.lastInsertRowid);
}

/** A study through the API (as the investigator) with a consenting participant. */
export async function newStudy(h: ServerHandle, body: Record<string, unknown>): Promise<{ studyId: number; participantId: number }> {
  const inv = await signIn(h, EMAILS.investigator);
  const study = await inv.post('/api/studies', body).expect(201);
  const studyId = study.body.id as number;
  const p = await inv.post(`/api/studies/${studyId}/participants`, { code: 'P-101', consentStatus: 'given',
    consentDate: '2026-01-05' }).expect(201);
  return { studyId, participantId: p.body.id as number };
}

/** The demo study (seeded) and its consenting participant P-001. */
export function demoStudy(h: ServerHandle): { studyId: number; participantId: number; rigId: number } {
  const s = h.seeded!;
  const p = h.db.sqlite.prepare("SELECT id FROM participants WHERE study_id = ? AND code = 'P-001'").get(s.studyId) as { id: number };
  return { studyId: s.studyId, participantId: p.id, rigId: s.rig.id };
}
