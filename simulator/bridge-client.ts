/**
 * Bridge client: streams a feed to `${server}/ws/feed` over one WebSocket (ws package),
 * authenticating with the rig key in the HTTP upgrade request (`Authorization: Rig <key>`;
 * never inside frames). Frames wait in a bounded buffer until the server acknowledges them;
 * after a lost connection the client reconnects with exponential backoff and resumes from the
 * first unacknowledged sequence number (HELLO.resumeFromSeq), so no sample is sent to storage
 * twice (the server drops duplicates by sequence number) and none is lost silently (what the
 * buffer had to give up is announced as a GAP). Protocol: docs/feed-protocol.md.
 */
import WebSocket from 'ws';
import {
  decodeFrame, encodeFrame, FEED_LIMITS, FeedProtocolError, isRetryableClose,
  type FeedLimits, type HelloFrame,
} from '../shared/protocol';
import { UnackedBuffer } from './bridge-buffer';
import type { FeedItem } from './feed-items';

export interface BridgeClientOptions {
  /** http(s):// or ws(s):// base URL of the server; '/ws/feed' is appended. */
  serverUrl: string;
  rigKey: string;
  /** The stream description (resumeFromSeq is filled in per connection). */
  hello: Omit<HelloFrame, 'type' | 'resumeFromSeq'>;
  /** Bound of the unacknowledged buffer, in samples per channel; default 60 s of data. */
  maxBufferedSamples?: number;
  /** Reconnect delays: initialMs * 2^attempt up to maxMs, ±20 % jitter. Default 250 ms .. 10 s. */
  backoff?: { initialMs: number; maxMs: number };
  /** Keep-alive interval; the link counts as dead after 3 intervals of silence. Default 5 s. */
  keepaliveMs?: number;
  onEvent?: (e: BridgeEvent) => void;
  limits?: FeedLimits;
}

export type BridgeEvent =
  | { kind: 'connecting'; url: string; attempt: number }
  /** The server answered HELLO: it holds everything up to serverSeq; the bridge resumes after it. */
  | { kind: 'connected'; resumeFromSeq: number; serverSeq: number; serverNextSample: number }
  | { kind: 'acked'; seq: number; nextSample: number }
  | { kind: 'overflow'; fromSample: number; toSample: number }
  | { kind: 'disconnected'; code: number; reason: string; retryInMs: number | null }
  | { kind: 'refused'; code: number; reason: string };

/** The server refused the feed for a reason retrying cannot fix (bad key, bad frame, conflict). */
export class BridgeRefusedError extends Error {
  constructor(readonly code: number, readonly reason: string) {
    super(`server refused the feed (${code}): ${reason}`);
    this.name = 'BridgeRefusedError';
  }
}

export interface BridgeStats {
  lastAckedSeq: number;
  unackedFrames: number;
  connections: number;
  /** Samples given up by buffer overflow (announced as GAPs). */
  overflowSamples: number;
}

/** `${base}/ws/feed` with http -> ws and https -> wss. */
export function feedUrl(serverUrl: string): string {
  const u = new URL(serverUrl);
  if (u.protocol === 'http:') u.protocol = 'ws:';
  else if (u.protocol === 'https:') u.protocol = 'wss:';
  else if (u.protocol !== 'ws:' && u.protocol !== 'wss:') throw new Error(`unsupported server URL scheme '${u.protocol}'`);
  u.pathname = `${u.pathname.replace(/\/+$/, '')}/ws/feed`;
  return u.toString();
}

const HIGH_WATER_BYTES = 1 << 20;

export class FeedBridgeClient {
  private readonly buffer: UnackedBuffer;
  private readonly url: string;
  private ws: WebSocket | null = null;
  private ready = false;
  private attempt = 0;
  private lastAcked = 0;
  private connections = 0;
  private overflowSamples = 0;
  private stopped = false;
  private fatal: BridgeRefusedError | null = null;
  private timers = new Set<ReturnType<typeof setTimeout>>();
  private keepalive: ReturnType<typeof setInterval> | null = null;
  private lastHeardMs = 0;
  private waiters: Array<() => void> = [];
  private helloResumeFromSeq = 1;

