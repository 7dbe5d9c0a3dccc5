import { describe, expect, it } from 'vitest';
import {
  decodeFrame, encodeFrame, FeedAcceptor, FeedCloseCode, type AcceptorEvent, type FeedFrame, type HelloFrame,
} from '../../../shared/protocol';

const hello: HelloFrame = {
  type: 'hello', resumeFromSeq: 1, sampleRateHz: 100, rigId: 'rig-1', bridgeSessionId: 's-1',
  startTime: '2024-01-01T00:00:00.000Z', channelNames: ['C3', 'C4'], units: ['uV', 'uV'],
};
const chunk = (seq: number, firstSample: number, n = 10): FeedFrame => ({
  type: 'chunk', seq, firstSample, channelCount: 2, sampleCount: n, samples: new Float32Array(2 * n).fill(seq),
});

/** Feeds a frame and commits it when it carries data, as a server does. */
function send(a: FeedAcceptor, f: FeedFrame): AcceptorEvent {
  const ev = a.receive(encodeFrame(f));
  if (ev.kind === 'chunk' || ev.kind === 'cue' || ev.kind === 'gap') a.commit(ev.seq);
  return ev;
}

function ackOf(bytes: Uint8Array) {
  const f = decodeFrame(bytes);
  if (f.type !== 'ack') throw new Error(`expected an ACK, got ${f.type}`);
  return f;
}

