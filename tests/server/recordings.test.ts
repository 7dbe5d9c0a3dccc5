import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CreateStudyRequest } from '../../shared/api';
import type { RecordingSummary } from '../../shared/api/recordings';
import { writeEdfPlus } from '../../shared/formats/edf';
import type { ServerHandle } from '../../server/index';
import { loadTrainingInput } from '../../server/services/recordings';
import { readEegmmidb, skipWithoutRealData } from '../helpers/real-data';
import { expectClose } from '../helpers/all-close';
import { countRows, EMAILS, signIn, startTestServer, type Client } from './helpers/server';

let h: ServerHandle;
let experimenter: Client;
let reviewer: Client;
let studyId: number;

// Independent Python reader of S001R04.edf (tests/fixtures/formats/make_eegmmidb_fixture.py).
const fixture = JSON.parse(readFileSync(new URL('../fixtures/formats/eegmmidb_edf.json', import.meta.url), 'utf8')) as {
  files: { file: string; signals: { label: string }[]; annotations: { text: string }[]; header: { records: number } }[];
};
const s001r04 = fixture.files.find((f) => f.file === 'S001R04.edf')!;

function upload(c: Client, path: string, bytes: Uint8Array) {
  return c.post(path).set('Content-Type', 'application/octet-stream').send(Buffer.from(bytes));
}

/** A 3-channel, 4-second EDF+C with two cues (invented data). */
function smallEdf(): Uint8Array {
  const fs = 100;
  const data = [0, 1, 2].map((c) => Float64Array.from({ length: 4 * fs }, (_, i) => 10 * Math.sin(2 * Math.PI * (5 + c) * i / fs)));
  return writeEdfPlus({ channelNames: ['C3', 'Cz', 'C4'], sampleRateHz: fs, data, startTime: null,
    annotations: [{ onsetS: 1, durationS: null, text: 'feet' }, { onsetS: 2.5, durationS: null, text: 'tongue' }] });
}

beforeAll(async () => {
  h = await startTestServer({ demoDecoder: false });
  experimenter = await signIn(h, EMAILS.experimenter);
  reviewer = await signIn(h, EMAILS.reviewer);
  const investigator = await signIn(h, EMAILS.investigator);
  const study: CreateStudyRequest = { name: 'Fist imagery', ethicsReference: 'IRB-2026-7', cueClasses: ['left-fist', 'right-fist'],
    epochStartS: 0, epochEndS: 4, channelNames: ['C3', 'Cz', 'C4'], sampleRateHz: 160, powerLineHz: 60, recipe: 'covariance' };
  studyId = (await investigator.post('/api/studies', study).expect(201)).body.id as number;
});
afterAll(async () => { await h.stop(); });

