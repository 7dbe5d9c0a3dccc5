/**
 * Aftercue feed protocol, version 1: the frames a bridge and the server exchange over one
 * WebSocket (binary messages, one frame per message, little-endian). Byte layouts are in
 * docs/feed-protocol.md; this file holds the decoded shapes, the limits and the error type.
 *
 * Every data-bearing frame (CHUNK, CUE, GAP) carries a sequence number from one counter per
 * bridge session, starting at 1; the server's ACK names the last sequence number it has
 * durably stored, and the bridge discards what is acknowledged.
 */

/** Protocol version written into every frame header. */
export const FEED_PROTOCOL_VERSION = 1;

/** The two magic bytes that open every frame: ASCII "AF" (0x41 0x46). */
export const FEED_MAGIC_0 = 0x41;
export const FEED_MAGIC_1 = 0x46;

/** Bytes of the common frame header: magic (2), version (1), type (1), payload length (u32). */
export const FRAME_HEADER_BYTES = 8;

/** Frame type codes (byte 3 of the header). 0x01-0x0f bridge -> server, 0x10-0x1f server -> bridge. */
export const FrameType = {
  hello: 0x01,
  chunk: 0x02,
  cue: 0x03,
  gap: 0x04,
  keepalive: 0x05,
  ack: 0x10,
  refuse: 0x11,
} as const;
export type FrameTypeName = keyof typeof FrameType;

/**
 * Hard limits a decoder enforces before allocating anything. A WebSocket server should also pass
 * `maxFrameBytes` to its transport (ws: `maxPayload`) so an oversized message never reaches us.
 */
export interface FeedLimits {
  /** Largest whole frame, header included, in bytes. */
  maxFrameBytes: number;
  maxChannels: number;
  maxSamplesPerChunk: number;
  /** UTF-8 byte lengths. */
  maxChannelNameBytes: number;
  maxUnitBytes: number;
  maxRigIdBytes: number;
  maxSessionIdBytes: number;
  maxStartTimeBytes: number;
  maxLabelBytes: number;
  /** 123 = the longest reason a WebSocket close frame can carry (RFC 6455 section 5.5). */
  maxReasonBytes: number;
  maxSampleRateHz: number;
}

/** Default limits of protocol version 1. */
export const FEED_LIMITS: Readonly<FeedLimits> = Object.freeze({
  maxFrameBytes: 1 << 20,
  maxChannels: 512,
  maxSamplesPerChunk: 4096,
  maxChannelNameBytes: 32,
  maxUnitBytes: 16,
  maxRigIdBytes: 64,
  maxSessionIdBytes: 64,
  maxStartTimeBytes: 40,
  maxLabelBytes: 64,
  maxReasonBytes: 123,
  maxSampleRateHz: 100_000,
});

/** Largest sample index or sequence-range end the protocol carries: 2^53 - 1 (exact in a double). */
export const MAX_SAMPLE_INDEX = Number.MAX_SAFE_INTEGER;

/** Largest sequence number (u32). */
export const MAX_SEQ = 0xffff_ffff;

/** Bridge -> server, first frame of every connection: describes the stream and where it resumes. */
export interface HelloFrame {
  type: 'hello';
  /** First sequence number this connection will send (1 for a new session, last ACK + 1 on resume). */
  resumeFromSeq: number;
  sampleRateHz: number;
  rigId: string;
  /** Chosen by the bridge once per stream; the server keys its resume state on it. */
  bridgeSessionId: string;
  /** ISO 8601 time of sample 0. */
  startTime: string;
  channelNames: string[];
  /** One physical unit per channel, e.g. 'uV'. */
  units: string[];
}

/** Bridge -> server: `sampleCount` samples of every channel, interleaved [sample][channel]. */
export interface ChunkFrame {
  type: 'chunk';
  seq: number;
  /** Index of the chunk's first sample since sample 0 of the stream. */
  firstSample: number;
  channelCount: number;
  sampleCount: number;
  /** length channelCount * sampleCount, [sample][channel]; NaN is allowed (it is data). */
  samples: Float32Array;
}

