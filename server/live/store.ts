/**
 * The live store: every write of the live path (raw chunks, cues, gaps, trials, events) goes
 * through one queue and is committed in batches, one transaction each (group commit: while a
 * batch commits, the next one gathers). Callers learn when their write committed, which is when
 * a feed acknowledges it to its bridge.
 *
 * With a database file the batches are written by a worker thread on its own connection, so
 * the fsync of a commit (milliseconds to tens of milliseconds) never stalls ingest or
 * prediction; with an in-memory database (tests) they are written on the main thread.
 */
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import type Database from 'better-sqlite3';
import { LiveWriter, type StoreOp } from '../db/queries/feed';
import type { FromWorker, StoreWorkerData, ToWorker } from './store-worker';

type Done = (err: Error | null) => void;

/** Largest batch, in operations and in sample bytes. */
const MAX_BATCH_OPS = 4000;
const MAX_BATCH_BYTES = 16 << 20;
/** Queued sample bytes above which feeds are asked to pause reading, and below which they resume. */
export const HIGH_WATER_BYTES = 64 << 20;
export const LOW_WATER_BYTES = 16 << 20;

export interface StoreStats {
  batches: number;
  ops: number;
  /** Wall time of the last commits, ms (most recent last, at most 256). */
  commitMs: number[];
}

export class LiveStore {
  private queue: StoreOp[] = [];
  private dones: (Done | null)[] = [];
  private queuedBytes = 0;
  private inFlight: { dones: (Done | null)[]; bytes: number; startedMs: number } | null = null;
  private scheduled = false;
  private nextBatch = 1;
  private paused = false;
  private closed = false;
  /** Set when the worker died: every write fails from then on. */
  private failed: Error | null = null;
  private idleWaiters: (() => void)[] = [];
  readonly stats: StoreStats = { batches: 0, ops: 0, commitMs: [] };
  /** Called with true when the queue passes HIGH_WATER_BYTES and false when it drains below LOW_WATER_BYTES. */
  onPressure: (high: boolean) => void = () => {};

  private workerReady: boolean;
  private readyWaiters: Array<[() => void, (e: Error) => void]> = [];

  private constructor(private readonly worker: Worker | null, private readonly writer: LiveWriter | null) {
    this.workerReady = worker === null;
    worker?.on('message', (m: FromWorker) => {
      if ('batch' in m) this.finish(m.ok ? null : new Error(`live store: ${m.error}`), m.ok ? m.ms : null);
      else if ('ready' in m) {
        this.workerReady = true;
        for (const [resolve] of this.readyWaiters.splice(0)) resolve();
        this.send();
      }
    });
    worker?.on('error', (e) => this.fail(e instanceof Error ? e : new Error(String(e))));
    worker?.on('exit', (code) => { if (!this.closed) this.fail(new Error(`live store worker exited with code ${code}`)); });
  }

  /**
   * A store writing through a worker thread on `dbFile`. Usable at once: writes queue until the
   * worker has opened the database.
   */
  static open(dbFile: string): LiveStore {
    // The worker runs TypeScript through tsx's loader (the server itself runs under tsx).
    const api = pathToFileURL(createRequire(import.meta.url).resolve('tsx/esm/api').replace(/\.cjs$/, '.mjs')).href;
    const entry = new URL('./store-worker.ts', import.meta.url).href;
    const code = `import(${JSON.stringify(api)}).then((m) => (m.tsImport ?? m.default.tsImport)(${JSON.stringify(entry)}, ${JSON.stringify(entry)}))`;
    const worker = new Worker(code, { eval: true, workerData: { dbFile } satisfies StoreWorkerData });
    // Never keeps the process alive by itself (a start() that failed after creating it must still exit).
    worker.unref();
    return new LiveStore(worker, null);
  }

  /** Resolves once the store can write (the worker opened the database), or rejects if it failed to. */
  ready(): Promise<void> {
    if (this.failed) return Promise.reject(this.failed);
    if (this.workerReady) return Promise.resolve();
    return new Promise((resolve, reject) => this.readyWaiters.push([resolve, reject]));
  }

  /** A store writing on the main thread through `sqlite` (for an in-memory database). */
  static inThread(sqlite: Database.Database): LiveStore {
    return new LiveStore(null, new LiveWriter(sqlite));
  }

