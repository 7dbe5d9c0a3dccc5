import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { simulateRecording } from '../../../simulator/offline';
import { offlineTrials } from '../../../server/live/offline';
import { expectAllClose } from '../../helpers/all-close';
import { trainDecoderWithArtifact, type TrainedDecoder } from './helpers/decoder';
import { demoStudy, insertFrozenDecoder, startLive, type LiveFixture } from './helpers/live-server';

const PROFILE = JSON.parse(readFileSync(new URL('../../../simulator/profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as
  Record<string, unknown>;

let fx: LiveFixture;
let trained: TrainedDecoder;
beforeAll(async () => {
  fx = await startLive();
  const { recording } = simulateRecording({ ...PROFILE, trialsPerClass: 10 }, { seed: 14 });
  trained = trainDecoderWithArtifact(recording, { classes: ['left-hand', 'right-hand'], window: { tminS: 0.5, tmaxS: 2.5 },
    car: true, notchHz: 50 });
}, 60_000);
afterAll(async () => { await fx.cleanup(); });

describe('the demo rig', () => {
  it('runs a session with no hardware: the embedded synthetic bridge streams through ingest, and trials arrive', async () => {
    const { studyId, participantId, rigId } = demoStudy(fx.h);
    const decoderId = insertFrozenDecoder(fx.h, studyId, trained, 'Demo test decoder');
    // 20 x real time, so the test sees several trials in a few seconds.
    fx.h.services.live.embedded.speed = 20;
    const s = await fx.experimenter.post('/api/sessions', { studyId, participantId, rigId, decoderId }).expect(201);
    const id = s.body.id as number;
    const started = await fx.experimenter.post(`/api/sessions/${id}/start`).expect(200);
    // Issue 6 part 6: the demo works with no hardware (the embedded bridge is the rig's feed).
    expect(started.body.feed.connected).toBe(true);
    expect(started.body.feed.channelNames).toHaveLength(32);
    let trials: unknown[] = [];
    for (let i = 0; i < 200 && trials.length < 4; i++) {
      await new Promise((r) => setTimeout(r, 100));
      trials = (await fx.experimenter.get(`/api/sessions/${id}/trials`).expect(200)).body as unknown[];
    }
    expect(trials.length).toBeGreaterThanOrEqual(4);
    const stopped = await fx.experimenter.post(`/api/sessions/${id}/stop`).expect(200);
    expect(stopped.body.feed.connected).toBe(false);
    expect(fx.h.services.live.embedded.has(rigId)).toBe(false);
    for (const o of offlineTrials(fx.h.db, id, trained.live)) {
      // Issue 6: online equals offline predict on the stored samples, 1e-9.
      expectAllClose(o.online, o.offline!, { atol: 1e-9, rtol: 0 });
    }
    // A second session on the demo rig starts a fresh embedded stream.
    const s2 = await fx.experimenter.post('/api/sessions', { studyId, participantId, rigId, decoderId }).expect(201);
    await fx.experimenter.post(`/api/sessions/${s2.body.id as number}/start`).expect(200);
    await fx.experimenter.post(`/api/sessions/${s2.body.id as number}/stop`).expect(200);
  }, 60_000);
});
