import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { HelloFrame } from '../../../shared/protocol';
import { itemFrame, type FeedItem } from '../../../simulator/feed-items';
import { createSimulation } from '../../../simulator/generator';
import { simulateRecording } from '../../../simulator/offline';
import { simulatedSource } from '../../../simulator/simulated-source';
import { TestBridge } from './helpers/bridge';
import { trainDecoderWithArtifact } from './helpers/decoder';
import { demoStudy, insertFrozenDecoder, newRig, startLive, type LiveFixture } from './helpers/live-server';

const PROFILE = JSON.parse(readFileSync(new URL('../../../simulator/profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as
  Record<string, unknown>;
const dataDir = mkdtempSync(join(tmpdir(), 'aftercue-restart-'));
afterAll(() => rmSync(dataDir, { recursive: true, force: true }));

function feed(seconds: number): { hello: HelloFrame; items: FeedItem[] } {
  const state = createSimulation(PROFILE, { seed: 301 });
  const src = simulatedSource(state, seconds * 250);
  const items: FeedItem[] = [];
  while (src.nextSample < seconds * 250) items.push(...src.read(25));
  return { items, hello: { type: 'hello', resumeFromSeq: 1, sampleRateHz: 250, rigId: 'restart-test', bridgeSessionId: 'restart-1',
    startTime: '2026-01-05T10:00:00.000Z', channelNames: src.channelNames, units: src.units } };
}

describe('a server restart in the middle of a feed', () => {
  it('resumes the stream from what was committed: every sample stored once, none lost; the interrupted session is stopped', async () => {
    let fx: LiveFixture = await startLive(dataDir);
    const { recording } = simulateRecording({ ...PROFILE, trialsPerClass: 10 }, { seed: 13 });
    const trained = trainDecoderWithArtifact(recording, { classes: ['left-hand', 'right-hand'], window: { tminS: 0.5, tmaxS: 2.5 },
      });
    const decoderId = insertFrozenDecoder(fx.h, demoStudy(fx.h).studyId, trained);
    const rig = await newRig(fx.admin, 'Restart rig');
    const { hello, items } = feed(40);
    let bridge = await TestBridge.open(fx.h.url, rig.key);
    await bridge.hello(hello);
    const { studyId, participantId } = demoStudy(fx.h);
    const s = await fx.experimenter.post('/api/sessions', { studyId, participantId, rigId: rig.id, decoderId }).expect(201);
    await fx.experimenter.post(`/api/sessions/${s.body.id as number}/start`).expect(200);
    const half = Math.floor(items.length / 2);
    items.slice(0, half).forEach((it, i) => bridge.send(itemFrame(it, i + 1)));
    await bridge.waitAck(half - 20);
    // More frames in flight, then the server goes down (the test's bridge keeps what was not acknowledged).
    items.slice(half, half + 40).forEach((it, i) => bridge.send(itemFrame(it, half + i + 1)));
    const acked = bridge.lastAck;
    await fx.h.stop();
    await bridge.until(() => bridge.closed !== null, 5000, 'close');

    fx = await startLive(dataDir);
    bridge = await TestBridge.open(fx.h.url, rig.key);
    await bridge.hello({ ...hello, resumeFromSeq: bridge.lastAck + 1 });
    // Feed protocol: the server answers a resuming HELLO with an ACK of what it holds (at least what it had acknowledged).
    const resumeAck = bridge.acks[0]!;
    expect(resumeAck).toBeGreaterThanOrEqual(acked);
    items.slice(acked).forEach((it, i) => bridge.send(itemFrame(it, acked + i + 1)));
    await bridge.waitAck(items.length);

    const feedId = (fx.h.db.sqlite.prepare('SELECT id FROM feeds WHERE bridge_session_id = ?').get('restart-1') as { id: number }).id;
    const chunks = fx.h.db.sqlite.prepare('SELECT seq, first_sample AS f, sample_count AS n FROM feed_chunks WHERE feed_id = ? ORDER BY first_sample')
      .all(feedId) as Array<{ seq: number; f: number; n: number }>;
    const sent = items.flatMap((it, i) => (it.kind === 'chunk' ? [{ seq: i + 1, f: it.firstSample, n: it.sampleCount }] : []));
    // Issue 5 part 5 / DESIGN.md: no sample duplicated, none lost.
    expect(chunks).toEqual(sent);
    const session = (await fx.experimenter.get(`/api/sessions/${s.body.id as number}`).expect(200)).body;
    expect(session.status).toBe('stopped');
    const events = (await fx.experimenter.get(`/api/sessions/${s.body.id as number}/events`).expect(200)).body as Array<{ kind: string; text: string }>;
    expect(events.at(-1)).toMatchObject({ kind: 'stop' });
    expect(events.at(-1)!.text).toMatch(/restarted/);
    await bridge.close();
    await fx.h.stop();
  }, 60_000);
});
