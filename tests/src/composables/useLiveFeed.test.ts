import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { defineComponent, h } from 'vue';
import { mount } from '@vue/test-utils';
import { encodeDisplayFrame } from '../../../shared/api/live';
import { useLiveFeed } from '../../../src/composables/useLiveFeed';
import { expectAllClose } from '../../helpers/all-close';
import { fakeServer, settle } from '../helpers/fake-server';
import { fakeSockets, sessionDetail, trial } from '../helpers/live';

const CHANNELS = ['C3', 'Cz', 'C4'];
const FEED_HZ = 500;
const DISPLAY_HZ = 250;

/** A display frame as the server sends it: shared/api/live.ts encodeDisplayFrame (the issue-6 binary layout). */
function frame(firstSampleIndex: number, samples: number, valueOf: (s: number, c: number) => number): ArrayBuffer {
  const data = new Float32Array(samples * CHANNELS.length);
  for (let s = 0; s < samples; s++) for (let c = 0; c < CHANNELS.length; c++) data[s * CHANNELS.length + c] = valueOf(s, c);
  const bytes = encodeDisplayFrame({ channels: CHANNELS.length, samples, firstSampleIndex, sampleRateHz: DISPLAY_HZ, data });
  return bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer;
}

function setup(windowS = 1) {
  const sockets = fakeSockets();
  const frames: (() => void)[] = [];
  let feed!: ReturnType<typeof useLiveFeed>;
  const Host = defineComponent({
    setup() {
      feed = useLiveFeed(7, { windowS, socketFactory: sockets.factory, requestFrame: (cb) => frames.push(cb), reconnectDelayMs: 100 });
      return () => h('div');
    },
  });
  const wrapper = mount(Host);
  const flushFrames = () => frames.splice(0).forEach((cb) => cb());
  return { wrapper, feed, sockets, flushFrames, socket: () => sockets.opened[sockets.opened.length - 1]! };
}

function hello() {
  return { type: 'hello', session: sessionDetail(), displayRateHz: DISPLAY_HZ, channelNames: CHANNELS };
}

