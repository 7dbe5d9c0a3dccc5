/**
 * Feed ingest: bridges' frames in (WebSocket or the embedded bridge, through the same code),
 * the protocol's acceptor state machine (shared/protocol) deciding what is new, every sequenced
 * frame logged through the live store, and an ACK sent only once the store committed it (the
 * bridge discards what is acknowledged). Accepted frames are handed to the engine at once, so
 * prediction never waits for a commit.
 *
 * One acceptor per bridge session (rig + HELLO's bridgeSessionId), kept across connections and,
 * through the `feeds` row, across server restarts. A closing connection drains: its writes still
 * in the store are committed and acknowledged state advanced before a reconnect is served.
 */
import { decodeFrame, encodeRefuse, FeedAcceptor, FeedCloseCode, FeedProtocolError, type ChunkFrame, type CueFrame,
  type GapFrame, type HelloFrame } from '../../shared/protocol';
import type { Db } from '../db/client';
import { findFeed, insertFeed } from '../db/queries/feed';
import type { Logger } from '../log';
import type { LiveStore } from './store';

/** How a connection talks back to its bridge. */
export interface FeedTransport {
  send(bytes: Uint8Array): void;
  close(code: number, reason: string): void;
  /** Stop / restart reading from the bridge (store backpressure); optional. */
  pause?(): void;
  resume?(): void;
}

/** One bridge session's stream, as ingest keeps it. */
export interface FeedState {
  readonly rigId: number;
  readonly feedId: number;
  readonly header: HelloFrame;
  readonly acceptor: FeedAcceptor;
  readonly startTimeMs: number;
  /** The live connection, or null. */
  connection: FeedConnection | null;
  /** Feed index of the next sample (everything accepted so far). */
  nextSample: number;
  /** Last acknowledged sequence number. */
  ackedSeq: number;
  /** Wall-clock ms of the last chunk, and how far its last sample trailed the bridge's clock. */
  lastArrivalMs: number | null;
  lagMs: number | null;
  /** Writes queued in the store and not yet committed. */
  inflight: number;
  /** A commit arrived: an ACK is due at the end of the current tick. */
  ackDue: boolean;
}

/** What ingest tells the engine. */
export interface FeedHooks {
  /** A refusal reason for this header (e.g. it does not fit the session waiting on the rig), or null. */
  checkHeader(rigId: number, header: HelloFrame): string | null;
  connected(feed: FeedState, resumed: boolean): void;
  chunk(feed: FeedState, frame: ChunkFrame, arrivalNs: bigint, receivedNs: bigint): void;
  cue(feed: FeedState, frame: CueFrame, arrivalNs: bigint, receivedNs: bigint): void;
  gap(feed: FeedState, fromSample: number, toSample: number, frame: GapFrame, arrivalNs: bigint, receivedNs: bigint): void;
  disconnected(feed: FeedState): void;
}

/** Messages a reconnecting bridge may send while its previous connection drains. */
const MAX_HELD_MESSAGES = 10_000;

export class FeedConnection {
  feed: FeedState | null = null;
  private held: Array<[Uint8Array, bigint]> | null = null;
  closed = false;

  constructor(private readonly ingest: FeedIngest, readonly rigId: number, readonly transport: FeedTransport) {}

  /** One binary message from the bridge; `arrivalNs` = process.hrtime.bigint() when it arrived. */
  receive(bytes: Uint8Array, arrivalNs: bigint = process.hrtime.bigint()): void {
    if (this.closed) return;
    if (this.held) {
      if (this.held.length >= MAX_HELD_MESSAGES) this.refuse(FeedCloseCode.goingAway, 'busy resuming the stream; reconnect');
      else this.held.push([bytes, arrivalNs]);
      return;
    }
    if (!this.feed) { this.ingest.hello(this, bytes, arrivalNs); return; }
    this.ingest.frame(this, this.feed, bytes, arrivalNs);
  }

  /** The transport closed (either side). */
  onClose(): void {
    if (this.closed) return;
    this.closed = true;
    this.ingest.detach(this);
  }

  refuse(code: number, reason: string): void {
    if (this.closed) return;
    const safe = reason.replace(/[^\x20-\x7e]/g, '?').slice(0, 123);
    this.transport.send(encodeRefuse({ type: 'refuse', code, reason: safe }));
    this.transport.close(code, safe);
    this.onClose();
  }

  /** Holds messages until `release` (the previous connection of this stream is draining). */
  hold(first: [Uint8Array, bigint]): void { this.held = [first]; }