  get threaded(): boolean { return this.worker !== null; }
  get pendingBytes(): number { return this.queuedBytes + (this.inFlight?.bytes ?? 0); }

  /** Queues one write; `done` runs once the batch holding it committed (or failed). */
  enqueue(op: StoreOp, done: Done | null = null): void {
    if (this.closed || this.failed) { done?.(this.failed ?? new Error('live store closed')); return; }
    this.queue.push(op);
    this.dones.push(done);
    if (op.op === 'chunk') {
      this.queuedBytes += op.samples.byteLength;
      if (!this.paused && this.pendingBytes > HIGH_WATER_BYTES) { this.paused = true; this.onPressure(true); }
    }
    this.schedule();
  }

  /** Queues writes and resolves when they committed. */
  write(ops: StoreOp[]): Promise<void> {
    if (ops.length === 0) return Promise.resolve();
    return new Promise((resolve, reject) => {
      ops.forEach((op, i) => this.enqueue(op, i === ops.length - 1 ? (e) => (e ? reject(e) : resolve()) : null));
    });
  }

  /** Resolves once everything queued so far has committed. */
  flush(): Promise<void> {
    if (!this.inFlight && this.queue.length === 0) return Promise.resolve();
    return new Promise((resolve) => this.idleWaiters.push(resolve));
  }

  async close(): Promise<void> {
    await this.flush();
    this.closed = true;
    if (this.worker && !this.failed) {
      const w = this.worker;
      await new Promise<void>((resolve) => {
        w.on('message', (m: FromWorker) => { if ('closed' in m) resolve(); });
        w.postMessage({ close: true } satisfies ToWorker);
      });
      await w.terminate();
    }
  }

  private fail(err: Error): void {
    this.failed ??= err;
    const dones = this.dones.splice(0);
    this.queue = [];
    this.queuedBytes = 0;
    this.finish(err, null);
    for (const d of dones) d?.(err);
    for (const w of this.idleWaiters.splice(0)) w();
    for (const [, reject] of this.readyWaiters.splice(0)) reject(err);
  }

  private schedule(): void {
    if (this.scheduled || this.inFlight) return;
    this.scheduled = true;
    setImmediate(() => { this.scheduled = false; this.send(); });
  }

  private send(): void {
    if (this.inFlight || this.queue.length === 0 || !this.workerReady || this.failed) return;
    let n = 0, bytes = 0;
    while (n < this.queue.length && n < MAX_BATCH_OPS && bytes < MAX_BATCH_BYTES) {
      const op = this.queue[n++]!;
      if (op.op === 'chunk') bytes += op.samples.byteLength;
    }
    const ops = this.queue.splice(0, n);
    const dones = this.dones.splice(0, n);
    this.queuedBytes -= bytes;
    this.inFlight = { dones, bytes, startedMs: performance.now() };
    this.stats.batches++;
    this.stats.ops += ops.length;
    if (this.worker) {
      const transfer = ops.flatMap((o) => (o.op === 'chunk' && o.samples.byteOffset === 0 &&
        o.samples.byteLength === o.samples.buffer.byteLength && o.samples.buffer instanceof ArrayBuffer ? [o.samples.buffer] : []));
      this.worker.postMessage({ batch: this.nextBatch++, ops } satisfies ToWorker, transfer);
      return;
    }
    let err: Error | null = null;
    try { this.writer!.write(ops, Date.now()); } catch (e) { err = e instanceof Error ? e : new Error(String(e)); }
    this.finish(err, null);
  }

  private finish(err: Error | null, workerMs: number | null): void {
    const batch = this.inFlight;
    if (!batch) return;
    this.inFlight = null;
    const ms = workerMs ?? performance.now() - batch.startedMs;
    this.stats.commitMs.push(ms);
    if (this.stats.commitMs.length > 256) this.stats.commitMs.shift();
    for (const d of batch.dones) d?.(err);
    if (this.paused && this.pendingBytes < LOW_WATER_BYTES) { this.paused = false; this.onPressure(false); }
    if (this.queue.length > 0) this.send();
    else for (const w of this.idleWaiters.splice(0)) w();
  }
}
