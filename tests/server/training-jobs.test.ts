import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CreateStudyRequest } from '../../shared/api';
import type { DecoderDetail } from '../../shared/api/decoders';
import type { TrainingJob } from '../../shared/api/training-jobs';
import { writeEdfPlus } from '../../shared/formats/edf';
import { simulateRecording } from '../../simulator/offline';
import type { ServerHandle } from '../../server/index';
import { expectClose } from '../helpers/all-close';
import { EMAILS, signIn, startTestServer, type Client } from './helpers/server';

const CHANNELS = ['FC3', 'FC4', 'C3', 'Cz', 'C4', 'CP3', 'CP4', 'Pz'];

/** A small calibration run of the demo participant: 8 channels at 128 Hz, 15 cues per class (invented data). */
function smallRun(seed: number): Uint8Array {
  const profile = JSON.parse(readFileSync(new URL('../../simulator/profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as Record<string, unknown>;
  Object.assign(profile, { channels: CHANNELS, trialsPerClass: 15, cueIntervalS: [5, 5.5], sampleRateHz: 128 });
  return writeEdfPlus(simulateRecording(profile, { seed }).recording);
}

let h: ServerHandle;
let experimenter: Client;
let reviewer: Client;
let studyId: number;
let recordingId: number;

beforeAll(async () => {
  h = await startTestServer({ demoDecoder: false });
  experimenter = await signIn(h, EMAILS.experimenter);
  reviewer = await signIn(h, EMAILS.reviewer);
  const investigator = await signIn(h, EMAILS.investigator);
  const study: CreateStudyRequest = { name: 'Small hand imagery', ethicsReference: 'IRB-2026-9', cueClasses: ['left', 'right'],
    epochStartS: 0.5, epochEndS: 3, channelNames: CHANNELS, sampleRateHz: 128, powerLineHz: 50, recipe: 'covariance' };
  studyId = (await investigator.post('/api/studies', study).expect(201)).body.id as number;
  recordingId = (await experimenter.post(`/api/studies/${studyId}/recordings?name=small.edf`)
    .set('Content-Type', 'application/octet-stream').send(Buffer.from(smallRun(3))).expect(201)).body.id as number;
});
afterAll(async () => { await h.stop(); });

async function pollUntilFinished(jobId: number, timeoutMs: number): Promise<TrainingJob[]> {
  const seen: TrainingJob[] = [];
  const until = Date.now() + timeoutMs;
  for (;;) {
    const job = (await reviewer.get(`/api/training-jobs/${jobId}`).expect(200)).body as TrainingJob;
    seen.push(job);
    if (job.status === 'done' || job.status === 'failed' || Date.now() > until) return seen;
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe('training jobs', () => {
  it('trains in a worker thread with progress and leaves a draft decoder with its report', async () => {
    const res = await experimenter.post(`/api/studies/${studyId}/training-jobs`, {
      recordingIds: [recordingId], name: 'Small covariance', classes: ['left-hand', 'right-hand'], folds: 3, inner: 2, seed: 5,
      covarianceMap: 'log',
    });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ status: 'queued', progress: 0, decoderId: null, studyId, name: 'Small covariance' });
    // While the worker runs, the server keeps answering (this very polling is the check).
    const seen = await pollUntilFinished(res.body.id as number, 90_000);
    const last = seen.at(-1)!;
    expect([last.status, last.error]).toEqual(['done', null]);
    expect(seen.some((j) => j.status === 'running')).toBe(true);
    const progress = seen.map((j) => j.progress);
    // Progress is a fraction that only moves forward (issue 6 contract: progress 0..1).
    expect(progress.every((p, i) => p >= 0 && p <= 1 && (i === 0 || p >= progress[i - 1]!))).toBe(true);
    expect(last.progress).toBe(1);

    const detail = (await reviewer.get(`/api/decoders/${last.decoderId}`).expect(200)).body as DecoderDetail;
    expect(detail).toMatchObject({ status: 'draft', source: 'training-job', recipe: 'covariance', classes: ['left', 'right'],
      channelNames: CHANNELS, sampleRateHz: 128, epochStartS: 0.5, epochEndS: 3, frozenAt: null });
    const report = detail.report!;
    // Issue 4 part 7: REPORT holds nestedCvAccuracy, wilson95, chanceThreshold95, foldAccuracies (one per outer fold) ...
    expect(report.foldAccuracies).toHaveLength(3);
    expect(report.trials).toBe(30);
    expectClose(detail.cvAccuracy!, report.nestedCvAccuracy as number, { rtol: 0 });
    const folds = report.foldAccuracies as number[];
    // Stratified 3-fold on 30 trials gives folds of 10: the overall accuracy is the mean of the fold accuracies.
    expectClose(detail.cvAccuracy!, folds.reduce((a, b) => a + b, 0) / folds.length, { atol: 1e-12 });
    expect(detail.interpretation?.recipe).toBe('covariance');
    // The request's feature map reaches the trainer, the report and the interpretation (not the default 'linear').
    expect((report.settings as { map?: string }).map).toBe('log');
    expect(detail.interpretation?.covarianceMap).toBe('log');
  });

  it('refuses recordings that lack a study class, naming the class', async () => {
    const res = await experimenter.post(`/api/studies/${studyId}/training-jobs`, {
      recordingIds: [recordingId], name: 'Wrong labels', classes: ['T1', 'T2'],
    });
    // The recording's cues are 'left-hand' / 'right-hand' (simulator profile classes).
    expect([res.status, res.body.error.code]).toEqual([409, 'recording-mismatch']);
    expect(res.body.error.fields.classes).toMatch(/T1, T2/);
  });

  it('refuses more folds than cues of the smaller class, naming folds', async () => {
    const res = await experimenter.post(`/api/studies/${studyId}/training-jobs`, {
      recordingIds: [recordingId], name: 'Too many folds', classes: ['left-hand', 'right-hand'], folds: 16,
    });
    // Stratified k-fold needs at least k trials per class; the run has 15 cues per class.
    expect([res.status, res.body.error.fields]).toEqual([400, { folds: 'Use at most 15 folds: the smaller class has 15 cues' }]);
  });

  it('lets a reviewer read jobs but not start one', async () => {
    const res = await reviewer.post(`/api/studies/${studyId}/training-jobs`, { recordingIds: [recordingId], name: 'No' });
    // Issue 6 contract: training:run is investigator, experimenter, admin.
    expect(res.status).toBe(403);
    const list = (await reviewer.get(`/api/training-jobs?studyId=${studyId}`).expect(200)).body as TrainingJob[];
    expect(list.length).toBeGreaterThan(0);
  });
});
