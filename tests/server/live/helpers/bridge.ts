/**
 * A minimal bridge for the live tests: a real WebSocket client of /ws/feed that sends encoded
 * frames and records every ACK and the close code, so a test can look at the database between
 * an ACK's arrival and the next frame.
 */
import WebSocket from 'ws';
import { decodeFrame, encodeFrame, type FeedFrame, type HelloFrame } from '../../../../shared/protocol';

export class TestBridge {
  readonly acks: number[] = [];
  readonly frames: FeedFrame[] = [];
  closed: { code: number; reason: string } | null = null;
  private waiters: Array<() => void> = [];
  /** Runs on every ACK before anything else sees it. */
  onAck: ((seq: number) => void) | null = null;

  private constructor(readonly ws: WebSocket) {
    ws.on('message', (data: Buffer) => {
      const f = decodeFrame(new Uint8Array(data));
      this.frames.push(f);
      if (f.type === 'ack') { this.onAck?.(f.seq); this.acks.push(f.seq); }
      this.wake();
    });
    ws.on('close', (code, reason) => { this.closed = { code, reason: reason.toString() }; this.wake(); });
  }

  static open(baseUrl: string, rigKey: string): Promise<TestBridge> {
    const ws = new WebSocket(`${baseUrl.replace(/^http/, 'ws')}/ws/feed`, { headers: { Authorization: `Rig ${rigKey}` } });
    const b = new TestBridge(ws);
    return new Promise((resolve, reject) => {
      ws.once('open', () => resolve(b));
      ws.once('error', reject);
    });
  }

  private wake(): void { for (const w of this.waiters.splice(0)) w(); }

  /** Resolves when `pred` holds (checked after every message and on close), or rejects after `ms`. */
  until(pred: () => boolean, ms = 10_000, what = 'condition'): Promise<void> {
    if (pred()) return Promise.resolve();
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`timed out waiting for ${what}`)), ms);
      const check = () => {
        if (pred()) { clearTimeout(timer); resolve(); } else this.waiters.push(check);
      };
      this.waiters.push(check);
    });
  }

  get lastAck(): number { return this.acks[this.acks.length - 1] ?? 0; }

  send(f: FeedFrame): void { this.ws.send(encodeFrame(f)); }

  async hello(h: HelloFrame): Promise<void> {
    const before = this.frames.length;
    this.send(h);
    await this.until(() => this.frames.length > before || this.closed !== null, 10_000, 'the answer to HELLO');
  }

  waitAck(seq: number, ms = 20_000): Promise<void> {
    return this.until(() => this.lastAck >= seq || this.closed !== null, ms, `ACK ${seq}`);
  }

  close(): Promise<void> {
    if (this.closed) return Promise.resolve();
    this.ws.close();
    return this.until(() => this.closed !== null, 5000, 'close');
  }
}
