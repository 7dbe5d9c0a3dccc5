import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CreateStudyRequest } from '../../shared/api';
import type { DecoderDetail, DecoderSummary } from '../../shared/api/decoders';
import type { DecoderArtifact } from '../../shared/decoder/artifact';
import { trainDecoder, type TrainingReport } from '../../shared/decoder/train';
import { simulateRecording } from '../../simulator/offline';
import type { ServerHandle } from '../../server/index';
import { expectClose } from '../helpers/all-close';
import { EMAILS, signIn, startTestServer, type Client } from './helpers/server';

const CHANNELS = ['FC3', 'FC4', 'C3', 'Cz', 'C4', 'CP3', 'CP4', 'Pz'];
const STUDY: CreateStudyRequest = { name: 'Small hand imagery', ethicsReference: 'IRB-2026-11', cueClasses: ['left-hand', 'right-hand'],
  epochStartS: 0.5, epochEndS: 3, channelNames: CHANNELS, sampleRateHz: 128, powerLineHz: 50, recipe: 'covariance' };

let h: ServerHandle;
let investigator: Client;
let experimenter: Client;
let reviewer: Client;
let studyId: number;
let artifact: DecoderArtifact;
let report: TrainingReport;

/** A covariance decoder trained in-process on a small simulated run (invented data: 8 channels, 128 Hz, 15 cues per class). */
function trainSmall(): { artifact: DecoderArtifact; report: TrainingReport } {
  const profile = JSON.parse(readFileSync(new URL('../../simulator/profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as Record<string, unknown>;
  Object.assign(profile, { channels: CHANNELS, trialsPerClass: 15, cueIntervalS: [5, 5.5], sampleRateHz: 128 });
  const { recording } = simulateRecording(profile, { seed: 4 });
  return trainDecoder(recording, { recipe: 'covariance', classes: ['left-hand', 'right-hand'], tminS: 0.5, tmaxS: 3, folds: 3, inner: 2,
    seed: 2, baselines: false });
}

const clone = <T>(x: T): T => JSON.parse(JSON.stringify(x)) as T;

beforeAll(async () => {
  h = await startTestServer({ demoDecoder: false });
  investigator = await signIn(h, EMAILS.investigator);
  experimenter = await signIn(h, EMAILS.experimenter);
  reviewer = await signIn(h, EMAILS.reviewer);
  studyId = (await investigator.post('/api/studies', STUDY).expect(201)).body.id as number;
  ({ artifact, report } = trainSmall());
});
afterAll(async () => { await h.stop(); });

function importAs(c: Client, body: unknown, study = studyId) {
  return c.post(`/api/studies/${study}/decoders`, body);
}

describe('decoders', () => {
  it('imports a sealed artifact as a draft with its sealed figures and interpretation', async () => {
    const res = await importAs(experimenter, { name: 'Imported small', artifact: clone(artifact) });
    expect(res.status).toBe(201);
    const d = res.body as DecoderSummary;
    // The artifact's own seal and sealed metrics (shared/decoder/artifact.ts); issue 6 contract fields.
    expect(d).toMatchObject({ status: 'draft', source: 'import', recipe: 'covariance', classes: ['left-hand', 'right-hand'],
      channelNames: CHANNELS, sampleRateHz: 128, epochStartS: 0.5, epochEndS: 3, sha256: artifact.sha256, frozenAt: null,
      createdByName: 'Demo Experimenter', trials: 30 });
    expectClose(d.cvAccuracy!, report.nestedCvAccuracy, { rtol: 0 });
    const detail = (await reviewer.get(`/api/decoders/${d.id}`).expect(200)).body as DecoderDetail;
    // Without a REPORT.json there is no report; the interpretation comes from the artifact (Haufe et al. 2014 patterns).
    expect(detail.report).toBeNull();
    expect(detail.interpretation?.recipe).toBe('covariance');
    expect(detail.interpretation?.spatialPatterns?.[0]?.channelNames).toEqual(CHANNELS);
    const list = (await reviewer.get(`/api/decoders?studyId=${studyId}`).expect(200)).body as DecoderSummary[];
    expect(list.find((x) => x.id === d.id)).toEqual(d);
  });

  it('refuses an artifact whose content no longer matches its SHA-256 seal', async () => {
    const tampered = clone(artifact);
    (tampered.model as { bias: number }).bias += 0.5;
    const res = await importAs(experimenter, { name: 'Tampered', artifact: tampered });
    // FIPS 180-4 seal over the canonical bytes: any changed field changes the hash.
    expect([res.status, res.body.error.code, Object.keys(res.body.error.fields)]).toEqual([400, 'artifact-hash-mismatch', ['artifact.sha256']]);
  });

  it('refuses an artifact that does not fit the study, naming classes, channels and rate', async () => {
    const other = (await investigator.post('/api/studies', { ...STUDY, name: 'Feet vs tongue', cueClasses: ['feet', 'tongue'],
      sampleRateHz: 256, channelNames: ['C3', 'Cz', 'C4'] }).expect(201)).body.id as number;
    const res = await importAs(experimenter, { name: 'Wrong study', artifact: clone(artifact) }, other);
    // Issue 6 contract: 409 'decoder-study-mismatch' naming what differs.
    expect([res.status, res.body.error.code]).toEqual([409, 'decoder-study-mismatch']);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['channelNames', 'classes', 'sampleRateHz']);
    expect(res.body.error.fields.channelNames).toMatch(/FC3, FC4, CP3, CP4, Pz/);
  });

  it('keeps a report whose figures match the seal and refuses one from another run', async () => {
    const ok = await importAs(experimenter, { name: 'With report', artifact: clone(artifact), report: clone(report) });
    expect(ok.status).toBe(201);
    const detail = (await reviewer.get(`/api/decoders/${ok.body.id}`).expect(200)).body as DecoderDetail;
    // Issue 4 part 7 REPORT fields.
    expect(detail.report).toMatchObject({ nestedCvAccuracy: report.nestedCvAccuracy, trials: 30, foldAccuracies: report.foldAccuracies });
    const bad = await importAs(experimenter, { name: 'Other report', artifact: clone(artifact), report: { ...clone(report), nestedCvAccuracy: 0.99 } });
    expect([bad.status, bad.body.error.code, Object.keys(bad.body.error.fields)]).toEqual([400, 'report-mismatch', ['report.nestedCvAccuracy']]);
  });

  it('freezes a draft once; afterwards the artifact and its seal cannot change', async () => {
    const { id } = (await importAs(experimenter, { name: 'To freeze', artifact: clone(artifact) })).body as DecoderSummary;
    const before = await reviewer.get(`/api/decoders/${id}/artifact`).expect(200);
    // Issue 6 contract: freezing is the investigator's (or admin's) call.
    expect((await experimenter.post(`/api/decoders/${id}/freeze`)).status).toBe(403);
    const frozen = await investigator.post(`/api/decoders/${id}/freeze`);
    expect(frozen.status).toBe(200);
    expect(frozen.body).toMatchObject({ status: 'frozen', sha256: artifact.sha256, frozenByName: 'Demo Investigator' });
    expect(typeof frozen.body.frozenAt).toBe('string');
    const again = await investigator.post(`/api/decoders/${id}/freeze`);
    expect([again.status, again.body.error.code]).toEqual([409, 'decoder-frozen']);
    // The database itself refuses to rewrite or delete a frozen decoder (migration 0002 triggers).
    const update = h.db.sqlite.prepare("UPDATE decoders SET artifact = replace(artifact, '\"bias\":', '\"bias\": ') WHERE id = ?");
    expect(() => update.run(id)).toThrow(/decoder-frozen/);
    expect(() => h.db.sqlite.prepare("UPDATE decoders SET sha256 = 'x', status = 'draft' WHERE id = ?").run(id)).toThrow(/decoder-frozen/);
    expect(() => h.db.sqlite.prepare('DELETE FROM decoders WHERE id = ?').run(id)).toThrow(/decoder-frozen/);
    const after = await reviewer.get(`/api/decoders/${id}/artifact`).expect(200);
    // Same bytes before and after (SHA-256 by node:crypto, independent of the project's own SHA-256).
    const digest = (t: string) => createHash('sha256').update(t, 'utf8').digest('hex');
    expect(digest(after.text)).toBe(digest(before.text));
    const downloaded = JSON.parse(after.text) as DecoderArtifact;
    expect([downloaded.sha256, after.headers['x-artifact-sha256']]).toEqual([artifact.sha256, artifact.sha256]);
  });

  it('does not freeze a decoder of an archived study', async () => {
    const other = (await investigator.post('/api/studies', { ...STUDY, name: 'To archive' }).expect(201)).body.id as number;
    const { id } = (await importAs(experimenter, { name: 'Orphan', artifact: clone(artifact) }, other)).body as DecoderSummary;
    await investigator.post(`/api/studies/${other}/archive`).expect(200);
    const res = await investigator.post(`/api/decoders/${id}/freeze`);
    // Foundation issue: archived studies are read-only (409 study-archived).
    expect([res.status, res.body.error.code]).toEqual([409, 'study-archived']);
  });

  it('accepts an import body above the API-wide 100 kB limit on this route only', async () => {
    const big = { ...clone(report), notes: 'x'.repeat(300_000) };
    const res = await importAs(experimenter, { name: 'Large report', artifact: clone(artifact), report: big });
    // Issue 6 contract: the body limit is raised to 20 MB on the import route only.
    expect(res.status).toBe(201);
    const elsewhere = await investigator.post('/api/studies', { ...STUDY, description: 'x'.repeat(300_000) });
    expect([elsewhere.status, elsewhere.body.error.code]).toEqual([413, 'payload-too-large']);
  });

  it('lets a reviewer read and download but not import or freeze', async () => {
    const { id } = (await importAs(experimenter, { name: 'Readable', artifact: clone(artifact) })).body as DecoderSummary;
    // Issue 6 contract: decoder:read all roles; decoder:import investigator/experimenter/admin; decoder:freeze investigator/admin.
    expect((await reviewer.get(`/api/decoders/${id}`)).status).toBe(200);
    expect((await reviewer.get(`/api/decoders/${id}/artifact`)).status).toBe(200);
    expect((await importAs(reviewer, { name: 'No', artifact: clone(artifact) })).status).toBe(403);
    expect((await reviewer.post(`/api/decoders/${id}/freeze`)).status).toBe(403);
  });
});
