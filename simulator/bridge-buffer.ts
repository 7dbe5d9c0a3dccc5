/**
 * The bridge's store of frames the server has not acknowledged yet. Each pushed item gets the
 * next sequence number. Two bounds, both in samples per channel:
 * - on the wire: chunks sent but not acknowledged are capped at `maxSamples` (the client stops
 *   sending until ACKs arrive), so a stalled server cannot make the bridge hold without limit;
 * - held back: chunks the server certainly does not have (never sent, or sent on a connection
 *   whose successor's HELLO reply showed they were not stored) are capped at `maxSamples` too.
 *   Past it, the oldest are given up and replaced, under their own sequence numbers, by an
 *   overflow GAP (consecutive ones merge into one GAP spanning their sequence range), so the
 *   stream stays gap-free in sequence numbers and every lost sample is announced exactly.
 * Cues and GAPs are never given up (they are a few bytes).
 */
import { encodeFrame, type FeedLimits, type GapFrame, type SequencedFrame } from '../shared/protocol';
import { itemFrame, type FeedItem } from './feed-items';

export interface BufferEntry {
  seq: number;
  /** > seq only for a GAP standing in for several given-up frames. */
  lastSeq: number;
  item: FeedItem;
  /** Encoded frame, made on first send. */
  bytes: Uint8Array | null;
  /** Sent on the current connection. */
  sent: boolean;
  /** Sent at some point and not yet shown to be missing at the server: never given up. */
  onWire: boolean;
}

const samplesOf = (e: BufferEntry) => (e.item.kind === 'chunk' ? e.item.sampleCount : 0);

export class UnackedBuffer {
  readonly entries: BufferEntry[] = [];
  private nextSeq = 1;
  private held = 0;
  private wire = 0;

  constructor(private readonly maxSamples: number, private readonly limits?: FeedLimits) {
    if (!(maxSamples >= 1)) throw new RangeError(`maxBufferedSamples must be >= 1, got ${maxSamples}`);
  }

  /** Samples in chunks the server certainly lacks. */
  get heldSamples(): number { return this.held; }
  /** Samples in chunks sent and not yet acknowledged. */
  get wireSamples(): number { return this.wire; }
  /** First sequence number not acknowledged: what a resuming HELLO names. */
  get resumeFromSeq(): number { return this.entries[0]?.seq ?? this.nextSeq; }
  /** Whether another chunk may go on the wire. */
  get canSendChunk(): boolean { return this.wire < this.maxSamples; }

  /** Appends an item; returns the sample ranges given up to stay within the bound. */
  push(item: FeedItem): Array<[number, number]> {
    const last = this.entries[this.entries.length - 1];
    if (item.kind === 'gap' && last && !last.onWire && last.item.kind === 'gap' && last.item.reason === item.reason &&
        last.item.toSample === item.fromSample) {
      // A gap continuing the previous unsent one (a dropout spanning chunks) extends it.
      last.item = { ...last.item, toSample: item.toSample };
      last.bytes = null;
      return [];
    }
    const seq = this.nextSeq++;
    this.entries.push({ seq, lastSeq: seq, item, bytes: null, sent: false, onWire: false });
    this.held += item.kind === 'chunk' ? item.sampleCount : 0;
    return this.enforceBound();
  }

  /** Records that `e` went out on the current connection. */
  markSent(e: BufferEntry): void {
    e.sent = true;
    if (!e.onWire) {
      e.onWire = true;
      this.held -= samplesOf(e);
      this.wire += samplesOf(e);
    }
  }

  /**
   * The server answered a (re)connection's HELLO and `ack` dropped what it stored: everything
   * left is certainly missing there, must be sent again, and counts against the held bound.
   */
  connectionReady(): Array<[number, number]> {
    for (const e of this.entries) {
      e.sent = false;
      if (e.onWire) {
        e.onWire = false;
        this.wire -= samplesOf(e);
        this.held += samplesOf(e);
      }
    }
    return this.enforceBound();
  }

  /** The connection dropped: nothing is sent on it any more. */
  connectionLost(): void {
    for (const e of this.entries) e.sent = false;
  }

  /** Drops everything up to and including `seq`; returns how many entries went. */
  ack(seq: number): number {
    let n = 0;
    while (this.entries.length > 0 && this.entries[0]!.lastSeq <= seq) {
      const e = this.entries.shift()!;
      if (e.onWire) this.wire -= samplesOf(e); else this.held -= samplesOf(e);
      n++;
    }
    return n;
  }

  private enforceBound(): Array<[number, number]> {
    const given: Array<[number, number]> = [];
    let scan = 0;
    while (this.held > this.maxSamples) {
      while (scan < this.entries.length && (this.entries[scan]!.item.kind !== 'chunk' || this.entries[scan]!.onWire)) scan++;
      const e = this.entries[scan];
      if (!e || e.item.kind !== 'chunk') break;
      const from = e.item.firstSample;
      const to = from + e.item.sampleCount;
      this.held -= e.item.sampleCount;
      given.push([from, to]);
      const prev = this.entries[scan - 1];
      if (prev && !prev.onWire && prev.item.kind === 'gap' && prev.item.reason === 'overflow' &&
          prev.lastSeq + 1 === e.seq && prev.item.toSample === from) {
        prev.item = { ...prev.item, toSample: to };
        prev.lastSeq = e.lastSeq;
        prev.bytes = null;
        this.entries.splice(scan, 1);
      } else {
        e.item = { kind: 'gap', fromSample: from, toSample: to, reason: 'overflow' };
        e.bytes = null;
        scan++;
      }
    }
    return given;
  }

  /** The frame of an entry (with its sequence range). */
  frame(e: BufferEntry): SequencedFrame {
    const f = itemFrame(e.item, e.seq);
    return f.type === 'gap' ? ({ ...f, lastSeq: e.lastSeq } satisfies GapFrame) : f;
  }

  /** The encoded frame of an entry, cached. */
  bytes(e: BufferEntry): Uint8Array {
    e.bytes ??= encodeFrame(this.frame(e), this.limits);
    return e.bytes;
  }
}