describe('useLiveFeed', () => {
  beforeEach(() => {
    fakeServer({
      'GET /api/sessions/7/trials': { status: 200, body: [] },
      'GET /api/sessions/7/events': { status: 200, body: [] },
    });
  });
  afterEach(() => {
    vi.useRealTimers();
    vi.unstubAllGlobals();
  });

  it('opens the console socket of the session and allocates the ring from the hello', async () => {
    const { feed, socket, wrapper } = setup(1);
    // Contract: /ws/console?sessionId=N (issue6-contract.md, WebSockets).
    expect(socket().url).toMatch(/\/ws\/console\?sessionId=7$/);
    expect(socket().binaryType).toBe('arraybuffer');
    socket().open();
    socket().serverSend(hello());
    await settle(0);
    expect(feed.connection.value).toBe('open');
    expect(feed.session.value?.participantCode).toBe('P-001');
    // 1 s window at the 250 Hz display rate: 250 slots per channel (common practice: window × rate).
    expect(feed.trace.value?.ring.capacity).toBe(250);
    expect(feed.trace.value?.ring.channels).toBe(3);
    wrapper.unmount();
  });

  it('de-interleaves binary frames into the ring and times them in feed samples', async () => {
    const { feed, socket, flushFrames, wrapper } = setup(1);
    socket().open();
    socket().serverSend(hello());
    // Two consecutive frames of 4 samples; value = 100·channel + sample.
    socket().serverSend(frame(1000, 4, (s, c) => 100 * c + s));
    socket().serverSend(frame(1008, 4, (s, c) => 100 * c + s + 4));
    const ring = feed.trace.value!.ring;
    const times = new Float64Array(8);
    const ys = [new Float64Array(8), new Float64Array(8), new Float64Array(8)];
    expect(ring.copyOrdered(times, ys, 1, [0, 0, 0])).toBe(8);
    // Sample-major interleaving [sample][channel] (shared/api/live.ts DisplayFrame.data).
    expectAllClose(ys[0]!, [0, 1, 2, 3, 4, 5, 6, 7]);
    expectAllClose(ys[2]!, [200, 201, 202, 203, 204, 205, 206, 207]);
    // firstSampleIndex counts feed samples (500 Hz); samples within a frame are 1/250 s apart (shared/api/live.ts).
    expectAllClose(times, [2, 2.004, 2.008, 2.012, 2.016, 2.02, 2.024, 2.028], { rtol: 1e-12 });
    flushFrames();
    wrapper.unmount();
  });

  it('bumps the redraw counter once per animation frame however many frames arrived', () => {
    const { feed, socket, flushFrames, wrapper } = setup(1);
    socket().open();
    socket().serverSend(hello());
    flushFrames();
    const before = feed.frame.value;
    for (let i = 0; i < 5; i++) socket().serverSend(frame(2 * i * 4, 4, () => 1));
    // Nothing redraws before the browser's next frame (STYLE.md §7: bump a counter, redraw on rAF).
    expect(feed.frame.value).toBe(before);
    flushFrames();
    expect(feed.frame.value).toBe(before + 1);
    wrapper.unmount();
  });

  it('keeps only the newest window when more samples arrive than the ring holds', () => {
    const { feed, socket, wrapper } = setup(1);
    socket().open();
    socket().serverSend(hello());
    // 300 samples in 3 frames of 100 into 250 slots: samples 50..299 remain, oldest first.
    for (let f = 0; f < 3; f++) socket().serverSend(frame(f * 200, 100, (s, c) => (f * 100 + s) * (c + 1)));
    const ring = feed.trace.value!.ring;
    const times = new Float64Array(250);
    const ys = [new Float64Array(250), new Float64Array(250), new Float64Array(250)];
    expect(ring.copyOrdered(times, ys, 1, [0, 0, 0])).toBe(250);
    expectAllClose(ys[0]!, Array.from({ length: 250 }, (_, i) => 50 + i));
    expectAllClose(ys[1]!, Array.from({ length: 250 }, (_, i) => 2 * (50 + i)));
    expect(ring.written).toBe(300);
    wrapper.unmount();
  });

  it('drops a malformed frame or one with the wrong channel count without touching the ring', () => {
    const { feed, socket, wrapper } = setup(1);
    socket().open();
    socket().serverSend(hello());
    const good = frame(0, 2, () => 5);
    socket().serverSend(good.slice(0, good.byteLength - 4));
    const twoChannels = encodeDisplayFrame({ channels: 2, samples: 1, firstSampleIndex: 0, sampleRateHz: DISPLAY_HZ, data: new Float32Array(2) });
    socket().serverSend(twoChannels.buffer.slice(0) as ArrayBuffer);
    expect(feed.trace.value!.badFrames).toBe(2);
    expect(feed.trace.value!.ring.written).toBe(0);
    wrapper.unmount();
  });

  it('adds trials, replaces an updated trial, and merges status counts', async () => {
    const { feed, socket, wrapper } = setup(1);
    socket().open();
    socket().serverSend(hello());
    await settle(0);
    const t = trial(true);
    socket().serverSend({ type: 'trial', trial: t });
    socket().serverSend({ type: 'trial', trial: { ...t, markedBad: true, excluded: true } });
    expect(feed.trials.value).toHaveLength(1);
    expect(feed.trials.value[0]!.markedBad).toBe(true);
    const s = sessionDetail();
    const { feed: f, ...summary } = s;
    socket().serverSend({ type: 'status', session: { ...summary, feed: f, counts: { ...s.counts, trials: 1, droppedSamples: 12 } } });
    expect(feed.session.value?.counts.droppedSamples).toBe(12);
    wrapper.unmount();
  });

  it('places cue marks at their feed time', () => {
    const { feed, socket, wrapper } = setup(1);
    socket().open();
    socket().serverSend(hello());
    socket().serverSend(frame(0, 250, () => 0));
    socket().serverSend({ type: 'cue', cueId: 4, sampleIndex: 250, classLabel: 'left-hand' });
    // sampleIndex counts feed samples at 500 Hz (shared/api/sessions.ts module comment): 250 -> 0.5 s.
    expect(feed.trace.value!.cues).toEqual([{ cueId: 4, timeS: 0.5, classLabel: 'left-hand' }]);
    wrapper.unmount();
  });

  it('reconnects after a dropped connection but not after a refusal', () => {
    vi.useFakeTimers();
    const { feed, sockets, socket, wrapper } = setup(1);
    socket().open();
    socket().serverClose(1006);
    expect(feed.connection.value).toBe('reconnecting');
    vi.advanceTimersByTime(100);
    expect(sockets.opened).toHaveLength(2);
    socket().open();
    // 4403: no session:read (shared/api/live.ts LiveCloseCode.forbidden).
    socket().serverClose(4403, 'Not allowed to watch this session');
    expect(feed.connection.value).toBe('refused');
    expect(feed.refusal.value).toBe('Not allowed to watch this session');
    vi.advanceTimersByTime(60_000);
    expect(sockets.opened).toHaveLength(2);
    wrapper.unmount();
  });

  it('closes the socket on unmount and does not come back', () => {
    vi.useFakeTimers();
    const { sockets, socket, wrapper } = setup(1);
    socket().open();
    const s = socket();
    wrapper.unmount();
    expect(s.closedByClient).not.toBeNull();
    s.serverClose(1006);
    vi.advanceTimersByTime(60_000);
    expect(sockets.opened).toHaveLength(1);
  });
});
