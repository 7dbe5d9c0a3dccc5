/**
 * Decoder for feed protocol version 1 (byte layouts: docs/feed-protocol.md). Whatever the input,
 * `decodeFrame` either returns a valid frame or throws a FeedProtocolError (code + field): it
 * checks the total size against the limit first and every count against the bytes present
 * before it allocates, so a hostile frame can neither crash it nor make it allocate more than
 * the frame's own size.
 */
import { ByteReader } from './bytes';
import {
  FEED_LIMITS, FEED_MAGIC_0, FEED_MAGIC_1, FEED_PROTOCOL_VERSION, FRAME_HEADER_BYTES, FeedProtocolError,
  FrameType, GapReason,
  type AckFrame, type ChunkFrame, type CueFrame, type FeedFrame, type FeedLimits, type GapFrame,
  type GapReasonName, type HelloFrame, type KeepaliveFrame, type RefuseFrame,
} from './frames';
import {
  checkAck, checkChunk, checkChunkCounts, checkCue, checkGap, checkHello, checkKeepalive, checkRefuse,
} from './validate';

/** Decodes one binary WebSocket message into a frame. Throws FeedProtocolError only. */
export function decodeFrame(input: Uint8Array | ArrayBuffer, limits: FeedLimits = FEED_LIMITS): FeedFrame {
  const bytes = input instanceof Uint8Array ? input : new Uint8Array(input);
  if (bytes.byteLength > limits.maxFrameBytes) {
    throw new FeedProtocolError('too-large', 'frame', `${bytes.byteLength} bytes exceeds ${limits.maxFrameBytes}`);
  }
  if (bytes.byteLength < FRAME_HEADER_BYTES) {
    throw new FeedProtocolError('truncated', 'header', `needs ${FRAME_HEADER_BYTES} bytes, got ${bytes.byteLength}`);
  }
  if (bytes[0] !== FEED_MAGIC_0 || bytes[1] !== FEED_MAGIC_1) {
    throw new FeedProtocolError('bad-magic', 'header.magic', 'expected "AF" (41 46)');
  }
  if (bytes[2] !== FEED_PROTOCOL_VERSION) {
    throw new FeedProtocolError('unsupported-version', 'header.version', `expected ${FEED_PROTOCOL_VERSION}, got ${bytes[2]}`);
  }
  const head = new ByteReader(bytes);
  head.offset = 3;
  const type = head.u8('header.type');
  const payloadBytes = head.u32('header.payloadLength');
  if (payloadBytes !== bytes.byteLength - FRAME_HEADER_BYTES) {
    throw new FeedProtocolError('length-mismatch', 'header.payloadLength',
      `says ${payloadBytes} bytes, the message holds ${bytes.byteLength - FRAME_HEADER_BYTES}`);
  }
  const r = new ByteReader(bytes.subarray(FRAME_HEADER_BYTES));
  const frame = decodePayload(type, r, limits);
  if (r.remaining !== 0) throw new FeedProtocolError('trailing-bytes', `${frame.type}`, `${r.remaining} byte(s) after the last field`);
  return frame;
}

function decodePayload(type: number, r: ByteReader, limits: FeedLimits): FeedFrame {
  switch (type) {
    case FrameType.hello: return decodeHello(r, limits);
    case FrameType.chunk: return decodeChunk(r, limits);
    case FrameType.cue: return decodeCue(r, limits);
    case FrameType.gap: return decodeGap(r);
    case FrameType.keepalive: return decodeKeepalive(r);
    case FrameType.ack: return decodeAck(r);
    case FrameType.refuse: return decodeRefuse(r, limits);
    default: throw new FeedProtocolError('unknown-type', 'header.type', `unknown frame type 0x${type.toString(16)}`);
  }
}

