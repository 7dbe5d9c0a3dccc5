/**
 * The receiving side of a feed as a pure state machine: the server's ingest and the tests' local
 * acceptor both drive it. One acceptor per bridge session (keyed by HELLO's rigId +
 * bridgeSessionId); it outlives connections so a bridge can resume.
 *
 * Rules it enforces: the first frame of every connection is HELLO; a resumed session repeats the
 * same stream description; sequence numbers advance by exactly one (a GAP may occupy a range);
 * CHUNK and GAP frames tile the sample axis without holes or overlap; a frame already stored
 * (seq <= last accepted) is a duplicate and is acknowledged again, never stored twice.
 *
 * Connections: when a session's bridge reconnects while its old connection still looks open,
 * close the old one and call `disconnect()` before passing the new HELLO; a closing old
 * connection must not call `disconnect()` once a newer one has taken over.
 *
 * Durability: `receive` only accepts. The caller stores what an event carries and then calls
 * `commit(event.seq)`, which returns the ACK to send (the bridge discards what is acknowledged,
 * so acknowledge only after commit). Commit each event before receiving the next frame.
 */
import { decodeFrame } from './decode';
import { encodeAck, encodeKeepalive, encodeRefuse } from './encode';
import {
  FEED_LIMITS, FeedProtocolError,
  type ChunkFrame, type CueFrame, type FeedLimits, type GapFrame, type HelloFrame,
} from './frames';

export type AcceptorEvent =
  /** A connection opened (or re-opened) the session. Send `reply` (an ACK of what is stored). */
  | { kind: 'hello'; header: HelloFrame; resumed: boolean; reply: Uint8Array }
  /** Store the samples, then commit(seq). */
  | { kind: 'chunk'; seq: number; frame: ChunkFrame }
  /** Store the cue, then commit(seq). */
  | { kind: 'cue'; seq: number; frame: CueFrame }
  /**
   * Record samples [fromSample, toSample) as missing (may be empty when the samples were already
   * stored before a resume), then commit(seq). `seq` is the frame's lastSeq.
   */
  | { kind: 'gap'; seq: number; fromSample: number; toSample: number; frame: GapFrame }
  /** Already stored: send `reply` (the ACK) again and store nothing. */
  | { kind: 'duplicate'; seq: number; reply: Uint8Array }
  /** Liveness; send `reply` (the echo). */
  | { kind: 'keepalive'; reply: Uint8Array }
  /** Send `reply` (a REFUSE frame), then close the socket with `code` and `reason`. */
  | { kind: 'refuse'; code: number; reason: string; error: FeedProtocolError; reply: Uint8Array };

/** What must survive a server restart to resume a session: JSON-safe. */
export interface AcceptorSnapshot {
  header: HelloFrame;
  durableSeq: number;
  durableNextSample: number;
}

function sameStream(a: HelloFrame, b: HelloFrame): string | null {
  if (a.rigId !== b.rigId) return 'rigId';
  if (a.bridgeSessionId !== b.bridgeSessionId) return 'bridgeSessionId';
  if (a.sampleRateHz !== b.sampleRateHz) return 'sampleRateHz';
  if (a.startTime !== b.startTime) return 'startTime';
  if (a.channelNames.length !== b.channelNames.length || a.channelNames.some((n, i) => n !== b.channelNames[i])) return 'channelNames';
  if (a.units.some((u, i) => u !== b.units[i])) return 'units';
  return null;
}

/** Receives one bridge session's frames; see the file comment for its rules. */
export class FeedAcceptor {
  private header: HelloFrame | null = null;
  private helloSeen = false;
  private acceptedSeq = 0;
  private nextSample = 0;
  private durableSeq = 0;
  private durableNextSample = 0;
  /** Accepted but not yet committed: [seq, nextSample after it]. */
  private pending: Array<[number, number]> = [];

  constructor(private readonly limits: FeedLimits = FEED_LIMITS) {}

  /** Re-creates an acceptor from a stored snapshot (e.g. after a server restart). */
  static fromSnapshot(s: AcceptorSnapshot, limits: FeedLimits = FEED_LIMITS): FeedAcceptor {
    const a = new FeedAcceptor(limits);
    a.header = s.header;
    a.acceptedSeq = a.durableSeq = s.durableSeq;
    a.nextSample = a.durableNextSample = s.durableNextSample;
    return a;
  }

  /** The stream description, once a HELLO has been accepted. */
  get stream(): HelloFrame | null { return this.header; }
  /** Last committed sequence number (0 = none). */
  get lastDurableSeq(): number { return this.durableSeq; }
  /** Next sample index after everything committed. */
  get durableSampleCount(): number { return this.durableNextSample; }

  snapshot(): AcceptorSnapshot | null {
    return this.header && { header: this.header, durableSeq: this.durableSeq, durableNextSample: this.durableNextSample };
  }

  /** The connection closed: accepted-but-uncommitted frames are forgotten; the next frame must be HELLO. */
  disconnect(): void {
    this.helloSeen = false;
    this.acceptedSeq = this.durableSeq;
    this.nextSample = this.durableNextSample;
    this.pending = [];
  }

  /** Marks everything up to `seq` durable and returns the ACK frame to send. */
  commit(seq: number): Uint8Array {
    if (seq > this.acceptedSeq) throw new RangeError(`commit(${seq}) beyond the last accepted seq ${this.acceptedSeq}`);
    while (this.pending.length > 0 && this.pending[0]![0] <= seq) {
      const [s, next] = this.pending.shift()!;
      this.durableSeq = s;
      this.durableNextSample = next;
    }
    return this.ack();
  }