describe('FeedAcceptor', () => {
  it('requires HELLO first and answers it with an ACK of what is stored', () => {
    const a = new FeedAcceptor();
    const early = a.receive(encodeFrame(chunk(1, 0)));
    // docs/feed-protocol.md: the first frame of a connection is HELLO; otherwise REFUSE + close 4400.
    expect(early.kind).toBe('refuse');
    expect(early.kind === 'refuse' && early.code).toBe(FeedCloseCode.badFrame);
    expect(decodeFrame(early.kind === 'refuse' ? early.reply : new Uint8Array()).type).toBe('refuse');
    const ev = a.receive(encodeFrame(hello));
    expect(ev.kind).toBe('hello');
    expect(ev.kind === 'hello' && ackOf(ev.reply)).toEqual({ type: 'ack', seq: 0, nextSample: 0 });
  });

  it('accepts frames in order, acknowledges after commit, and tiles the sample axis', () => {
    const a = new FeedAcceptor();
    send(a, hello);
    expect(send(a, chunk(1, 0)).kind).toBe('chunk');
    expect(send(a, { type: 'cue', seq: 2, sample: 5, cueId: 1, label: 'left-hand' }).kind).toBe('cue');
    const ev = a.receive(encodeFrame(chunk(3, 10)));
    // Invariant: nothing is acknowledged before commit.
    expect(a.lastDurableSeq).toBe(2);
    const ack = ackOf(a.commit(ev.kind === 'chunk' ? ev.seq : -1));
    // docs/feed-protocol.md ACK: last durable seq and the next expected sample.
    expect(ack).toEqual({ type: 'ack', seq: 3, nextSample: 20 });
  });

  it('refuses a skipped sequence number and a chunk that does not continue the samples', () => {
    const a = new FeedAcceptor();
    send(a, hello);
    send(a, chunk(1, 0));
    const skipped = a.receive(encodeFrame(chunk(3, 10)));
    // docs/feed-protocol.md: seq advances by exactly 1; violations close with 4409.
    expect(skipped.kind === 'refuse' && skipped.code).toBe(FeedCloseCode.conflict);
    const b = new FeedAcceptor();
    send(b, hello);
    send(b, chunk(1, 0));
    const hole = b.receive(encodeFrame(chunk(2, 11)));
    expect(hole.kind === 'refuse' && hole.error.field).toBe('chunk.firstSample');
  });

  it('treats a repeated frame as a duplicate and stores nothing', () => {
    const a = new FeedAcceptor();
    send(a, hello);
    send(a, chunk(1, 0));
    send(a, chunk(2, 10));
    const dup = a.receive(encodeFrame(chunk(2, 10)));
    // docs/feed-protocol.md: seq <= last accepted is acknowledged again, never stored twice.
    expect(dup.kind).toBe('duplicate');
    expect(dup.kind === 'duplicate' && ackOf(dup.reply)).toEqual({ type: 'ack', seq: 2, nextSample: 20 });
  });

  it('resumes a session after a disconnect, forgetting what was not committed', () => {
    const a = new FeedAcceptor();
    send(a, hello);
    send(a, chunk(1, 0));
    a.receive(encodeFrame(chunk(2, 10))); // accepted, never committed
    a.disconnect();
    const again = a.receive(encodeFrame({ ...hello, resumeFromSeq: 2 }));
    // docs/feed-protocol.md resume: the HELLO reply names the durable state.
    expect(again.kind === 'hello' && again.resumed).toBe(true);
    expect(again.kind === 'hello' && ackOf(again.reply)).toEqual({ type: 'ack', seq: 1, nextSample: 10 });
    expect(send(a, chunk(2, 10)).kind).toBe('chunk');
  });

  it('refuses a resume that changes the stream or starts beyond what is stored', () => {
    const a = new FeedAcceptor();
    send(a, hello);
    send(a, chunk(1, 0));
    a.disconnect();
    const changed = a.receive(encodeFrame({ ...hello, resumeFromSeq: 2, channelNames: ['C3', 'Cz'] }));
    expect(changed.kind === 'refuse' && changed.error.field).toBe('hello.channelNames');
    const b = new FeedAcceptor();
    const ahead = b.receive(encodeFrame({ ...hello, resumeFromSeq: 5 }));
    // docs/feed-protocol.md: a bridge may not skip frames the server never acknowledged.
    expect(ahead.kind === 'refuse' && ahead.error.field).toBe('hello.resumeFromSeq');
  });

  it('trims a GAP that stands in for frames partly stored before the ACK was lost', () => {
    const a = new FeedAcceptor();
    send(a, hello);
    send(a, chunk(1, 0));
    send(a, chunk(2, 10)); // stored, but say its ACK never reached the bridge
    a.disconnect();
    send(a, { ...hello, resumeFromSeq: 2 });
    // The bridge gave up seq 2..4 (samples 10..40) and announces them as one GAP.
    const ev = send(a, { type: 'gap', seq: 2, lastSeq: 4, fromSample: 10, toSample: 40, reason: 'overflow' });
    // docs/feed-protocol.md GAP: only samples the server lacks are missing.
    expect(ev.kind === 'gap' && [ev.seq, ev.fromSample, ev.toSample]).toEqual([4, 20, 40]);
    expect(send(a, chunk(5, 40)).kind).toBe('chunk');
    expect(a.durableSampleCount).toBe(50);
  });

  it('survives a restart through its snapshot', () => {
    const a = new FeedAcceptor();
    send(a, hello);
    send(a, chunk(1, 0));
    const b = FeedAcceptor.fromSnapshot(JSON.parse(JSON.stringify(a.snapshot())));
    const ev = b.receive(encodeFrame({ ...hello, resumeFromSeq: 2 }));
    // Invariant: a restored acceptor continues where the durable state ended.
    expect(ev.kind === 'hello' && ackOf(ev.reply)).toEqual({ type: 'ack', seq: 1, nextSample: 10 });
  });

  it('echoes keepalives and refuses server-only frames from a bridge', () => {
    const a = new FeedAcceptor();
    send(a, hello);
    const ka = a.receive(encodeFrame({ type: 'keepalive', sentAtMs: 12.5 }));
    expect(ka.kind === 'keepalive' && decodeFrame(ka.reply)).toEqual({ type: 'keepalive', sentAtMs: 12.5 });
    const ack = a.receive(encodeFrame({ type: 'ack', seq: 0, nextSample: 0 }));
    // docs/feed-protocol.md: ACK and REFUSE travel server -> bridge only.
    expect(ack.kind === 'refuse' && ack.error.code).toBe('unexpected-frame');
    expect(ack.kind === 'refuse' && new TextEncoder().encode(ack.reason).length).toBeLessThanOrEqual(123);
  });
});
