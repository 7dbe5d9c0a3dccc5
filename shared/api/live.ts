/**
 * WebSocket messages of a pilot session (same port as the HTTP API). Framework-free.
 *
 * /ws/console?sessionId=N (signed-in, session:read): the server sends text JSON
 * `ConsoleMessage`s and binary display frames (`encodeDisplayFrame`).
 * /ws/display/<token> (no account; a one-time token from POST display-link): text JSON
 * `DisplayMessage`s.
 * Clients send nothing; a refusal is a close code (`LiveCloseCode`) plus a reason.
 */
import { z } from 'zod';
import {
  feedStateSchema, SESSION_STATUSES, sessionDetailSchema, sessionEventSchema, sessionSummarySchema, trialSchema,
} from './sessions';

/** Per-channel signal quality over about the last second of filtered samples. */
export const qualityChannelSchema = z.object({
  name: z.string(),
  /** Root mean square, µV (after the decoder's filters). */
  rmsUv: z.number(),
  /** No variation (peak-to-peak below 0.1 µV) or no finite sample. */
  flat: z.boolean(),
  /** Clipping: at least 10 % of the raw samples sit exactly at the window's extreme value. */
  saturated: z.boolean(),
  /** Flat, saturated, or an RMS beyond the calibration limit. */
  flagged: z.boolean(),
});
export type QualityChannel = z.infer<typeof qualityChannelSchema>;

/** The session's state for the console's header: summary, counts and feed. */
export const statusSessionSchema = sessionSummarySchema.extend({ feed: feedStateSchema });

export const consoleMessageSchema = z.discriminatedUnion('type', [
  /** First message after the socket opens. `channelNames` are the channels of the display frames. */
  z.object({ type: z.literal('hello'), session: sessionDetailSchema, displayRateHz: z.number(), channelNames: z.array(z.string()) }),
  /** After every state change, and about once a second while the feed runs. */
  z.object({ type: z.literal('status'), session: statusSessionSchema }),
  /** About once a second, in `channelNames` order. */
  z.object({ type: z.literal('quality'), channels: z.array(qualityChannelSchema) }),
  /** A cue marker arrived from the feed. */
  z.object({ type: z.literal('cue'), cueId: z.number().int(), sampleIndex: z.number().int(), classLabel: z.string().nullable() }),
  z.object({ type: z.literal('trial'), trial: trialSchema }),
  z.object({ type: z.literal('event'), event: sessionEventSchema }),
]);
export type ConsoleMessage = z.infer<typeof consoleMessageSchema>;

export const displayMessageSchema = z.discriminatedUnion('type', [
  z.object({ type: z.literal('ready'), classes: z.array(z.string()) }),
  /** The instruction to show; classLabel '' when the feed did not name the class. */
  z.object({ type: z.literal('cue'), cueId: z.number().int(), classLabel: z.string() }),
  z.object({ type: z.literal('feedback'), cueId: z.number().int(), predictedClass: z.string(), probability: z.number(),
    correct: z.boolean().nullable() }),
  z.object({ type: z.literal('state'), status: z.enum(SESSION_STATUSES) }),
]);
export type DisplayMessage = z.infer<typeof displayMessageSchema>;

/** Close codes of the console and display sockets (WebSocket private range). */
export const LiveCloseCode = {
  /** Bad query or path (e.g. sessionId missing). */
  badRequest: 4400,
  /** Not signed in. */
  unauthenticated: 4401,
  /** Signed in without session:read; or a display token that is unknown, used or expired. */
  forbidden: 4403,
  notFound: 4404,
  /** The session stopped (display) or the server is shutting down. */
  goingAway: 4503,
} as const;

/** Kind code of the binary display frame. */
export const DISPLAY_FRAME_KIND = 1;
/** Bytes before the samples: u32 kind, u32 channels, u32 samples, f64 firstSampleIndex, f64 rate. */
export const DISPLAY_FRAME_HEADER_BYTES = 28;

/** A block of display samples. */
export interface DisplayFrame {
  channels: number;
  samples: number;
  /** Feed sample index (at the display rate's grid, in feed samples) of the block's first sample. */
  firstSampleIndex: number;
  /** Rate of this display stream, Hz (the feed's rate divided by the decimation factor). */
  sampleRateHz: number;
  /** [sample][channel] interleaved, µV, filtered; length channels * samples. */
  data: Float32Array;
}

/**
 * Binary display frame, little-endian: [u32 kind=1][u32 channels][u32 samples]
 * [f64 firstSampleIndex][f64 sampleRateHz][float32 × channels·samples, interleaved [sample][channel]].
 */
export function encodeDisplayFrame(f: DisplayFrame): Uint8Array {
  if (f.data.length !== f.channels * f.samples) {
    throw new RangeError(`display frame: expected ${f.channels * f.samples} values, got ${f.data.length}`);
  }
  const out = new Uint8Array(DISPLAY_FRAME_HEADER_BYTES + f.data.length * 4);
  const v = new DataView(out.buffer);
  v.setUint32(0, DISPLAY_FRAME_KIND, true);
  v.setUint32(4, f.channels, true);
  v.setUint32(8, f.samples, true);
  v.setFloat64(12, f.firstSampleIndex, true);
  v.setFloat64(20, f.sampleRateHz, true);
  for (let i = 0, o = DISPLAY_FRAME_HEADER_BYTES; i < f.data.length; i++, o += 4) v.setFloat32(o, f.data[i]!, true);
  return out;
}

/** Reads a binary display frame; throws RangeError on a malformed one. */
export function decodeDisplayFrame(bytes: ArrayBuffer | Uint8Array): DisplayFrame {
  const u8 = bytes instanceof Uint8Array ? bytes : new Uint8Array(bytes);
  if (u8.byteLength < DISPLAY_FRAME_HEADER_BYTES) throw new RangeError(`display frame: ${u8.byteLength} bytes is shorter than its header`);
  const v = new DataView(u8.buffer, u8.byteOffset, u8.byteLength);
  const kind = v.getUint32(0, true);
  if (kind !== DISPLAY_FRAME_KIND) throw new RangeError(`display frame: expected kind ${DISPLAY_FRAME_KIND}, got ${kind}`);
  const channels = v.getUint32(4, true);
  const samples = v.getUint32(8, true);
  const n = channels * samples;
  if (u8.byteLength !== DISPLAY_FRAME_HEADER_BYTES + n * 4) {
    throw new RangeError(`display frame: expected ${DISPLAY_FRAME_HEADER_BYTES + n * 4} bytes, got ${u8.byteLength}`);
  }
  const data = new Float32Array(n);
  for (let i = 0, o = DISPLAY_FRAME_HEADER_BYTES; i < n; i++, o += 4) data[i] = v.getFloat32(o, true);
  return { channels, samples, firstSampleIndex: v.getFloat64(12, true), sampleRateHz: v.getFloat64(20, true), data };
}