  /** Handles one binary message. Never throws for bad input: a bad frame becomes a 'refuse' event. */
  receive(bytes: Uint8Array | ArrayBuffer): AcceptorEvent {
    try {
      return this.dispatch(bytes);
    } catch (e) {
      if (!(e instanceof FeedProtocolError)) throw e;
      return this.refuse(e);
    }
  }

  private ack(): Uint8Array {
    return encodeAck({ type: 'ack', seq: this.durableSeq, nextSample: this.durableNextSample }, this.limits);
  }

  private refuse(error: FeedProtocolError): AcceptorEvent {
    const code = error.closeCode;
    // A WebSocket close reason holds at most 123 bytes; keep it ASCII-safe and short.
    const reason = `${error.code} ${error.message}`.replace(/[^\x20-\x7e]/g, '?').slice(0, this.limits.maxReasonBytes);
    return { kind: 'refuse', code, reason, error, reply: encodeRefuse({ type: 'refuse', code, reason }, this.limits) };
  }

  private dispatch(bytes: Uint8Array | ArrayBuffer): AcceptorEvent {
    const f = decodeFrame(bytes, this.limits);
    if (!this.helloSeen && f.type !== 'hello') {
      throw new FeedProtocolError('unexpected-frame', f.type, 'the first frame of a connection must be HELLO');
    }
    switch (f.type) {
      case 'hello': return this.onHello(f);
      case 'chunk': return this.onChunk(f);
      case 'cue': return this.onCue(f);
      case 'gap': return this.onGap(f);
      case 'keepalive': return { kind: 'keepalive', reply: encodeKeepalive(f, this.limits) };
      default: throw new FeedProtocolError('unexpected-frame', f.type, 'a bridge does not send this frame');
    }
  }

  private onHello(f: HelloFrame): AcceptorEvent {
    if (this.helloSeen) throw new FeedProtocolError('unexpected-frame', 'hello', 'HELLO twice on one connection');
    const resumed = this.header !== null;
    if (this.header) {
      const field = sameStream(this.header, f);
      if (field) throw new FeedProtocolError('header-mismatch', `hello.${field}`, 'differs from the session being resumed');
    }
    if (f.resumeFromSeq > this.durableSeq + 1) {
      throw new FeedProtocolError('out-of-order', 'hello.resumeFromSeq',
        `resumes at ${f.resumeFromSeq} but only ${this.durableSeq} frame(s) are stored`);
    }
    this.header ??= f;
    this.helloSeen = true;
    this.acceptedSeq = this.durableSeq;
    this.nextSample = this.durableNextSample;
    this.pending = [];
    return { kind: 'hello', header: this.header, resumed, reply: this.ack() };
  }

  /** null = next in order; a duplicate event; or throws when a seq was skipped. */
  private checkSeq(seq: number, field: string): AcceptorEvent | null {
    if (seq <= this.acceptedSeq) return { kind: 'duplicate', seq, reply: this.ack() };
    if (seq !== this.acceptedSeq + 1) {
      throw new FeedProtocolError('out-of-order', field, `expected ${this.acceptedSeq + 1}, got ${seq}`);
    }
    return null;
  }

  private accept(seq: number): void {
    this.acceptedSeq = seq;
    this.pending.push([seq, this.nextSample]);
  }

  private onChunk(f: ChunkFrame): AcceptorEvent {
    const dup = this.checkSeq(f.seq, 'chunk.seq');
    if (dup) return dup;
    if (f.channelCount !== this.header!.channelNames.length) {
      throw new FeedProtocolError('header-mismatch', 'chunk.channelCount',
        `expected ${this.header!.channelNames.length}, got ${f.channelCount}`);
    }
    if (f.firstSample !== this.nextSample) {
      throw new FeedProtocolError('out-of-order', 'chunk.firstSample', `expected ${this.nextSample}, got ${f.firstSample}`);
    }
    this.nextSample += f.sampleCount;
    this.accept(f.seq);
    return { kind: 'chunk', seq: f.seq, frame: f };
  }

  private onCue(f: CueFrame): AcceptorEvent {
    const dup = this.checkSeq(f.seq, 'cue.seq');
    if (dup) return dup;
    this.accept(f.seq);
    return { kind: 'cue', seq: f.seq, frame: f };
  }

  private onGap(f: GapFrame): AcceptorEvent {
    if (f.lastSeq <= this.acceptedSeq) return { kind: 'duplicate', seq: f.lastSeq, reply: this.ack() };
    if (f.seq > this.acceptedSeq + 1) {
      throw new FeedProtocolError('out-of-order', 'gap.seq', `expected at most ${this.acceptedSeq + 1}, got ${f.seq}`);
    }
    // A GAP may stand in for frames of which we already stored the first few (their ACK was
    // lost before the bridge gave them up): only the samples we do not have are missing.
    if (f.fromSample > this.nextSample || (f.seq === this.acceptedSeq + 1 && f.fromSample !== this.nextSample)) {
      throw new FeedProtocolError('out-of-order', 'gap.fromSample', `expected ${this.nextSample}, got ${f.fromSample}`);
    }
    const fromSample = this.nextSample;
    const toSample = Math.max(this.nextSample, f.toSample);
    this.nextSample = toSample;
    this.accept(f.lastSeq);
    return { kind: 'gap', seq: f.lastSeq, fromSample, toSample, frame: f };
  }
}
