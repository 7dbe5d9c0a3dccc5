import { describe, expect, it } from 'vitest';
import {
  decodeFrame, encodeFrame, FEED_LIMITS, FeedProtocolError, type ChunkFrame, type FeedFrame,
} from '../../../shared/protocol';
import { expectAllClose } from '../../helpers/all-close';
import { bytesToHex, examples, fixtureSource } from './examples';

function expectSameFrame(actual: FeedFrame, expected: FeedFrame): void {
  if (expected.type === 'chunk' && actual.type === 'chunk') {
    const { samples: a, ...restA } = actual;
    const { samples: e, ...restE } = expected;
    expect(restA).toEqual(restE);
    // float32 values survive bit for bit (compared as their IEEE-754 bit patterns, so NaN and ±Infinity count too)
    expectAllClose(new Uint32Array(a.buffer, a.byteOffset, a.length), new Uint32Array(e.buffer, e.byteOffset, e.length), { rtol: 0, atol: 0 });
  } else {
    expect(actual).toEqual(expected);
  }
}

describe('feed protocol examples', () => {
  it('has a fixture written by the Python struct script', () => {
    // Reference: tests/fixtures/protocol/examples.json (make_examples.py, Python struct).
    expect(fixtureSource).toMatch(/make_examples\.py/);
    expect(examples.map((e) => e.name).sort()).toEqual(['ack', 'chunk', 'cue', 'gap', 'hello', 'keepalive', 'refuse']);
  });

  it.each(examples)('encodes the $name example byte for byte as the independent encoder does', ({ frame, bytes }) => {
    // Reference: tests/fixtures/protocol/examples.json, written from docs/feed-protocol.md with Python struct.
    expect(bytesToHex(encodeFrame(frame))).toBe(bytesToHex(bytes));
  });

  it.each(examples)('decodes the $name example bytes into the example frame', ({ frame, bytes }) => {
    // Reference: tests/fixtures/protocol/examples.json.
    expectSameFrame(decodeFrame(bytes), frame);
  });
});

describe('feed protocol round trips', () => {
  const rich: FeedFrame[] = [
    { type: 'hello', resumeFromSeq: 4_000_000_000, sampleRateHz: 2048, rigId: 'labor-é-1', bridgeSessionId: 'x'.repeat(64),
      startTime: '2024-01-02T03:04:05+01:00', channelNames: Array.from({ length: 512 }, (_, i) => `E${i}`),
      units: Array.from({ length: 512 }, () => 'µV') },
    { type: 'chunk', seq: 0xffff_ffff, firstSample: Number.MAX_SAFE_INTEGER - 4000, channelCount: 64, sampleCount: 4000,
      samples: Float32Array.from({ length: 64 * 4000 }, (_, i) => Math.sin(i) * 1e3) },
    { type: 'chunk', seq: 1, firstSample: 0, channelCount: 2, sampleCount: 1,
      samples: Float32Array.from([NaN, -Infinity]) },
    { type: 'cue', seq: 2, sample: 2 ** 40, cueId: 0xffff_ffff, label: '' },
    { type: 'cue', seq: 3, sample: 0, cueId: 0, label: 'Hand – links' },
    { type: 'gap', seq: 5, lastSeq: 5, fromSample: 0, toSample: 1, reason: 'source' },
    { type: 'keepalive', sentAtMs: -1.5 },
    { type: 'ack', seq: 0, nextSample: 0 },
    { type: 'refuse', code: 4999, reason: 'r'.repeat(123) },
  ];

  it.each(rich.map((f) => [f.type, f] as const))('a %s frame survives encode then decode unchanged', (_t, frame) => {
    // Invariant (no reference needed): decode(encode(f)) = f.
    expectSameFrame(decodeFrame(encodeFrame(frame)), frame);
  });

  it('decodes from an unaligned, pooled buffer without reading outside its view', () => {
    const chunk = rich[1] as ChunkFrame;
    const bytes = encodeFrame(chunk);
    const pool = new Uint8Array(bytes.byteLength + 7);
    pool.fill(0xee);
    pool.set(bytes, 3);
    const view = pool.subarray(3, 3 + bytes.byteLength);
    // Invariant: the decoded samples equal the originals whatever the view's alignment.
    expectSameFrame(decodeFrame(view), chunk);
  });

  it('refuses to encode a frame it would refuse to decode, naming the field', () => {
    const tooMany: FeedFrame = { type: 'chunk', seq: 1, firstSample: 0, channelCount: FEED_LIMITS.maxChannels + 1, sampleCount: 1,
      samples: new Float32Array(FEED_LIMITS.maxChannels + 1) };
    // Common practice: the sender enforces the receiver's limits.
    expect(() => encodeFrame(tooMany)).toThrow(FeedProtocolError);
    expect(() => encodeFrame(tooMany)).toThrow(/chunk\.channelCount/);
    const badSeq: FeedFrame = { type: 'cue', seq: 0, sample: 0, cueId: 1, label: 'x' };
    expect(() => encodeFrame(badSeq)).toThrow(/cue\.seq/);
  });
});