  constructor(private readonly opts: BridgeClientOptions) {
    this.url = feedUrl(opts.serverUrl);
    this.buffer = new UnackedBuffer(opts.maxBufferedSamples ?? Math.round(60 * opts.hello.sampleRateHz), opts.limits);
  }

  get stats(): BridgeStats {
    return { lastAckedSeq: this.lastAcked, unackedFrames: this.buffer.entries.length, connections: this.connections,
      overflowSamples: this.overflowSamples };
  }

  /** Opens the first connection. */
  start(): void {
    if (!this.ws && !this.stopped) this.connect();
  }

  /** Queues one item (numbered now) and sends it when the link allows. */
  push(item: FeedItem): void {
    if (this.fatal) throw this.fatal;
    this.reportGivenUp(this.buffer.push(item));
    this.pump();
  }

  private reportGivenUp(ranges: Array<[number, number]>): void {
    for (const [fromSample, toSample] of ranges) {
      this.overflowSamples += toSample - fromSample;
      this.emit({ kind: 'overflow', fromSample, toSample });
    }
  }

  /**
   * Resolves when everything pushed has been acknowledged (then closes normally), or after
   * `timeoutMs` with whatever is still unacknowledged counted in the stats. Rejects with
   * BridgeRefusedError if the server refused the feed.
   */
  async finish(timeoutMs = 30_000): Promise<BridgeStats> {
    const deadline = Date.now() + timeoutMs;
    while (this.buffer.entries.length > 0 && !this.fatal && Date.now() < deadline) {
      await new Promise<void>((resolve) => {
        const t = setTimeout(resolve, Math.min(200, Math.max(0, deadline - Date.now())));
        this.waiters.push(() => { clearTimeout(t); resolve(); });
      });
    }
    this.close();
    if (this.fatal) throw this.fatal;
    return this.stats;
  }

  /** Closes at once; unacknowledged frames are dropped. */
  close(): void {
    this.stopped = true;
    for (const t of this.timers) clearTimeout(t);
    this.timers.clear();
    this.stopKeepalive();
    if (this.ws) {
      if (this.ws.readyState === WebSocket.OPEN) this.ws.close(1000, 'bridge finished');
      else this.ws.terminate();
    }
    this.ws = null;
    this.wake();
  }

  private emit(e: BridgeEvent): void {
    this.opts.onEvent?.(e);
  }

  private wake(): void {
    const w = this.waiters;
    this.waiters = [];
    for (const f of w) f();
  }

  private later(ms: number, f: () => void): void {
    const t = setTimeout(() => { this.timers.delete(t); f(); }, ms);
    this.timers.add(t);
  }

  private connect(): void {
    this.emit({ kind: 'connecting', url: this.url, attempt: this.attempt });
    const ws = new WebSocket(this.url, { headers: { Authorization: `Rig ${this.opts.rigKey}` }, maxPayload: (this.opts.limits ?? FEED_LIMITS).maxFrameBytes });
    ws.binaryType = 'nodebuffer';
    this.ws = ws;
    this.ready = false;
    ws.on('open', () => {
      this.connections++;
      this.lastHeardMs = Date.now();
      this.helloResumeFromSeq = this.buffer.resumeFromSeq;
      const hello: HelloFrame = { type: 'hello', ...this.opts.hello, resumeFromSeq: this.helloResumeFromSeq };
      ws.send(encodeFrame(hello, this.opts.limits));
      this.startKeepalive(ws);
    });
    ws.on('message', (data, isBinary) => this.onMessage(ws, data, isBinary));
    ws.on('unexpected-response', (_req, res) => {
      const status = res.statusCode ?? 0;
      // 4xx other than timeout / rate limit: retrying will not help (bad key, wrong URL).
      if (status >= 400 && status < 500 && status !== 408 && status !== 429) this.refuse(4000 + status, `HTTP ${status} on upgrade`);
      ws.terminate();
    });
    ws.on('error', () => { /* 'close' follows and decides */ });
    ws.on('close', (code, reason) => this.onClose(ws, code, reason.toString()));
  }

