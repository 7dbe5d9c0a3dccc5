import { describe, expect, it } from 'vitest';
import { encodeFrame, FeedAcceptor, type SequencedFrame } from '../../shared/protocol';
import { createSimulatedFeed } from '../../simulator/embedded';
import { simulateRecording } from '../../simulator/offline';
import { expectAllClose } from '../helpers/all-close';
import { busyProfile } from './fixtures';

describe('the embedded simulated feed', () => {
  it('produces the generator\'s samples, cues and dropouts as numbered frames an acceptor takes', () => {
    const feed = createSimulatedFeed(busyProfile(), { chunkMs: 40, seconds: 20, startTime: '2024-05-06T07:08:09.000Z' });
    const frames: SequencedFrame[] = [];
    while (!feed.ended) frames.push(...feed.step());
    // Invariant: sequence numbers run 1, 2, 3, ... without a hole.
    expect(frames.map((f) => f.seq)).toEqual(frames.map((_, i) => i + 1));
    const acceptor = new FeedAcceptor();
    expect(acceptor.receive(encodeFrame(feed.hello)).kind).toBe('hello');
    for (const f of frames) {
      const ev = acceptor.receive(encodeFrame(f));
      // docs/feed-protocol.md: the embedded feed speaks the same protocol as a remote bridge.
      expect(ev.kind).toBe(f.type);
      if (ev.kind === 'chunk' || ev.kind === 'cue' || ev.kind === 'gap') acceptor.commit(ev.seq);
    }
    expect(acceptor.durableSampleCount).toBe(20 * 250);
    const { recording, truth } = simulateRecording(busyProfile(), { seconds: 20 });
    const nCh = recording.channelNames.length;
    for (const f of frames) {
      if (f.type !== 'chunk') continue;
      const want = Float32Array.from({ length: f.sampleCount * nCh }, (_, k) => recording.data[k % nCh]![f.firstSample + Math.floor(k / nCh)]!);
      // Reference: simulateRecording with the same profile and seed.
      expectAllClose(f.samples, want, { rtol: 0, atol: 0 });
    }
    const cues = frames.filter((f) => f.type === 'cue');
    expect(cues.map((c) => c.type === 'cue' && [c.sample, c.cueId, c.label])).toEqual(truth.cues.map((c) => [c.sample, c.id, c.class]));
    const gapSamples = frames.reduce((n, f) => n + (f.type === 'gap' ? f.toSample - f.fromSample : 0), 0);
    expect(gapSamples).toBe(truth.dropouts.reduce((n, d) => n + Math.min(d.endSample, 5000) - d.startSample, 0));
    expect(feed.truth().cues.length).toBe(cues.length);
  });

  it('paces frames by the clock at the requested speed and ends a finite feed', async () => {
    const feed = createSimulatedFeed(busyProfile(), { speed: 40, chunkMs: 100, seconds: 2 });
    const got: SequencedFrame[] = [];
    const t0 = Date.now();
    await new Promise<void>((resolve) => feed.start((f) => got.push(f), resolve));
    const elapsed = Date.now() - t0;
    // 2 s of data at 40x real time takes at least 50 ms of wall time.
    expect(elapsed).toBeGreaterThanOrEqual(45);
    expect(feed.running).toBe(false);
    const samples = got.reduce((n, f) => n + (f.type === 'chunk' ? f.sampleCount : f.type === 'gap' ? f.toSample - f.fromSample : 0), 0);
    expect(samples).toBe(500);
  });

  it('stops and restarts without losing or repeating samples', async () => {
    const feed = createSimulatedFeed(busyProfile(), { speed: 20, chunkMs: 40, seconds: 3 });
    const got: SequencedFrame[] = [];
    feed.start((f) => got.push(f));
    await new Promise((r) => setTimeout(r, 40));
    feed.stop();
    const paused = feed.sampleCount;
    await new Promise((r) => setTimeout(r, 30));
    // Stopped means stopped.
    expect(feed.sampleCount).toBe(paused);
    await new Promise<void>((resolve) => feed.start((f) => got.push(f), resolve));
    expect(got.map((f) => f.seq)).toEqual(got.map((_, i) => i + 1));
    expect(feed.sampleCount).toBe(750);
  });
});
