import { afterEach, describe, expect, it } from 'vitest';
import { BridgeRefusedError, FeedBridgeClient, feedUrl, type BridgeEvent } from '../../simulator/bridge-client';
import { runBridge } from '../../simulator/bridge-run';
import { createSimulation } from '../../simulator/generator';
import { simulateRecording } from '../../simulator/offline';
import { simulatedSource } from '../../simulator/simulated-source';
import { expectAllClose } from '../helpers/all-close';
import { startAcceptorServer, type AcceptorServer, type StoredSession } from './acceptor-server';
import { busyProfile } from './fixtures';

const profile = busyProfile({ channels: ['Fp1', 'C3', 'Cz', 'C4', 'O1'], artifacts: {
  blinksPerMin: 20, muscleBurstsPerMin: 5, mainsHz: 50, mainsMicrovolts: 5, dropoutsPerMin: 6, popsPerMin: 2,
} });
const SECONDS = 30;
let server: AcceptorServer | null = null;
afterEach(async () => { await server?.close(); server = null; });

function makeClient(url: string, key: string, events: BridgeEvent[], maxBufferedSamples?: number) {
  const state = createSimulation(profile);
  const source = simulatedSource(state);
  const client = new FeedBridgeClient({
    serverUrl: url, rigKey: key, maxBufferedSamples, backoff: { initialMs: 10, maxMs: 50 }, keepaliveMs: 1000,
    hello: { rigId: 'rig-test', bridgeSessionId: 'session-1', sampleRateHz: source.sampleRateHz,
      startTime: '2024-05-06T07:08:09.000Z', channelNames: source.channelNames, units: source.units },
    onEvent: (e) => events.push(e),
  });
  return { client, source };
}

/** Contiguous [from, to) ranges joined, in order. */
function mergeRanges(rs: Array<{ fromSample: number; toSample: number }>): number[][] {
  const out: number[][] = [];
  for (const r of [...rs].sort((a, b) => a.fromSample - b.fromSample)) {
    const last = out[out.length - 1];
    if (last && last[1] === r.fromSample) last[1] = r.toSample; else out.push([r.fromSample, r.toSample]);
  }
  return out;
}

/** Stored chunks and gaps must tile [0, total) in order, with no sample twice. */
function expectTiling(s: StoredSession, total: number): void {
  const pieces = [...s.chunks.map((c) => [c.firstSample, c.firstSample + c.sampleCount]), ...s.gaps.map((g) => [g.fromSample, g.toSample])]
    .sort((a, b) => a[0]! - b[0]!);
  let at = 0;
  for (const [from, to] of pieces) {
    // docs/feed-protocol.md: chunks and gaps tile the sample axis, no overlap, no hole.
    expect(from).toBe(at);
    at = to!;
  }
  expect(at).toBe(total);
}

/** Stored samples equal the generator's, as float32, sample for sample. */
function expectStoredEqualsGenerated(s: StoredSession, total: number): void {
  const expected = simulateRecording(profile, { seconds: total / 250 }).recording.data;
  const nCh = expected.length;
  for (const c of s.chunks) {
    const want = new Float32Array(c.sampleCount * nCh);
    for (let i = 0; i < c.sampleCount; i++) for (let ch = 0; ch < nCh; ch++) want[i * nCh + ch] = expected[ch]![c.firstSample + i]!;
    // Reference: simulateRecording of the same profile and seed (generation is chunk-invariant).
    expectAllClose(c.samples, want, { rtol: 0, atol: 0 });
  }
}

