import { describe, expect, it } from 'vitest';
import { decodeFrame } from '../../shared/protocol';
import { UnackedBuffer } from '../../simulator/bridge-buffer';
import type { FeedItem } from '../../simulator/feed-items';

const chunk = (firstSample: number, n = 10): FeedItem =>
  ({ kind: 'chunk', firstSample, sampleCount: n, channelCount: 1, samples: new Float32Array(n) });

describe('the bridge buffer', () => {
  it('numbers items from 1 and gives up the oldest chunks past its bound as one GAP', () => {
    const b = new UnackedBuffer(30);
    for (let i = 0; i < 3; i++) expect(b.push(chunk(10 * i))).toEqual([]);
    // docs/feed-protocol.md (bridge buffer): past the bound the oldest chunk becomes an overflow GAP.
    expect(b.push(chunk(30))).toEqual([[0, 10]]);
    expect(b.push(chunk(40))).toEqual([[10, 20]]);
    expect(b.entries.map((e) => [e.seq, e.lastSeq, e.item.kind])).toEqual([[1, 2, 'gap'], [3, 3, 'chunk'], [4, 4, 'chunk'], [5, 5, 'chunk']]);
    const gap = decodeFrame(b.bytes(b.entries[0]!));
    expect(gap).toEqual({ type: 'gap', seq: 1, lastSeq: 2, fromSample: 0, toSample: 20, reason: 'overflow' });
    expect(b.heldSamples).toBe(30);
  });

  it('never gives up a cue and does not merge a GAP across one', () => {
    const b = new UnackedBuffer(10);
    b.push(chunk(0));
    b.push({ kind: 'cue', sample: 5, cueId: 1, label: 'left-hand' });
    b.push(chunk(10));
    b.push(chunk(20));
    // Sequence numbers must stay contiguous: the cue (seq 2) splits the given-up range.
    expect(b.entries.map((e) => [e.seq, e.lastSeq, e.item.kind])).toEqual([[1, 1, 'gap'], [2, 2, 'cue'], [3, 3, 'gap'], [4, 4, 'chunk']]);
  });

  it('does not give up chunks on the wire until a HELLO reply shows they are missing', () => {
    const b = new UnackedBuffer(20);
    b.push(chunk(0));
    b.push(chunk(10));
    for (const e of b.entries) b.markSent(e);
    expect([b.heldSamples, b.wireSamples, b.canSendChunk]).toEqual([0, 20, false]);
    expect(b.push(chunk(20))).toEqual([]);
    expect(b.push(chunk(30))).toEqual([]);
    // The reconnect's HELLO reply acknowledged seq 1: seq 2 is certainly missing and counts again.
    b.connectionLost();
    b.ack(1);
    expect(b.connectionReady()).toEqual([[10, 20]]);
    expect(b.resumeFromSeq).toBe(2);
    expect(b.entries.every((e) => !e.sent)).toBe(true);
  });

  it('extends a source GAP that continues the previous one instead of numbering a new frame', () => {
    const b = new UnackedBuffer(100);
    b.push({ kind: 'gap', fromSample: 0, toSample: 10, reason: 'source' });
    b.push({ kind: 'gap', fromSample: 10, toSample: 25, reason: 'source' });
    b.push(chunk(25));
    expect(b.entries.map((e) => [e.seq, e.item.kind === 'gap' ? e.item.toSample : e.item.kind])).toEqual([[1, 25], [2, 'chunk']]);
    expect(b.ack(1)).toBe(1);
    expect(b.resumeFromSeq).toBe(2);
  });
});