  release(): void {
    const held = this.held ?? [];
    this.held = null;
    for (const [b, t] of held) this.receive(b, t);
  }
}

export class FeedIngest {
  private readonly feeds = new Map<string, FeedState>();
  private readonly waiting = new Map<FeedState, FeedConnection[]>();
  private readonly connections = new Set<FeedConnection>();

  constructor(private readonly db: Db, private readonly store: LiveStore, private readonly hooks: FeedHooks,
              private readonly log: Logger, private readonly now: () => Date) {
    store.onPressure = (high) => {
      for (const c of this.connections) (high ? c.transport.pause : c.transport.resume)?.call(c.transport);
    };
  }

  /** A new connection of an authenticated rig. */
  connect(rigId: number, transport: FeedTransport): FeedConnection {
    const c = new FeedConnection(this, rigId, transport);
    this.connections.add(c);
    return c;
  }

  /** The rig's stream that has a live connection, if any. */
  connectedFeed(rigId: number): FeedState | null {
    for (const f of this.feeds.values()) if (f.rigId === rigId && f.connection) return f;
    return null;
  }

  /** Closes every connection (server stop) and waits for the store to commit what it holds. */
  async shutdown(): Promise<void> {
    for (const c of [...this.connections]) c.refuse(FeedCloseCode.goingAway, 'server stopping');
    await this.store.flush();
  }

  hello(conn: FeedConnection, bytes: Uint8Array, arrivalNs: bigint): void {
    let hello: HelloFrame;
    try {
      const f = decodeFrame(bytes);
      if (f.type !== 'hello') throw new FeedProtocolError('unexpected-frame', f.type, 'the first frame of a connection must be HELLO');
      hello = f;
    } catch (e) {
      if (!(e instanceof FeedProtocolError)) throw e;
      conn.refuse(e.closeCode, `${e.code} ${e.message}`);
      return;
    }
    const other = this.connectedFeed(conn.rigId);
    if (other && other.header.bridgeSessionId !== hello.bridgeSessionId) {
      conn.refuse(FeedCloseCode.conflict, 'another bridge is streaming for this rig');
      return;
    }
    const reason = this.hooks.checkHeader(conn.rigId, hello);
    if (reason) { conn.refuse(FeedCloseCode.conflict, reason); return; }
    const feed = this.feedFor(conn.rigId, hello);
    if (feed.connection && feed.connection !== conn) feed.connection.refuse(FeedCloseCode.conflict, 'replaced by a newer connection');
    if (feed.inflight > 0) {
      // The previous connection's writes are still committing: serve this one once they are.
      conn.hold([bytes, arrivalNs]);
      this.waiting.set(feed, [...(this.waiting.get(feed) ?? []), conn]);
      return;
    }
    const ev = feed.acceptor.receive(bytes);
    if (ev.kind === 'refuse') { conn.refuse(ev.code, ev.reason); return; }
    if (ev.kind !== 'hello') { conn.refuse(FeedCloseCode.badFrame, 'expected HELLO'); return; }
    conn.feed = feed;
    feed.connection = conn;
    conn.transport.send(ev.reply);
    this.hooks.connected(feed, ev.resumed);
  }

  private feedFor(rigId: number, hello: HelloFrame): FeedState {
    const key = `${rigId}\u0000${hello.bridgeSessionId}`;
    let feed = this.feeds.get(key);
    if (feed) return feed;
    const row = findFeed(this.db, rigId, hello.bridgeSessionId);
    let acceptor: FeedAcceptor;
    let feedId: number;
    let header = hello;
    if (row) {
      header = { ...hello, resumeFromSeq: 1, channelNames: row.channelNames, units: row.units, sampleRateHz: row.sampleRateHz,
        startTime: row.startTime };
      acceptor = FeedAcceptor.fromSnapshot({ header, durableSeq: row.durableSeq, durableNextSample: row.nextSample });
      feedId = row.id;
    } else {
      acceptor = new FeedAcceptor();
      feedId = insertFeed(this.db, { rigId, bridgeSessionId: hello.bridgeSessionId, channelNames: hello.channelNames,
        units: hello.units, sampleRateHz: hello.sampleRateHz, startTime: hello.startTime }, this.now()).id;
    }
    feed = {
      rigId, feedId, header, acceptor, startTimeMs: Date.parse(header.startTime), connection: null,
      nextSample: acceptor.durableSampleCount, ackedSeq: acceptor.lastDurableSeq, lastArrivalMs: null, lagMs: null,
      inflight: 0, ackDue: false,
    };
    this.feeds.set(key, feed);
    return feed;
  }