describe('recordings', () => {
  it.skipIf(skipWithoutRealData)('stores a real eegmmidb run with its cue counts and canonical channel names', async () => {
    const bytes = readEegmmidb('S001R04.edf');
    const res = await upload(experimenter, `/api/studies/${studyId}/recordings?name=S001R04.edf`, bytes);
    expect(res.status).toBe(201);
    const rec = res.body as RecordingSummary;
    const expected: Record<string, number> = {};
    for (const a of s001r04.annotations) expected[a.text] = (expected[a.text] ?? 0) + 1;
    // Fixture (independent Python reader): T0 15, T1 8, T2 7 annotations in S001R04.
    expect(rec.cueCounts).toEqual(expected);
    expect(expected).toEqual({ T0: 15, T1: 8, T2: 7 });
    // eegmmidb README: 64 EEG channels, 10-10 names padded with dots ('Fc5.' is FC5), 160 Hz, 125 one-second records.
    expect(rec.channelNames).toHaveLength(64);
    expect(rec.channelNames.slice(0, 3)).toEqual(['FC5', 'FC3', 'FC1']);
    expect(rec.sampleRateHz).toBe(160);
    expectClose(rec.durationS, s001r04.header.records * 1, { rtol: 1e-12 });
    expect(rec).toMatchObject({ source: 'upload', name: 'S001R04.edf', participantId: null, studyId });
    const list = (await reviewer.get(`/api/studies/${studyId}/recordings`).expect(200)).body as RecordingSummary[];
    expect(list.find((r) => r.id === rec.id)).toEqual(rec);
    // The stored file is the upload, byte for byte (SHA-256 beside it).
    const stored = h.db.sqlite.prepare('SELECT length(file_bytes) AS n FROM recordings WHERE id = ?').get(rec.id) as { n: number };
    expect(stored.n).toBe(bytes.byteLength);
  });

  it('refuses a truncated file with 400 naming the file field, and stores nothing', async () => {
    const bytes = smallEdf();
    const before = countRows(h, 'recordings');
    const res = await upload(experimenter, `/api/studies/${studyId}/recordings?name=cut.edf`, bytes.subarray(0, bytes.length - 7));
    // EDF (Kemp et al. 1992): file size = header bytes + records x record bytes; the reader names 'fileSize'.
    expect([res.status, res.body.error.code]).toEqual([400, 'invalid-edf']);
    expect(Object.keys(res.body.error.fields)).toEqual(['fileSize']);
    expect(countRows(h, 'recordings')).toBe(before);
  });

  it("refuses a file whose version field is not EDF's '0', naming 'version'", async () => {
    const bytes = smallEdf().slice();
    bytes[0] = 0x37; // '7'
    const res = await upload(experimenter, `/api/studies/${studyId}/recordings?name=v7.edf`, bytes);
    // EDF header: the first 8 bytes are the version '0       ' (Kemp et al. 1992).
    expect([res.status, Object.keys(res.body.error.fields ?? {})]).toEqual([400, ['version']]);
  });

  it('stores a small EDF+ with its cues and answers 415 for another content type', async () => {
    const res = await upload(experimenter, `/api/studies/${studyId}/recordings?name=small.edf`, smallEdf());
    // Written with two annotations 'feet' and 'tongue'; 4 s at 100 Hz (invented data).
    expect(res.body).toMatchObject({ cueCounts: { feet: 1, tongue: 1 }, channelNames: ['C3', 'Cz', 'C4'], sampleRateHz: 100, durationS: 4 });
    const cues = h.db.sqlite.prepare('SELECT label, sample_index AS s FROM recording_cues WHERE recording_id = ? ORDER BY onset_s')
      .all(res.body.id) as { label: string; s: number }[];
    // Cue at 1 s and 2.5 s, 100 Hz -> samples 100 and 250.
    expect(cues).toEqual([{ label: 'feet', s: 100 }, { label: 'tongue', s: 250 }]);
    const json = await experimenter.post(`/api/studies/${studyId}/recordings?name=x`, { bytes: 'no' });
    // Issue 6 contract: uploads are application/octet-stream.
    expect([json.status, json.body.error.code]).toEqual([415, 'unsupported-media-type']);
  });

  it('stores captured samples as Float64 chunks and reads them back exactly', () => {
    const fs = 250;
    const n = 2 * 2500 + 17; // two full chunks and a partial one
    const data = [0, 1].map((c) => Float64Array.from({ length: n }, (_, i) => Math.sin(i * 0.01 * (c + 1)) * 37.123456789 + c / 3));
    const annotations = [{ onsetS: 1.5, durationS: null, text: 'feet' }];
    const saved = h.services.recordings.saveSamples({ studyId, participantId: null, name: 'captured', source: 'session', createdBy: null },
      { channelNames: ['c3', 'CZ'], sampleRateHz: fs, data, annotations, startTime: null }, null);
    // Chunks of CAPTURE_CHUNK_SAMPLES = 2500 per channel; canonical names per shared/montage.
    expect(saved).toMatchObject({ source: 'session', channelNames: ['C3', 'Cz'], cueCounts: { feet: 1 }, durationS: n / fs });
    expect(countRows(h, 'recording_chunks')).toBe(3);
    const back = loadTrainingInput(h.db, saved.id);
    if (back.kind !== 'samples') throw new Error('expected samples');
    // Float64 storage: bit-exact round trip.
    expect(back.data.map((r) => Array.from(r))).toEqual(data.map((r) => Array.from(r)));
    expect(back.annotations).toEqual([{ onsetS: 1.5, durationS: 0, text: 'feet' }]);
  });

  it('lets a reviewer list but not upload, and needs a name', async () => {
    const res = await upload(reviewer, `/api/studies/${studyId}/recordings?name=r.edf`, smallEdf());
    // Issue 6 contract: recording:upload is investigator, experimenter, admin.
    expect(res.status).toBe(403);
    const noName = await upload(experimenter, `/api/studies/${studyId}/recordings`, smallEdf());
    expect([noName.status, Object.keys(noName.body.error.fields)]).toEqual([400, ['name']]);
    expect((await reviewer.get(`/api/studies/${studyId}/recordings`)).status).toBe(200);
  });
});
