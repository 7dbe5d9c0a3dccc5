/**
 * Drives a bridge: reads a source chunk by chunk, paced by the wall clock at `speed` x real
 * time (as an amplifier delivers samples whether or not the server is reachable), and hands
 * every item to the client; at the end waits until the server has acknowledged everything.
 */
import type { BridgeStats, FeedBridgeClient } from './bridge-client';
import type { FeedSource } from './feed-items';

export interface RunBridgeOptions {
  /** Multiple of real time; default 1. */
  speed?: number;
  /** Stop after this many seconds of data (default: the whole source; endless sources need it or a signal). */
  seconds?: number;
  /** Chunk length; default 40 ms. */
  chunkMs?: number;
  /** Stops streaming early (then finishes as usual). */
  signal?: AbortSignal;
  /** How long to wait for the last acknowledgements; default 30 s. */
  finishTimeoutMs?: number;
}

// Always a real timer, even when behind schedule: the socket's ACKs are read in between.
const sleep = (ms: number, signal?: AbortSignal) => new Promise<void>((resolve) => {
  if (signal?.aborted) { resolve(); return; }
  const onAbort = () => { clearTimeout(t); resolve(); };
  const t = setTimeout(() => { signal?.removeEventListener('abort', onAbort); resolve(); }, Math.max(0, ms));
  signal?.addEventListener('abort', onAbort, { once: true });
});

export async function runBridge(source: FeedSource, client: FeedBridgeClient, opts: RunBridgeOptions = {}): Promise<BridgeStats> {
  const speed = opts.speed ?? 1;
  if (!(speed > 0)) throw new RangeError(`speed must be positive, got ${speed}`);
  const fs = source.sampleRateHz;
  const chunk = Math.max(1, Math.round(((opts.chunkMs ?? 40) * fs) / 1000));
  const start = source.nextSample;
  let end = opts.seconds === undefined ? Infinity : start + Math.round(opts.seconds * fs);
  if (source.totalSamples !== null) end = Math.min(end, source.totalSamples);
  if (!Number.isFinite(end) && !opts.signal) throw new RangeError('an endless source needs seconds or a signal');
  client.start();
  const wallStart = Date.now();
  while (source.nextSample < end && !opts.signal?.aborted) {
    const items = source.read(Math.min(chunk, end - source.nextSample));
    if (items.length === 0) break;
    for (const item of items) client.push(item);
    const dueMs = wallStart + ((source.nextSample - start) * 1000) / (fs * speed);
    await sleep(dueMs - Date.now(), opts.signal);
  }
  return client.finish(opts.finishTimeoutMs);
}
