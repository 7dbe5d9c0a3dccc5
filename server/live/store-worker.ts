/**
 * Worker thread of the live store: its own SQLite connection (WAL, foreign keys, synchronous
 * FULL so a committed batch survives a crash) applying batches of StoreOps, one transaction each,
 * so the commit's fsync never blocks the main thread's event loop.
 */
import { parentPort, workerData } from 'node:worker_threads';
import Database from 'better-sqlite3';
import { LiveWriter, type StoreOp } from '../db/queries/feed';

export interface StoreWorkerData { dbFile: string }
export type ToWorker = { batch: number; ops: StoreOp[] } | { close: true };
export type FromWorker = { batch: number; ok: true; ms: number } | { batch: number; ok: false; error: string } | { ready: true } | { closed: true };

const port = parentPort!;
const { dbFile } = workerData as StoreWorkerData;
const sqlite = new Database(dbFile);
sqlite.pragma('journal_mode = WAL');
sqlite.pragma('synchronous = FULL');
sqlite.pragma('foreign_keys = ON');
sqlite.pragma('busy_timeout = 5000');
const writer = new LiveWriter(sqlite);
port.postMessage({ ready: true } satisfies FromWorker);

port.on('message', (m: ToWorker) => {
  if ('close' in m) {
    sqlite.close();
    port.postMessage({ closed: true } satisfies FromWorker);
    return;
  }
  const t = performance.now();
  try {
    writer.write(m.ops, Date.now());
    port.postMessage({ batch: m.batch, ok: true, ms: performance.now() - t } satisfies FromWorker);
  } catch (e) {
    port.postMessage({ batch: m.batch, ok: false, error: e instanceof Error ? e.message : String(e) } satisfies FromWorker);
  }
});