  frame(conn: FeedConnection, feed: FeedState, bytes: Uint8Array, arrivalNs: bigint): void {
    const ev = feed.acceptor.receive(bytes);
    const receivedNs = process.hrtime.bigint();
    switch (ev.kind) {
      case 'chunk': {
        const f = ev.frame;
        feed.nextSample = f.firstSample + f.sampleCount;
        const nowMs = Date.now();
        feed.lastArrivalMs = nowMs;
        feed.lagMs = nowMs - (feed.startTimeMs + (feed.nextSample * 1000) / feed.header.sampleRateHz);
        this.hooks.chunk(feed, f, arrivalNs, receivedNs);
        const samples = new Uint8Array(f.samples.buffer, f.samples.byteOffset, f.samples.byteLength);
        this.write(feed, ev.seq, { op: 'chunk', feedId: feed.feedId, seq: ev.seq, firstSample: f.firstSample,
          sampleCount: f.sampleCount, channelCount: f.channelCount, samples });
        return;
      }
      case 'cue':
        this.hooks.cue(feed, ev.frame, arrivalNs, receivedNs);
        this.write(feed, ev.seq, { op: 'cue', feedId: feed.feedId, seq: ev.seq, sample: ev.frame.sample, cueId: ev.frame.cueId,
          label: ev.frame.label, nextSample: feed.nextSample });
        return;
      case 'gap':
        feed.nextSample = ev.toSample;
        this.hooks.gap(feed, ev.fromSample, ev.toSample, ev.frame, arrivalNs, receivedNs);
        this.write(feed, ev.seq, { op: 'gap', feedId: feed.feedId, seq: ev.seq, fromSample: ev.fromSample, toSample: ev.toSample,
          reason: ev.frame.reason });
        return;
      case 'duplicate':
      case 'keepalive':
        conn.transport.send(ev.reply);
        return;
      case 'refuse':
        conn.refuse(ev.code, ev.reason);
        return;
      case 'hello':
        conn.refuse(FeedCloseCode.badFrame, 'HELLO twice on one connection');
        return;
    }
  }

  private write(feed: FeedState, seq: number, op: Parameters<LiveStore['enqueue']>[0]): void {
    feed.inflight++;
    this.store.enqueue(op, (err) => this.committed(feed, seq, err));
  }

  private committed(feed: FeedState, seq: number, err: Error | null): void {
    feed.inflight--;
    if (err) {
      this.log.error(`feed ${feed.feedId}: storing seq ${seq} failed`, err);
      feed.connection?.refuse(FeedCloseCode.serverError, 'storage failed; reconnect to resume');
    } else if (seq > feed.ackedSeq) {
      feed.ackedSeq = seq;
      if (!feed.ackDue) {
        feed.ackDue = true;
        // One ACK per feed per commit batch, naming the newest committed seq.
        queueMicrotask(() => this.sendAck(feed));
      }
    }
    if (feed.inflight === 0 && !feed.connection) this.drained(feed);
  }

  private sendAck(feed: FeedState): void {
    feed.ackDue = false;
    if (feed.acceptor.lastDurableSeq >= feed.ackedSeq) return;
    let ack: Uint8Array;
    try {
      ack = feed.acceptor.commit(feed.ackedSeq);
    } catch (e) {
      this.log.error(`feed ${feed.feedId}: commit out of step`, e);
      return;
    }
    feed.connection?.transport.send(ack);
  }

  detach(conn: FeedConnection): void {
    this.connections.delete(conn);
    const feed = conn.feed;
    if (!feed || feed.connection !== conn) return;
    feed.connection = null;
    feed.lagMs = null;
    this.hooks.disconnected(feed);
    if (feed.inflight === 0) this.drained(feed);
  }

  /** Everything of the closed connection committed: the acceptor forgets the rest; waiting reconnects go on. */
  private drained(feed: FeedState): void {
    if (feed.ackDue) this.sendAck(feed);
    feed.acceptor.disconnect();
    feed.nextSample = feed.acceptor.durableSampleCount;
    const waiting = this.waiting.get(feed) ?? [];
    this.waiting.delete(feed);
    for (const c of waiting) {
      if (c.closed) continue;
      c.release();
    }
  }
}
