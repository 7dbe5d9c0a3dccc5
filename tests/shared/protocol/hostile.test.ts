import { describe, expect, it } from 'vitest';
import { decodeFrame, encodeFrame, FEED_LIMITS, FeedProtocolError, type FeedProtocolErrorCode } from '../../../shared/protocol';
import { examples } from './examples';

function errorOf(bytes: Uint8Array): FeedProtocolError {
  try {
    decodeFrame(bytes);
  } catch (e) {
    if (e instanceof FeedProtocolError) return e;
    throw new Error(`decodeFrame threw a non-protocol error: ${String(e)}`);
  }
  throw new Error('decodeFrame accepted a frame it should refuse');
}

function expectRefused(bytes: Uint8Array, code: FeedProtocolErrorCode, field: RegExp): void {
  const e = errorOf(bytes);
  expect(e.code).toBe(code);
  expect(e.field).toMatch(field);
}

/** Patches the header's payload length so a crafted payload passes the length check. */
function withPayload(type: number, payload: number[]): Uint8Array {
  const out = new Uint8Array(8 + payload.length);
  out.set([0x41, 0x46, 0x01, type]);
  new DataView(out.buffer).setUint32(4, payload.length, true);
  out.set(payload, 8);
  return out;
}

const le32 = (v: number) => [v & 0xff, (v >>> 8) & 0xff, (v >>> 16) & 0xff, (v >>> 24) & 0xff];
const le16 = (v: number) => [v & 0xff, (v >>> 8) & 0xff];

