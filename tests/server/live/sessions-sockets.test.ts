import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ConsoleMessage, DisplayMessage } from '../../../shared/api/live';
import type { HelloFrame } from '../../../shared/protocol';
import { itemFrame, type FeedItem } from '../../../simulator/feed-items';
import { createSimulation } from '../../../simulator/generator';
import { simulateRecording } from '../../../simulator/offline';
import { simulatedSource } from '../../../simulator/simulated-source';
import { offlineTrials } from '../../../server/live/offline';
import { expectAllClose } from '../../helpers/all-close';
import { EMAILS } from '../helpers/server';
import { TestBridge } from './helpers/bridge';
import { trainDecoderWithArtifact, type TrainedDecoder } from './helpers/decoder';
import { demoStudy, insertFrozenDecoder, newRig, startLive, type LiveFixture } from './helpers/live-server';
import { loginCookie, Watcher } from './helpers/watcher';

const PROFILE = JSON.parse(readFileSync(new URL('../../../simulator/profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as
  Record<string, unknown>;
type Cue = Extract<FeedItem, { kind: 'cue' }>;

let fx: LiveFixture;
let trained: TrainedDecoder;
let decoderId: number;

beforeAll(async () => {
  fx = await startLive();
  const { recording } = simulateRecording({ ...PROFILE, trialsPerClass: 10 }, { seed: 12 });
  trained = trainDecoderWithArtifact(recording, { classes: ['left-hand', 'right-hand'], window: { tminS: 0.5, tmaxS: 2.5 },
    car: true, notchHz: 50 });
  decoderId = insertFrozenDecoder(fx.h, demoStudy(fx.h).studyId, trained);
}, 60_000);
afterAll(async () => { await fx.cleanup(); });

/** 60 s of simulated feed without the profile's own dropouts; the chunks over 0.4 s inside cue 2's epoch become a GAP. */
function feedWithGap(): { hello: HelloFrame; items: FeedItem[]; cues: Cue[]; gap: [number, number] } {
  const profile = { ...PROFILE, artifacts: { ...(PROFILE.artifacts as object), dropoutsPerMin: 0 } };
  const state = createSimulation(profile, { seed: 201 });
  const total = 60 * state.sampleRateHz;
  const src = simulatedSource(state, total);
  const raw: FeedItem[] = [];
  while (src.nextSample < total) raw.push(...src.read(10));
  const cues = raw.filter((i): i is Cue => i.kind === 'cue');
  const from = (raw.find((i) => i.kind === 'chunk' && i.firstSample >= cues[1]!.sample + 150) as { firstSample: number }).firstSample;
  const to = from + 100;
  const items: FeedItem[] = [];
  for (const it of raw) {
    if (it.kind === 'chunk' && it.firstSample >= from && it.firstSample < to) {
      if (it.firstSample === from) items.push({ kind: 'gap', fromSample: from, toSample: to, reason: 'source' });
      continue;
    }
    items.push(it);
  }
  const hello: HelloFrame = { type: 'hello', resumeFromSeq: 1, sampleRateHz: 250, rigId: 'socket-test', bridgeSessionId: 'sockets-1',
    startTime: new Date().toISOString(), channelNames: src.channelNames, units: src.units };
  return { hello, items, cues, gap: [from, to] };
}

describe('the console and the participant display of a running session', () => {
  it('stream cues, trials, display frames and quality; flag the trials of a gap and of a pause; and match offline', async () => {
    const rig = await newRig(fx.admin, 'Socket rig');
    const { hello, items, cues, gap } = feedWithGap();
    const bridge = await TestBridge.open(fx.h.url, rig.key);
    await bridge.hello(hello);
    const { studyId, participantId } = demoStudy(fx.h);
    const created = await fx.experimenter.post('/api/sessions', { studyId, participantId, rigId: rig.id, decoderId }).expect(201);
    const id = created.body.id as number;

    const link = await fx.experimenter.post(`/api/sessions/${id}/display-link`).expect(201);
    const token = String(link.body.url).replace('/display/', '');
    const display = await Watcher.open<DisplayMessage>(fx.h, `/ws/display/${token}`);
    await display.until(() => display.of('state').length > 0, 5000, 'display state');
    // Issue 6 contract: the display gets 'ready' with the classes, then the session state.
    expect(display.messages[0]).toEqual({ type: 'ready', classes: ['left-hand', 'right-hand'] });
    const again = await Watcher.open<DisplayMessage>(fx.h, `/ws/display/${token}`);
    await again.until(() => again.closed !== null, 5000, 'refusal');
    // Issue 6 contract: the display link is one-time; a second use is refused (LiveCloseCode.forbidden).
    expect(again.closed!.code).toBe(4403);

    const anonymous = await Watcher.open<ConsoleMessage>(fx.h, `/ws/console?sessionId=${id}`);
    await anonymous.until(() => anonymous.closed !== null, 5000, 'refusal');
    // Issue 6 contract: the console needs a signed-in user (LiveCloseCode.unauthenticated).
    expect(anonymous.closed!.code).toBe(4401);
    const console = await Watcher.open<ConsoleMessage>(fx.h, `/ws/console?sessionId=${id}`, await loginCookie(fx.h, EMAILS.reviewer));
    await console.until(() => console.of('hello').length > 0, 5000, 'hello');
    const helloMsg = console.of('hello')[0]!;
    expect(helloMsg.session.id).toBe(id);
    expect(helloMsg.channelNames).toEqual(trained.live.channelNames);
    // Contract: display samples at <= 250 Hz.
    expect(helloMsg.displayRateHz).toBeLessThanOrEqual(250);

    await fx.experimenter.post(`/api/sessions/${id}/start`).expect(200);
    const pauseCue = cues[4]!;
    const firstPart = items.filter((it) => (it.kind === 'chunk' ? it.firstSample : it.kind === 'gap' ? it.fromSample : it.sample) < pauseCue.sample - 100);
    firstPart.forEach((it, i) => bridge.send(itemFrame(it, i + 1)));
    await bridge.waitAck(firstPart.length);
    await fx.experimenter.post(`/api/sessions/${id}/pause`).expect(200);
    const pausedEnd = items.findIndex((it) => it.kind === 'chunk' && it.firstSample >= pauseCue.sample + 200);
    items.slice(firstPart.length, pausedEnd).forEach((it, i) => bridge.send(itemFrame(it, firstPart.length + i + 1)));
    await bridge.waitAck(pausedEnd);
    await fx.experimenter.post(`/api/sessions/${id}/resume`).expect(200);
    items.slice(pausedEnd).forEach((it, i) => bridge.send(itemFrame(it, pausedEnd + i + 1)));
    await bridge.waitAck(items.length);
    await console.until(() => console.of('trial').length >= 6, 10_000, 'trials');

    const trials = (await fx.experimenter.get(`/api/sessions/${id}/trials`).expect(200)).body as
      Array<{ id: number; cueId: number; flags: string[]; excluded: boolean }>;
    const byCue = new Map(trials.map((t) => [t.cueId, t]));
    // Issue 6: trials overlapping a gap are flagged and kept out of accuracy.
    expect(byCue.get(cues[1]!.cueId)!.flags).toContain('gap');
    expect(byCue.get(cues[1]!.cueId)!.excluded).toBe(true);
    expect(byCue.get(cues[0]!.cueId)!.flags).not.toContain('gap');
    // Contract: 'paused' marks a cue that came while the session was paused.
    expect(byCue.get(pauseCue.cueId)!.flags).toContain('paused');

    const detail = (await fx.experimenter.get(`/api/sessions/${id}`).expect(200)).body;
    // The gap's samples are counted as dropped, once.
    expect(detail.counts.droppedSamples).toBe(gap[1] - gap[0]);
    expect(detail.counts.gaps).toBe(1);
    expect(detail.counts.flagged).toBeGreaterThanOrEqual(2);
    expect(detail.counts.scored).toBe(trials.filter((t) => !t.excluded).length);

    // The console saw the cues, the trials, display frames at the display rate, quality, the gap event.
    expect(console.of('cue').length).toBeGreaterThanOrEqual(trials.length);
    expect(console.of('trial').map((m) => m.trial.id)).toEqual(expect.arrayContaining(trials.map((t) => t.id)));
    expect(console.frames.length).toBeGreaterThan(0);
    expect(console.frames.every((f) => f.channels === 32 && f.sampleRateHz === helloMsg.displayRateHz)).toBe(true);
    expect(console.of('quality')[0]!.channels.map((c) => c.name)).toEqual(trained.live.channelNames);
    expect(console.of('event').some((m) => m.event.kind === 'gap')).toBe(true);
    // The closed loop: feedback for every running trial, none for the one cued during the pause.
    const fed = new Set(display.of('feedback').map((m) => m.cueId));
    expect(fed.has(pauseCue.cueId)).toBe(false);
    expect(fed.has(cues[0]!.cueId)).toBe(true);
    expect(display.of('state').map((m) => m.status)).toEqual(['ready', 'running', 'paused', 'running']);

    // Online equals offline on the stored samples, gap included (both hold the last value).
    for (const o of offlineTrials(fx.h.db, id, trained.live)) expectAllClose(o.online, o.offline!, { atol: 1e-9, rtol: 0 });

    const note = await fx.experimenter.post(`/api/sessions/${id}/annotations`, { text: 'participant yawned' }).expect(201);
    expect(note.body.kind).toBe('annotation');
    const clean = trials.find((t) => !t.excluded)!;
    const marked = await fx.experimenter.patch(`/api/sessions/${id}/trials/${clean.id}`, { markedBad: true, note: 'movement' }).expect(200);
    expect(marked.body.excluded).toBe(true);
    const after = (await fx.experimenter.get(`/api/sessions/${id}`).expect(200)).body;
    expect(after.counts.markedBad).toBe(1);
    expect(after.counts.scored).toBe(detail.counts.scored - 1);
    const kinds = ((await fx.experimenter.get(`/api/sessions/${id}/events`).expect(200)).body as Array<{ kind: string }>).map((e) => e.kind);
    expect(kinds).toEqual(expect.arrayContaining(['start', 'gap', 'pause', 'resume', 'annotation']));
    const csv = await fx.experimenter.get(`/api/sessions/${id}/trials.csv`).expect(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    // One header line and one line per trial (RFC 4180, CRLF).
    expect(csv.text.trimEnd().split('\r\n')).toHaveLength(trials.length + 1);

    await fx.experimenter.post(`/api/sessions/${id}/stop`).expect(200);
    await display.until(() => display.closed !== null, 5000, 'display close');
    expect(display.of('state').at(-1)!.status).toBe('stopped');
    const stopped = (await fx.experimenter.get(`/api/sessions/${id}`).expect(200)).body;
    // Counts of a stopped session come from the stored rows and agree with the live ones.
    expect(stopped.counts).toEqual(after.counts);
    await bridge.close();
    console.close();
  }, 60_000);

  it('refuses sessions for a participant without consent and with a decoder that is not frozen', async () => {
    const rig = await newRig(fx.admin, 'Consent rig');
    const { studyId } = demoStudy(fx.h);
    const p2 = fx.h.db.sqlite.prepare("SELECT id FROM participants WHERE study_id = ? AND code = 'P-002'").get(studyId) as { id: number };
    const r = await fx.experimenter.post('/api/sessions', { studyId, participantId: p2.id, rigId: rig.id, decoderId }).expect(409);
    // Issue 6 contract: 409 'consent-missing'.
    expect(r.body.error.code).toBe('consent-missing');
    const draft = insertFrozenDecoder(fx.h, studyId, trained, 'Draft copy', 'draft');
    const r2 = await fx.experimenter.post('/api/sessions', { studyId, participantId: demoStudy(fx.h).participantId, rigId: rig.id,
      decoderId: draft }).expect(409);
    // Issue 6: only frozen decoders can start a session.
    expect(r2.body.error.code).toBe('decoder-not-frozen');

    const p3 = await fx.experimenter.post(`/api/studies/${studyId}/participants`, { code: 'P-303', consentStatus: 'given',
      consentDate: '2026-01-05' }).expect(201);
    const s3 = await fx.experimenter.post('/api/sessions', { studyId, participantId: p3.body.id, rigId: rig.id, decoderId }).expect(201);
    await fx.experimenter.patch(`/api/studies/${studyId}/participants/${p3.body.id as number}`, { consentStatus: 'withdrawn' }).expect(200);
    const r3 = await fx.experimenter.post(`/api/sessions/${s3.body.id as number}/start`).expect(409);
    // Consent withdrawn after setup: the session does not start.
    expect(r3.body.error.code).toBe('consent-missing');
  });
});
