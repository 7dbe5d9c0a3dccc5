/**
 * Value rules shared by the encoder (so we never send a frame we would refuse) and the decoder.
 * Each check throws a FeedProtocolError naming the field.
 */
import {
  FeedProtocolError, MAX_SAMPLE_INDEX, MAX_SEQ,
  type AckFrame, type ChunkFrame, type CueFrame, type FeedLimits, type GapFrame, type HelloFrame,
  type KeepaliveFrame, type RefuseFrame,
} from './frames';

// ISO 8601 date-time with seconds and an explicit zone (Z or +hh:mm), as Date.toISOString writes.
const ISO_TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d{1,9})?(Z|[+-]\d{2}:\d{2})$/;

function fail(field: string, detail: string): never {
  throw new FeedProtocolError('invalid-value', field, detail);
}

function checkInt(v: number, field: string, min: number, max: number): void {
  if (!Number.isInteger(v) || v < min || v > max) fail(field, `expected an integer in [${min}, ${max}], got ${v}`);
}

/** HELLO rules: resumeFromSeq >= 1, finite positive rate, non-empty ids, ISO start time, 1..maxChannels unique non-empty names, one unit per channel. */
export function checkHello(f: HelloFrame, limits: FeedLimits): void {
  checkInt(f.resumeFromSeq, 'hello.resumeFromSeq', 1, MAX_SEQ);
  if (!Number.isFinite(f.sampleRateHz) || f.sampleRateHz <= 0 || f.sampleRateHz > limits.maxSampleRateHz) {
    fail('hello.sampleRateHz', `expected a finite rate in (0, ${limits.maxSampleRateHz}], got ${f.sampleRateHz}`);
  }
  if (f.rigId.length === 0) fail('hello.rigId', 'is empty');
  if (f.bridgeSessionId.length === 0) fail('hello.bridgeSessionId', 'is empty');
  if (!ISO_TIME.test(f.startTime) || Number.isNaN(Date.parse(f.startTime))) {
    fail('hello.startTime', `expected an ISO 8601 date-time with zone, got '${f.startTime}'`);
  }
  const n = f.channelNames.length;
  if (n < 1 || n > limits.maxChannels) {
    throw new FeedProtocolError('limit-exceeded', 'hello.channelCount', `expected 1..${limits.maxChannels}, got ${n}`);
  }
  if (f.units.length !== n) fail('hello.units', `expected ${n} units, got ${f.units.length}`);
  const seen = new Set<string>();
  f.channelNames.forEach((name, i) => {
    if (name.length === 0) fail(`hello.channelNames[${i}]`, 'is empty');
    if (seen.has(name)) fail(`hello.channelNames[${i}]`, `duplicate channel name '${name}'`);
    seen.add(name);
  });
}

/** CHUNK rules: seq >= 1, counts within limits, samples.length = channelCount * sampleCount. */
export function checkChunk(f: ChunkFrame, limits: FeedLimits): void {
  checkInt(f.seq, 'chunk.seq', 1, MAX_SEQ);
  checkInt(f.firstSample, 'chunk.firstSample', 0, MAX_SAMPLE_INDEX);
  checkChunkCounts(f.channelCount, f.sampleCount, limits);
  if (f.samples.length !== f.channelCount * f.sampleCount) {
    fail('chunk.samples', `expected ${f.channelCount * f.sampleCount} values, got ${f.samples.length}`);
  }
  if (f.firstSample + f.sampleCount > MAX_SAMPLE_INDEX) fail('chunk.firstSample', 'sample index overflows');
}

/** CHUNK counts: 1..maxChannels channels, 1..maxSamplesPerChunk samples (checked before allocating). */
export function checkChunkCounts(channelCount: number, sampleCount: number, limits: FeedLimits): void {
  if (!Number.isInteger(channelCount) || channelCount < 1 || channelCount > limits.maxChannels) {
    throw new FeedProtocolError('limit-exceeded', 'chunk.channelCount', `expected 1..${limits.maxChannels}, got ${channelCount}`);
  }
  if (!Number.isInteger(sampleCount) || sampleCount < 1 || sampleCount > limits.maxSamplesPerChunk) {
    throw new FeedProtocolError('limit-exceeded', 'chunk.sampleCount', `expected 1..${limits.maxSamplesPerChunk}, got ${sampleCount}`);
  }
}

/** CUE rules: seq >= 1, integer sample index and cue id. */
export function checkCue(f: CueFrame): void {
  checkInt(f.seq, 'cue.seq', 1, MAX_SEQ);
  checkInt(f.sample, 'cue.sample', 0, MAX_SAMPLE_INDEX);
  checkInt(f.cueId, 'cue.cueId', 0, 0xffff_ffff);
}

/** GAP rules: seq >= 1, lastSeq >= seq, fromSample < toSample. */
export function checkGap(f: GapFrame): void {
  checkInt(f.seq, 'gap.seq', 1, MAX_SEQ);
  checkInt(f.lastSeq, 'gap.lastSeq', f.seq, MAX_SEQ);
  checkInt(f.fromSample, 'gap.fromSample', 0, MAX_SAMPLE_INDEX);
  checkInt(f.toSample, 'gap.toSample', f.fromSample + 1, MAX_SAMPLE_INDEX);
}

/** KEEPALIVE rule: a finite time. */
export function checkKeepalive(f: KeepaliveFrame): void {
  if (!Number.isFinite(f.sentAtMs)) fail('keepalive.sentAtMs', `expected a finite time, got ${f.sentAtMs}`);
}

/** ACK rules: seq >= 0 (0 = nothing stored), integer next sample. */
export function checkAck(f: AckFrame): void {
  checkInt(f.seq, 'ack.seq', 0, MAX_SEQ);
  checkInt(f.nextSample, 'ack.nextSample', 0, MAX_SAMPLE_INDEX);
}

/** REFUSE rule: a code in the WebSocket private range 4000-4999. */
export function checkRefuse(f: RefuseFrame): void {
  checkInt(f.code, 'refuse.code', 4000, 4999);
}