/** Bridge -> server: a cue marker. */
export interface CueFrame {
  type: 'cue';
  seq: number;
  /** Sample index of the cue onset. */
  sample: number;
  /** Unique within the bridge session. */
  cueId: number;
  /** Class label, '' when the class is not known to the bridge. */
  label: string;
}

/** Why samples are missing. */
export const GapReason = {
  /** The amplifier or its link lost them before the bridge saw them. */
  source: 1,
  /** The bridge held them but its unacknowledged buffer overflowed. */
  overflow: 2,
} as const;
export type GapReasonName = keyof typeof GapReason;

/**
 * Bridge -> server: samples [fromSample, toSample) will never arrive. A GAP may stand in for a
 * run of earlier frames the bridge had to discard, so it occupies the sequence range
 * [seq, lastSeq].
 */
export interface GapFrame {
  type: 'gap';
  seq: number;
  lastSeq: number;
  fromSample: number;
  toSample: number;
  reason: GapReasonName;
}

/** Either direction: liveness; the receiver may echo it. */
export interface KeepaliveFrame {
  type: 'keepalive';
  /** Sender's wall clock, milliseconds since the Unix epoch. */
  sentAtMs: number;
}

/** Server -> bridge: everything up to and including `seq` is durably stored. */
export interface AckFrame {
  type: 'ack';
  /** 0 when nothing is stored yet. */
  seq: number;
  /** The next sample index the server expects. */
  nextSample: number;
}

/** Server -> bridge, just before it closes the socket with the same code and reason. */
export interface RefuseFrame {
  type: 'refuse';
  code: number;
  reason: string;
}

export type FeedFrame = HelloFrame | ChunkFrame | CueFrame | GapFrame | KeepaliveFrame | AckFrame | RefuseFrame;
/** Frames that carry a sequence number and must be acknowledged. */
export type SequencedFrame = ChunkFrame | CueFrame | GapFrame;

/**
 * Close codes (WebSocket private range 4000-4999) used both in REFUSE frames and in the close
 * frame that follows. `retry` says whether a bridge should reconnect after it.
 */
export const FeedCloseCode = {
  badFrame: 4400,
  unauthorized: 4401,
  forbidden: 4403,
  conflict: 4409,
  tooLarge: 4413,
  tooManyFeeds: 4429,
  serverError: 4500,
  goingAway: 4503,
} as const;

/** Whether a bridge should reconnect after the server closed with `code`. */
export function isRetryableClose(code: number): boolean {
  return !(code === FeedCloseCode.badFrame || code === FeedCloseCode.unauthorized ||
    code === FeedCloseCode.forbidden || code === FeedCloseCode.conflict || code === FeedCloseCode.tooLarge);
}

export type FeedProtocolErrorCode =
  | 'truncated' | 'trailing-bytes' | 'bad-magic' | 'unsupported-version' | 'unknown-type'
  | 'length-mismatch' | 'too-large' | 'limit-exceeded' | 'invalid-value' | 'bad-utf8'
  | 'out-of-order' | 'unexpected-frame' | 'header-mismatch';

/**
 * A frame that cannot be accepted. `field` names the frame field at fault (e.g. 'chunk.sampleCount').
 * Decoders throw only this type, whatever bytes they are given.
 */
export class FeedProtocolError extends Error {
  constructor(readonly code: FeedProtocolErrorCode, readonly field: string, detail: string) {
    super(`${field}: ${detail}`);
    this.name = 'FeedProtocolError';
  }

  /** The close code a server answers this error with. */
  get closeCode(): number {
    if (this.code === 'too-large') return FeedCloseCode.tooLarge;
    if (this.code === 'out-of-order' || this.code === 'header-mismatch') return FeedCloseCode.conflict;
    return FeedCloseCode.badFrame;
  }
}