describe('the bridge client against a local acceptor', () => {
  it('builds the feed URL from the server URL', () => {
    // docs/feed-protocol.md: the feed lives at /ws/feed; http -> ws, https -> wss.
    expect(feedUrl('http://lab.example:8080')).toBe('ws://lab.example:8080/ws/feed');
    expect(feedUrl('https://lab.example/aftercue/')).toBe('wss://lab.example/aftercue/ws/feed');
  });

  it('survives dropped connections: every sample stored once, none lost, dropouts announced', async () => {
    server = await startAcceptorServer('k-1');
    server.ackEvery = 3;
    server.dropAfter(120, 90, 200);
    const events: BridgeEvent[] = [];
    const { client, source } = makeClient(server.url, 'k-1', events);
    await runBridge(source, client, { speed: 60, seconds: SECONDS, chunkMs: 40 });
    const s = [...server.sessions.values()][0]!;
    const total = SECONDS * 250;
    // Issue 5 part 5: three drops, three resumes from the last acknowledged sequence number.
    expect(s.connections).toBe(4);
    const resumes = events.flatMap((e) => (e.kind === 'connected' ? [e] : [])).slice(1);
    expect(resumes.length).toBe(3);
    expect(resumes.every((e) => e.resumeFromSeq > 1)).toBe(true);
    // With ACKs held back, the server had stored frames the bridge did not know about: the HELLO
    // reply told it, and it did not send them again.
    expect(resumes.some((e) => e.serverSeq >= e.resumeFromSeq)).toBe(true);
    expect(s.duplicates).toBe(0);
    expectTiling(s, total);
    expectStoredEqualsGenerated(s, total);
    const truth = createSimulation(profile);
    const gen = simulatedSource(truth).read(total);
    const gaps = gen.filter((i) => i.kind === 'gap');
    // Every gap is a source dropout of the ground truth; none from overflow.
    expect(gaps.length).toBeGreaterThan(0);
    expect(mergeRanges(s.gaps)).toEqual(mergeRanges(gaps.flatMap((g) => (g.kind === 'gap' ? [g] : []))));
    expect(s.gaps.every((g) => g.reason === 'source')).toBe(true);
    const cues = gen.filter((i) => i.kind === 'cue');
    expect(s.cues.map((c) => [c.sample, c.cueId, c.label])).toEqual(cues.map((c) => c.kind === 'cue' && [c.sample, c.cueId, c.label]));
    expect(events.some((e) => e.kind === 'disconnected' && e.retryInMs !== null)).toBe(true);
  });

  it('announces exactly the samples its full buffer gave up as a GAP', async () => {
    server = await startAcceptorServer('k-2');
    server.turnAway = true;
    const events: BridgeEvent[] = [];
    const { client, source } = makeClient(server.url, 'k-2', events, 250);
    // The whole stream is produced while the server turns the bridge away.
    const run = runBridge(source, client, { speed: 100, seconds: 10, chunkMs: 40 });
    while (source.nextSample < 10 * 250) await new Promise((r) => setTimeout(r, 10));
    server.turnAway = false;
    await run;
    const s = [...server.sessions.values()][0]!;
    const given = mergeRanges(events.flatMap((e) => (e.kind === 'overflow' ? [{ fromSample: e.fromSample, toSample: e.toSample }] : [])));
    // Issue 5 part 5: what the bridge could not keep is announced as a GAP covering exactly it.
    expect(given.length).toBeGreaterThan(0);
    expect(mergeRanges(s.gaps.filter((g) => g.reason === 'overflow'))).toEqual(given);
    // Only the last 250 samples (the buffer bound) could wait for the server.
    const stored = s.chunks.reduce((n, c) => n + c.sampleCount, 0);
    expect(stored).toBeLessThanOrEqual(250);
    expectTiling(s, 10 * 250);
    expectStoredEqualsGenerated(s, 10 * 250);
    expect(client.stats.overflowSamples).toBe(given.reduce((n, [a, b]) => n + b! - a!, 0));
  });

  it('keeps the stream whole when the buffer overflows mid-stream', async () => {
    server = await startAcceptorServer('k-3');
    const events: BridgeEvent[] = [];
    const { client, source } = makeClient(server.url, 'k-3', events, 250);
    // The server drops the feed after 125 data frames (about 5 s of the stream at 40-ms chunks) and
    // turns the bridge away for 300 ms, i.e. 18 s of stream at 60x: far more than its 250-sample
    // buffer holds. Triggered by the server's own count, not a timer, so a slow machine cannot
    // let the whole 30-s stream through before the drop.
    server.turnAwayAfterDropMs = 300;
    server.dropAfter(125);
    await runBridge(source, client, { speed: 60, seconds: SECONDS, chunkMs: 40 });
    const s = [...server.sessions.values()][0]!;
    const given = mergeRanges(events.flatMap((e) => (e.kind === 'overflow' ? [{ fromSample: e.fromSample, toSample: e.toSample }] : [])));
    expect(given.length).toBeGreaterThan(0);
    // Every overflow gap the server recorded lies inside what the bridge gave up (chunks it gave up
    // after sending them may still have been stored), and stored + gaps tile the stream.
    for (const [a, b] of mergeRanges(s.gaps.filter((g) => g.reason === 'overflow'))) {
      expect(given.some(([x, y]) => x! <= a! && b! <= y!)).toBe(true);
    }
    expectTiling(s, SECONDS * 250);
    expectStoredEqualsGenerated(s, SECONDS * 250);
  });

  it('stops with a typed error when the rig key is refused', async () => {
    server = await startAcceptorServer('right-key');
    const events: BridgeEvent[] = [];
    const { client, source } = makeClient(server.url, 'wrong-key', events);
    // docs/feed-protocol.md: a refused key is final (HTTP 401 on upgrade), no retry loop.
    await expect(runBridge(source, client, { speed: 100, seconds: 2 })).rejects.toBeInstanceOf(BridgeRefusedError);
    expect(events.filter((e) => e.kind === 'connecting').length).toBe(1);
    expect(server.sessions.size).toBe(0);
  });
});
