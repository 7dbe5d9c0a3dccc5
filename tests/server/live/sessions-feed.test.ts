import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { itemFrame, type FeedItem } from '../../../simulator/feed-items';
import { createSimulation } from '../../../simulator/generator';
import { simulateRecording } from '../../../simulator/offline';
import { simulatedSource } from '../../../simulator/simulated-source';
import { offlineTrials } from '../../../server/live/offline';
import type { HelloFrame } from '../../../shared/protocol';
import { expectAllClose } from '../../helpers/all-close';
import type { ConsoleMessage } from '../../../shared/api/live';
import { EMAILS } from '../helpers/server';
import { TestBridge } from './helpers/bridge';
import { loginCookie, Watcher } from './helpers/watcher';
import { trainDecoderWithArtifact, type TrainedDecoder } from './helpers/decoder';
import { demoStudy, insertFrozenDecoder, newRig, startLive, type LiveFixture } from './helpers/live-server';

const PROFILE = JSON.parse(readFileSync(new URL('../../../simulator/profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as
  Record<string, unknown>;

let fx: LiveFixture;
let trained: TrainedDecoder;
let decoderId: number;

beforeAll(async () => {
  fx = await startLive();
  const { recording } = simulateRecording({ ...PROFILE, trialsPerClass: 10 }, { seed: 11 });
  trained = trainDecoderWithArtifact(recording, { classes: ['left-hand', 'right-hand'], window: { tminS: 0.5, tmaxS: 2.5 },
    car: true, notchHz: 50 });
  decoderId = insertFrozenDecoder(fx.h, demoStudy(fx.h).studyId, trained);
}, 60_000);
afterAll(async () => { await fx.cleanup(); });

function items(seconds: number, seed: number, chunk = 10): { hello: HelloFrame; items: FeedItem[] } {
  const state = createSimulation(PROFILE, { seed });
  const total = Math.round(seconds * state.sampleRateHz);
  const src = simulatedSource(state, total);
  const out: FeedItem[] = [];
  while (src.nextSample < total) out.push(...src.read(chunk));
  const hello: HelloFrame = { type: 'hello', resumeFromSeq: 1, sampleRateHz: src.sampleRateHz, rigId: 'test-bridge',
    bridgeSessionId: `test-${seed}`, startTime: new Date().toISOString(), channelNames: src.channelNames, units: src.units };
  return { hello, items: out };
}

async function createSession(rigId: number): Promise<number> {
  const { studyId, participantId } = demoStudy(fx.h);
  const res = await fx.experimenter.post('/api/sessions', { studyId, participantId, rigId, decoderId }).expect(201);
  // Issue 6 contract: a new session is 'ready' until started.
  expect(res.body.status).toBe('ready');
  return res.body.id as number;
}

describe('a pilot session on a feed streamed over /ws/feed', () => {
  it('predicts every cue online exactly as offline predict does on the samples read back from SQLite, acking only committed frames',
    async () => {
      const rig = await newRig(fx.admin, 'Feed rig A');
      const { hello, items: feedItems } = items(75, 101);
      const bridge = await TestBridge.open(fx.h.url, rig.key);
      await bridge.hello(hello);
      const sessionId = await createSession(rig.id);
      const started = await fx.experimenter.post(`/api/sessions/${sessionId}/start`).expect(200);
      expect(started.body.status).toBe('running');
      expect(started.body.feed.connected).toBe(true);

      // A second connection to the database file, as another process would read it.
      const reader = new Database(join(fx.dataDir, 'aftercue.sqlite'), { readonly: true });
      const storedUpTo = reader.prepare(`SELECT max(seq) AS s FROM (SELECT seq FROM feed_chunks UNION ALL SELECT seq FROM feed_marks)`);
      const early: string[] = [];
      bridge.onAck = (seq) => {
        const s = (storedUpTo.get() as { s: number | null }).s ?? 0;
        if (s < seq) early.push(`ACK ${seq} while only ${s} was stored`);
      };
      feedItems.forEach((it, i) => bridge.send(itemFrame(it, i + 1)));
      await bridge.waitAck(feedItems.length, 30_000);
      reader.close();
      // DESIGN.md "Data": a sample acknowledged to a bridge has been committed.
      expect(early).toEqual([]);
      expect(bridge.lastAck).toBe(feedItems.length);

      await fx.experimenter.post(`/api/sessions/${sessionId}/stop`).expect(200);
      const trials = (await fx.experimenter.get(`/api/sessions/${sessionId}/trials`).expect(200)).body as
        Array<{ id: number; cueId: number; probabilities: number[]; latency: { totalMs: number }; trueClass: string | null }>;
      const cues = feedItems.filter((i) => i.kind === 'cue').length;
      // Demo profile: a cue every 6.5-8 s after 3 s, so 75 s give 9 or more complete epochs.
      expect(trials.length).toBeGreaterThanOrEqual(9);
      expect(trials.length).toBeLessThanOrEqual(cues);
      expect(trials.every((t) => t.trueClass !== null)).toBe(true);

      const offline = offlineTrials(fx.h.db, sessionId, trained.live);
      expect(offline.map((o) => o.trialId)).toEqual(trials.map((t) => t.id));
      for (const o of offline) {
        expect(o.offline).not.toBeNull();
        // Issue 6: online prediction equals offline predict on the stored samples, probabilities to 1e-9.
        expectAllClose(o.online, o.offline!, { atol: 1e-9, rtol: 0 });
      }
      await bridge.close();
    }, 60_000);

  it('stores every sample exactly as sent, once', async () => {
    const rig = await newRig(fx.admin, 'Feed rig B');
    const { hello, items: feedItems } = items(8, 102, 17);
    const bridge = await TestBridge.open(fx.h.url, rig.key);
    await bridge.hello(hello);
    feedItems.forEach((it, i) => bridge.send(itemFrame(it, i + 1)));
    // Duplicates (a bridge resending before it saw the ACK) are acknowledged, never stored twice.
    feedItems.slice(0, 5).forEach((it, i) => bridge.send(itemFrame(it, i + 1)));
    await bridge.waitAck(feedItems.length);
    const feed = fx.h.db.sqlite.prepare('SELECT id FROM feeds WHERE bridge_session_id = ?').get(hello.bridgeSessionId) as { id: number };
    const rows = fx.h.db.sqlite.prepare('SELECT seq, first_sample AS f, sample_count AS n, samples FROM feed_chunks WHERE feed_id = ? ORDER BY seq')
      .all(feed.id) as Array<{ seq: number; f: number; n: number; samples: Buffer }>;
    const chunks = feedItems.flatMap((it, i) => (it.kind === 'chunk' ? [{ seq: i + 1, it }] : []));
    expect(rows.map((r) => r.seq)).toEqual(chunks.map((c) => c.seq));
    for (const [k, r] of rows.entries()) {
      const it = chunks[k]!.it as Extract<FeedItem, { kind: 'chunk' }>;
      // Common practice: a raw log is byte-exact (float32 little-endian as received).
      expect(Buffer.compare(r.samples, Buffer.from(it.samples.buffer, it.samples.byteOffset, it.samples.byteLength))).toBe(0);
    }
    await bridge.close();
  }, 30_000);

  it('refuses a feed that does not fit the waiting session, with close code 4409 and a reason naming channels and rate', async () => {
    const rig = await newRig(fx.admin, 'Feed rig C');
    await createSession(rig.id);
    const { hello } = items(1, 103);
    const bridge = await TestBridge.open(fx.h.url, rig.key);
    await bridge.hello({ ...hello, sampleRateHz: 500, channelNames: hello.channelNames.filter((n) => n !== 'C3' && n !== 'C4'),
      units: hello.units.slice(2) });
    await bridge.until(() => bridge.closed !== null, 5000, 'close');
    // Issue 6: a mismatch is refused with a clear reason before any session starts (close code: shared/protocol FeedCloseCode.conflict).
    expect(bridge.closed!.code).toBe(4409);
    expect(bridge.closed!.reason).toMatch(/500 Hz/);
    expect(bridge.closed!.reason).toMatch(/C3, C4/);
  });

  it('answers start with 409 feed-mismatch for a connected feed that does not fit, and feed-missing without one', async () => {
    const rig = await newRig(fx.admin, 'Feed rig D');
    const sessionId = await createSession(rig.id);
    const missing = await fx.experimenter.post(`/api/sessions/${sessionId}/start`).expect(409);
    // Issue 6 contract: 409 'feed-missing' when no feed.
    expect(missing.body.error.code).toBe('feed-missing');
    await fx.experimenter.post(`/api/sessions/${sessionId}/stop`).expect(200);

    // A bridge that connected while no session waited is accepted; start then checks it.
    const rig2 = await newRig(fx.admin, 'Feed rig E');
    const { hello } = items(1, 104);
    const bridge = await TestBridge.open(fx.h.url, rig2.key);
    await bridge.hello({ ...hello, channelNames: hello.channelNames.map((n) => (n === 'Cz' ? 'CPz' : n)) });
    expect(bridge.closed).toBeNull();
    const s2 = await createSession(rig2.id);
    const res = await fx.experimenter.post(`/api/sessions/${s2}/start`).expect(409);
    // Issue 6 contract: 409 'feed-mismatch' with a reason naming the channels that differ.
    expect(res.body.error.code).toBe('feed-mismatch');
    expect(res.body.error.message).toMatch(/Cz/);
    const detail = await fx.experimenter.get(`/api/sessions/${s2}`).expect(200);
    expect(detail.body.status).toBe('ready');
    await bridge.close();
  });

  it("shows a ready session's feed on the console before start (trace and quality, no trials), and starts fresh", async () => {
    const rig = await newRig(fx.admin, 'Preview rig');
    const { hello, items: feedItems } = items(40, 105);
    const bridge = await TestBridge.open(fx.h.url, rig.key);
    await bridge.hello(hello);
    const sessionId = await createSession(rig.id);
    const console = await Watcher.open<ConsoleMessage>(fx.h, `/ws/console?sessionId=${sessionId}`, await loginCookie(fx.h, EMAILS.experimenter));
    await console.until(() => console.of('hello').length > 0, 5000, 'hello');
    const before = feedItems.findIndex((it) => it.kind === 'chunk' && it.firstSample >= 12 * 250);
    feedItems.slice(0, before).forEach((it, i) => bridge.send(itemFrame(it, i + 1)));
    await bridge.waitAck(before);
    await console.until(() => console.frames.length > 0 && console.of('quality').length >= 5, 5000, 'preview');
    // A signal check before the run: frames and quality of the connected feed, and no trial yet.
    expect(console.of('trial')).toHaveLength(0);
    const started = await fx.experimenter.post(`/api/sessions/${sessionId}/start`).expect(200);
    expect(started.body.feed.samplesReceived).toBe(0);
    feedItems.slice(before).forEach((it, i) => bridge.send(itemFrame(it, before + i + 1)));
    await bridge.waitAck(feedItems.length);
    await fx.experimenter.post(`/api/sessions/${sessionId}/stop`).expect(200);
    const offline = offlineTrials(fx.h.db, sessionId, trained.live);
    expect(offline.length).toBeGreaterThanOrEqual(2);
    // The session's filters start at its own first sample, whatever the preview did: online equals offline, 1e-9.
    for (const o of offline) expectAllClose(o.online, o.offline!, { atol: 1e-9, rtol: 0 });
    console.close();
    await bridge.close();
  }, 30_000);

  it('refuses a feed with an unknown rig key (4401)', async () => {
    const bridge = await TestBridge.open(fx.h.url, `rig_${'x'.repeat(43)}`);
    await bridge.until(() => bridge.closed !== null, 5000, 'close');
    // shared/protocol FeedCloseCode.unauthorized.
    expect(bridge.closed!.code).toBe(4401);
  });
});