function decodeHello(r: ByteReader, limits: FeedLimits): HelloFrame {
  const resumeFromSeq = r.u32('hello.resumeFromSeq');
  const sampleRateHz = r.f64('hello.sampleRateHz');
  const channelCount = r.u16('hello.channelCount');
  if (channelCount < 1 || channelCount > limits.maxChannels) {
    throw new FeedProtocolError('limit-exceeded', 'hello.channelCount', `expected 1..${limits.maxChannels}, got ${channelCount}`);
  }
  if (r.u16('hello.reserved') !== 0) throw new FeedProtocolError('invalid-value', 'hello.reserved', 'must be 0');
  const rigId = r.str8('hello.rigId', limits.maxRigIdBytes);
  const bridgeSessionId = r.str8('hello.bridgeSessionId', limits.maxSessionIdBytes);
  const startTime = r.str8('hello.startTime', limits.maxStartTimeBytes);
  // Each name and unit takes at least its length byte: refuse early if they cannot all be present.
  r.need(2 * channelCount, 'hello.channelNames');
  const channelNames: string[] = [];
  for (let i = 0; i < channelCount; i++) channelNames.push(r.str8(`hello.channelNames[${i}]`, limits.maxChannelNameBytes));
  const units: string[] = [];
  for (let i = 0; i < channelCount; i++) units.push(r.str8(`hello.units[${i}]`, limits.maxUnitBytes));
  const f: HelloFrame = { type: 'hello', resumeFromSeq, sampleRateHz, rigId, bridgeSessionId, startTime, channelNames, units };
  checkHello(f, limits);
  return f;
}

function decodeChunk(r: ByteReader, limits: FeedLimits): ChunkFrame {
  const seq = r.u32('chunk.seq');
  const firstSample = r.u64('chunk.firstSample');
  const channelCount = r.u16('chunk.channelCount');
  const sampleCount = r.u16('chunk.sampleCount');
  checkChunkCounts(channelCount, sampleCount, limits);
  const n = channelCount * sampleCount;
  if (r.remaining !== 4 * n) {
    throw new FeedProtocolError('length-mismatch', 'chunk.samples',
      `${channelCount} x ${sampleCount} float32 need ${4 * n} bytes, got ${r.remaining}`);
  }
  const samples = r.f32Array(n, 'chunk.samples');
  const f: ChunkFrame = { type: 'chunk', seq, firstSample, channelCount, sampleCount, samples };
  checkChunk(f, limits);
  return f;
}

function decodeCue(r: ByteReader, limits: FeedLimits): CueFrame {
  const f: CueFrame = {
    type: 'cue',
    seq: r.u32('cue.seq'),
    sample: r.u64('cue.sample'),
    cueId: r.u32('cue.cueId'),
    label: r.str8('cue.label', limits.maxLabelBytes),
  };
  checkCue(f);
  return f;
}

const REASON_BY_CODE = new Map<number, GapReasonName>(
  (Object.keys(GapReason) as GapReasonName[]).map((k) => [GapReason[k], k]));

function decodeGap(r: ByteReader): GapFrame {
  const seq = r.u32('gap.seq');
  const lastSeq = r.u32('gap.lastSeq');
  const fromSample = r.u64('gap.fromSample');
  const toSample = r.u64('gap.toSample');
  const code = r.u8('gap.reason');
  const reason = REASON_BY_CODE.get(code);
  if (!reason) throw new FeedProtocolError('invalid-value', 'gap.reason', `unknown reason ${code}`);
  const f: GapFrame = { type: 'gap', seq, lastSeq, fromSample, toSample, reason };
  checkGap(f);
  return f;
}

function decodeKeepalive(r: ByteReader): KeepaliveFrame {
  const f: KeepaliveFrame = { type: 'keepalive', sentAtMs: r.f64('keepalive.sentAtMs') };
  checkKeepalive(f);
  return f;
}

function decodeAck(r: ByteReader): AckFrame {
  const f: AckFrame = { type: 'ack', seq: r.u32('ack.seq'), nextSample: r.u64('ack.nextSample') };
  checkAck(f);
  return f;
}

function decodeRefuse(r: ByteReader, limits: FeedLimits): RefuseFrame {
  const f: RefuseFrame = { type: 'refuse', code: r.u16('refuse.code'), reason: r.str8('refuse.reason', limits.maxReasonBytes) };
  checkRefuse(f);
  return f;
}