describe('decoding hostile frames', () => {
  it.each(examples)('refuses every truncation of the $name example with a typed error', ({ bytes }) => {
    for (let n = 0; n < bytes.byteLength; n++) {
      const e = errorOf(bytes.subarray(0, n));
      // docs/feed-protocol.md: a frame shorter than its header or its stated payload is refused.
      expect(['truncated', 'length-mismatch']).toContain(e.code);
    }
  });

  it.each(examples)('refuses the $name example with a byte appended', ({ bytes }) => {
    const longer = new Uint8Array(bytes.byteLength + 1);
    longer.set(bytes);
    // docs/feed-protocol.md: the payload length must equal the message length minus 8.
    expectRefused(longer, 'length-mismatch', /header\.payloadLength/);
  });

  it('refuses a frame whose payload is longer than its fields', () => {
    const ack = examples.find((e) => e.name === 'ack')!.bytes;
    const patched = withPayload(0x10, [...ack.subarray(8), 0]);
    // docs/feed-protocol.md: no bytes may follow the last field.
    expectRefused(patched, 'trailing-bytes', /ack/);
  });

  it('refuses a wrong magic, an unknown version and an unknown type', () => {
    const ack = examples.find((e) => e.name === 'ack')!.bytes;
    // docs/feed-protocol.md header: magic "AF", version 1, known type codes.
    expectRefused(Uint8Array.from([0x42, ...ack.subarray(1)]), 'bad-magic', /header\.magic/);
    expectRefused(Uint8Array.from([0x41, 0x46, 0x02, ...ack.subarray(3)]), 'unsupported-version', /header\.version/);
    expectRefused(Uint8Array.from([0x41, 0x46, 0x01, 0x7f, ...ack.subarray(4)]), 'unknown-type', /header\.type/);
  });

  it('refuses a frame larger than the limit before looking inside it', () => {
    // FEED_LIMITS.maxFrameBytes (docs/feed-protocol.md, limits).
    expectRefused(new Uint8Array(FEED_LIMITS.maxFrameBytes + 1), 'too-large', /frame/);
  });

  it('refuses huge chunk counts without allocating their size', () => {
    // 65535 channels x 65535 samples would be 17 GB of float32: the counts are checked first.
    const payload = [...le32(1), ...le32(0), ...le32(0), ...le16(65535), ...le16(65535), 0, 0, 0, 0];
    expectRefused(withPayload(0x02, payload), 'limit-exceeded', /chunk\.channelCount/);
    // Within the limits but more samples than the message holds.
    const short = [...le32(1), ...le32(0), ...le32(0), ...le16(512), ...le16(4096), 0, 0, 0, 0];
    expectRefused(withPayload(0x02, short), 'length-mismatch', /chunk\.samples/);
    const zero = [...le32(1), ...le32(0), ...le32(0), ...le16(4), ...le16(0)];
    expectRefused(withPayload(0x02, zero), 'limit-exceeded', /chunk\.sampleCount/);
  });

  it('refuses a sample index beyond 2^53 - 1', () => {
    const payload = [...le32(1), ...le32(0), ...le32(0x0020_0000), ...le32(3), 0];
    // docs/feed-protocol.md: u64 fields must stay exact as doubles.
    expectRefused(withPayload(0x03, payload), 'limit-exceeded', /cue\.sample/);
  });

  it('refuses a HELLO claiming more channels than the limit or than its bytes hold', () => {
    const head = [...le32(1), 0, 0, 0, 0, 0, 0x40, 0x6f, 0x40];
    const strings = [1, 0x72, 1, 0x73, 24, ...Array.from('2024-05-06T07:08:09.000Z', (c) => c.charCodeAt(0))];
    // FEED_LIMITS.maxChannels = 512.
    expectRefused(withPayload(0x01, [...head, ...le16(513), 0, 0, ...strings]), 'limit-exceeded', /hello\.channelCount/);
    // 500 channels announced, none present.
    expectRefused(withPayload(0x01, [...head, ...le16(500), 0, 0, ...strings]), 'truncated', /hello\.channelNames/);
  });

  it('refuses malformed UTF-8, control characters and over-long strings', () => {
    // RFC 3629: 0xC3 0x28 is not valid UTF-8.
    const badUtf8 = [...le32(1), ...le32(10), ...le32(0), ...le32(1), 2, 0xc3, 0x28];
    expectRefused(withPayload(0x03, badUtf8), 'bad-utf8', /cue\.label/);
    const control = [...le32(1), ...le32(10), ...le32(0), ...le32(1), 2, 0x41, 0x0a];
    expectRefused(withPayload(0x03, control), 'invalid-value', /cue\.label/);
    const long = [...le32(1), ...le32(10), ...le32(0), ...le32(1), 65, ...new Array<number>(65).fill(0x41)];
    // FEED_LIMITS.maxLabelBytes = 64.
    expectRefused(withPayload(0x03, long), 'limit-exceeded', /cue\.label/);
  });

  it('refuses semantic nonsense: empty gaps, seq 0, unknown gap reasons, bad start times', () => {
    const gap = (seq: number, last: number, from: number, to: number, reason: number) =>
      withPayload(0x04, [...le32(seq), ...le32(last), ...le32(from), ...le32(0), ...le32(to), ...le32(0), reason]);
    // docs/feed-protocol.md GAP: fromSample < toSample, lastSeq >= seq >= 1, reason 1 or 2.
    expectRefused(gap(1, 1, 10, 10, 1), 'invalid-value', /gap\.toSample/);
    expectRefused(gap(0, 1, 0, 10, 1), 'invalid-value', /gap\.seq/);
    expectRefused(gap(3, 2, 0, 10, 1), 'invalid-value', /gap\.lastSeq/);
    expectRefused(gap(1, 1, 0, 10, 9), 'invalid-value', /gap\.reason/);
    const hello = examples.find((e) => e.name === 'hello')!.frame;
    const bytes = encodeFrame(hello);
    const text = new TextDecoder().decode(bytes);
    const at = text.indexOf('2024-05-06T');
    const bad = bytes.slice();
    bad[at + 10] = 0x20; // 'T' -> ' '
    expectRefused(bad, 'invalid-value', /hello\.startTime/);
  });

  it('accepts NaN and infinities in samples: they are data', () => {
    const chunk = examples.find((e) => e.name === 'chunk')!.bytes;
    const withInf = chunk.slice();
    withInf.set([0x00, 0x00, 0x80, 0x7f], 24); // +Infinity
    const f = decodeFrame(withInf);
    // STYLE.md: NaN in a signal is data; a wrong shape is an error.
    expect(f.type === 'chunk' && f.samples[0]).toBe(Infinity);
    expect(f.type === 'chunk' && Number.isNaN(f.samples[4])).toBe(true);
  });

  it('turns random and bit-flipped input into a frame or a typed error, never anything else', () => {
    let s = 0x9e3779b9;
    const rnd = () => { s ^= s << 13; s ^= s >>> 17; s ^= s << 5; return (s >>> 0) / 2 ** 32; };
    let refused = 0;
    for (let trial = 0; trial < 3000; trial++) {
      const base = examples[trial % examples.length]!.bytes;
      const b = trial % 3 === 0
        ? Uint8Array.from({ length: Math.floor(rnd() * 64) }, () => Math.floor(rnd() * 256))
        : base.slice();
      if (trial % 3 !== 0) {
        const flips = 1 + Math.floor(rnd() * 4);
        for (let k = 0; k < flips; k++) {
          const i = Math.floor(rnd() * b.length);
          b[i] = b[i]! ^ (1 << Math.floor(rnd() * 8));
        }
      }
      try { decodeFrame(b); } catch (e) {
        // Common practice (robust parsing): only the typed error may escape.
        expect(e).toBeInstanceOf(FeedProtocolError);
        refused++;
      }
    }
    expect(refused).toBeGreaterThan(1000);
  });
});
