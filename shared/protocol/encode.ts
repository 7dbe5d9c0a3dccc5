/**
 * Encoders for feed protocol version 1 (byte layouts: docs/feed-protocol.md). Every encoder
 * validates its frame with the decoder's rules first, so a peer never receives a frame we would
 * refuse; a bad frame throws FeedProtocolError naming the field.
 */
import { ByteWriter, utf8 } from './bytes';
import {
  FEED_LIMITS, FEED_MAGIC_0, FEED_MAGIC_1, FEED_PROTOCOL_VERSION, FRAME_HEADER_BYTES, FeedProtocolError,
  FrameType, GapReason,
  type AckFrame, type ChunkFrame, type CueFrame, type FeedFrame, type FeedLimits, type GapFrame,
  type HelloFrame, type KeepaliveFrame, type RefuseFrame,
} from './frames';
import { checkAck, checkChunk, checkCue, checkGap, checkHello, checkKeepalive, checkRefuse } from './validate';

function frame(type: number, payloadBytes: number, limits: FeedLimits): ByteWriter {
  const total = FRAME_HEADER_BYTES + payloadBytes;
  if (total > limits.maxFrameBytes) {
    throw new FeedProtocolError('too-large', 'frame', `${total} bytes exceeds ${limits.maxFrameBytes}`);
  }
  const w = new ByteWriter(total);
  w.u8(FEED_MAGIC_0);
  w.u8(FEED_MAGIC_1);
  w.u8(FEED_PROTOCOL_VERSION);
  w.u8(type);
  w.u32(payloadBytes);
  return w;
}

/** HELLO: u32 resumeFromSeq, f64 sampleRateHz, u16 channelCount, u16 0, then str8 rigId, bridgeSessionId, startTime, names..., units... */
export function encodeHello(f: HelloFrame, limits: FeedLimits = FEED_LIMITS): Uint8Array {
  checkHello(f, limits);
  const rig = utf8(f.rigId, 'hello.rigId', limits.maxRigIdBytes);
  const session = utf8(f.bridgeSessionId, 'hello.bridgeSessionId', limits.maxSessionIdBytes);
  const start = utf8(f.startTime, 'hello.startTime', limits.maxStartTimeBytes);
  const names = f.channelNames.map((s, i) => utf8(s, `hello.channelNames[${i}]`, limits.maxChannelNameBytes));
  const units = f.units.map((s, i) => utf8(s, `hello.units[${i}]`, limits.maxUnitBytes));
  const strings = [rig, session, start, ...names, ...units];
  const size = 16 + strings.reduce((n, b) => n + 1 + b.byteLength, 0);
  const w = frame(FrameType.hello, size, limits);
  w.u32(f.resumeFromSeq);
  w.f64(f.sampleRateHz);
  w.u16(f.channelNames.length);
  w.u16(0);
  for (const s of strings) w.str8(s);
  return w.bytes;
}

/** CHUNK: u32 seq, u64 firstSample, u16 channelCount, u16 sampleCount, f32 samples [sample][channel]. */
export function encodeChunk(f: ChunkFrame, limits: FeedLimits = FEED_LIMITS): Uint8Array {
  checkChunk(f, limits);
  const w = frame(FrameType.chunk, 16 + 4 * f.samples.length, limits);
  w.u32(f.seq);
  w.u64(f.firstSample);
  w.u16(f.channelCount);
  w.u16(f.sampleCount);
  w.f32Array(f.samples);
  return w.bytes;
}

/** CUE: u32 seq, u64 sample, u32 cueId, str8 label. */
export function encodeCue(f: CueFrame, limits: FeedLimits = FEED_LIMITS): Uint8Array {
  checkCue(f);
  const label = utf8(f.label, 'cue.label', limits.maxLabelBytes);
  const w = frame(FrameType.cue, 17 + label.byteLength, limits);
  w.u32(f.seq);
  w.u64(f.sample);
  w.u32(f.cueId);
  w.str8(label);
  return w.bytes;
}

/** GAP: u32 seq, u32 lastSeq, u64 fromSample, u64 toSample (exclusive), u8 reason. */
export function encodeGap(f: GapFrame, limits: FeedLimits = FEED_LIMITS): Uint8Array {
  checkGap(f);
  const w = frame(FrameType.gap, 25, limits);
  w.u32(f.seq);
  w.u32(f.lastSeq);
  w.u64(f.fromSample);
  w.u64(f.toSample);
  w.u8(GapReason[f.reason]);
  return w.bytes;
}

/** KEEPALIVE: f64 sentAtMs. */
export function encodeKeepalive(f: KeepaliveFrame, limits: FeedLimits = FEED_LIMITS): Uint8Array {
  checkKeepalive(f);
  const w = frame(FrameType.keepalive, 8, limits);
  w.f64(f.sentAtMs);
  return w.bytes;
}

/** ACK: u32 seq, u64 nextSample. */
export function encodeAck(f: AckFrame, limits: FeedLimits = FEED_LIMITS): Uint8Array {
  checkAck(f);
  const w = frame(FrameType.ack, 12, limits);
  w.u32(f.seq);
  w.u64(f.nextSample);
  return w.bytes;
}

/** REFUSE: u16 code, str8 reason (at most 123 bytes, so it also fits the WebSocket close frame). */
export function encodeRefuse(f: RefuseFrame, limits: FeedLimits = FEED_LIMITS): Uint8Array {
  checkRefuse(f);
  const reason = utf8(f.reason, 'refuse.reason', limits.maxReasonBytes);
  const w = frame(FrameType.refuse, 3 + reason.byteLength, limits);
  w.u16(f.code);
  w.str8(reason);
  return w.bytes;
}

/** Encodes any frame by its `type`. */
export function encodeFrame(f: FeedFrame, limits: FeedLimits = FEED_LIMITS): Uint8Array {
  switch (f.type) {
    case 'hello': return encodeHello(f, limits);
    case 'chunk': return encodeChunk(f, limits);
    case 'cue': return encodeCue(f, limits);
    case 'gap': return encodeGap(f, limits);
    case 'keepalive': return encodeKeepalive(f, limits);
    case 'ack': return encodeAck(f, limits);
    case 'refuse': return encodeRefuse(f, limits);
  }
}