  private onMessage(ws: WebSocket, data: WebSocket.RawData, isBinary: boolean): void {
    if (ws !== this.ws) return;
    this.lastHeardMs = Date.now();
    if (!isBinary) return;
    const bytes = Array.isArray(data) ? Buffer.concat(data) : data instanceof ArrayBuffer ? new Uint8Array(data) : data;
    let f;
    try {
      f = decodeFrame(bytes, this.opts.limits);
    } catch (e) {
      if (e instanceof FeedProtocolError) { ws.close(e.closeCode, e.message.slice(0, 120)); return; }
      throw e;
    }
    if (f.type === 'ack') {
      const first = !this.ready;
      this.ready = true;
      if (f.seq > this.lastAcked) this.lastAcked = f.seq;
      this.buffer.ack(f.seq);
      if (first) {
        this.attempt = 0;
        this.reportGivenUp(this.buffer.connectionReady());
        this.emit({ kind: 'connected', resumeFromSeq: this.helloResumeFromSeq, serverSeq: f.seq, serverNextSample: f.nextSample });
      } else {
        this.emit({ kind: 'acked', seq: f.seq, nextSample: f.nextSample });
      }
      this.wake();
      this.pump();
    } else if (f.type === 'refuse') {
      if (!isRetryableClose(f.code)) this.refuse(f.code, f.reason);
    }
  }

  private refuse(code: number, reason: string): void {
    if (this.fatal) return;
    this.fatal = new BridgeRefusedError(code, reason);
    this.emit({ kind: 'refused', code, reason });
    this.stopped = true;
    this.wake();
  }

  private onClose(ws: WebSocket, code: number, reason: string): void {
    if (ws !== this.ws) return;
    this.ws = null;
    this.ready = false;
    this.buffer.connectionLost();
    this.stopKeepalive();
    if (!this.stopped && !isRetryableClose(code)) this.refuse(code, reason);
    if (this.stopped) {
      this.emit({ kind: 'disconnected', code, reason, retryInMs: null });
      return;
    }
    const { initialMs, maxMs } = this.opts.backoff ?? { initialMs: 250, maxMs: 10_000 };
    const base = Math.min(maxMs, initialMs * 2 ** this.attempt);
    const delay = Math.round(base * (0.8 + 0.4 * Math.random()));
    this.attempt++;
    this.emit({ kind: 'disconnected', code, reason, retryInMs: delay });
    this.later(delay, () => { if (!this.stopped) this.connect(); });
  }

  private pump(): void {
    const ws = this.ws;
    if (!ws || !this.ready || ws.readyState !== WebSocket.OPEN) return;
    for (const e of this.buffer.entries) {
      if (e.sent) continue;
      // Wait for ACKs when a bound's worth is on the wire (pump runs again on every ACK).
      if (e.item.kind === 'chunk' && !this.buffer.canSendChunk) return;
      if (ws.bufferedAmount > HIGH_WATER_BYTES) {
        this.later(20, () => this.pump());
        return;
      }
      ws.send(this.buffer.bytes(e));
      this.buffer.markSent(e);
    }
  }

  private startKeepalive(ws: WebSocket): void {
    const every = this.opts.keepaliveMs ?? 5000;
    this.stopKeepalive();
    this.keepalive = setInterval(() => {
      if (ws !== this.ws || ws.readyState !== WebSocket.OPEN) return;
      // Three silent intervals: the link is dead even if TCP has not noticed.
      if (Date.now() - this.lastHeardMs > 3 * every) { ws.terminate(); return; }
      ws.send(encodeFrame({ type: 'keepalive', sentAtMs: Date.now() }, this.opts.limits));
    }, every);
  }

  private stopKeepalive(): void {
    if (this.keepalive) clearInterval(this.keepalive);
    this.keepalive = null;
  }
}
