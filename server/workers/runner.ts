/**
 * Runs one training task in its own worker thread, so a fit (seconds to minutes of CPU) never
 * blocks the event loop that serves HTTP and live sessions. A fresh thread per task: memory is
 * returned when it ends, and cancelling is `terminate()`.
 */
import { Worker } from 'node:worker_threads';
import type { RecordingFileFacts, TrainResult, TrainTask, WorkerMessage, WorkerRequest } from './protocol';

export interface RunHandlers {
  onProgress(fraction: number, stage: string): void;
  /** simulate-and-train only: the simulated recording's EDF+C bytes and facts (before training). */
  onRecording?(bytes: Uint8Array, name: string, facts: RecordingFileFacts): void;
}

export interface RunningTask {
  /** Resolves with the result; rejects with the worker's error, or a CancelledError after cancel(). */
  readonly result: Promise<TrainResult>;
  /** Stops the thread; the result promise rejects with CancelledError. */
  cancel(): Promise<void>;
}

export class CancelledError extends Error {
  constructor() { super('training cancelled'); this.name = 'CancelledError'; }
}

const WORKER_URL = new URL('./train-worker-boot.mjs', import.meta.url);

/** Starts `task` in a new worker thread. */
export function runInWorker(task: TrainTask, handlers: RunHandlers): RunningTask {
  const worker = new Worker(WORKER_URL);
  let cancelled = false;
  let settled = false;
  const result = new Promise<TrainResult>((resolve, reject) => {
    const settle = (fn: () => void) => { if (!settled) { settled = true; fn(); } };
    worker.on('message', (m: WorkerMessage) => {
      if (cancelled) return; // messages still queued when cancel() was called
      // A throwing handler (e.g. a database write) fails the task instead of crashing the thread's owner.
      try {
        if (m.type === 'progress') handlers.onProgress(m.fraction, m.stage);
        else if (m.type === 'recording') handlers.onRecording?.(m.bytes, m.name, m.facts);
        else if (m.type === 'result') settle(() => resolve(m.result));
        else settle(() => reject(new Error(m.message)));
      } catch (err) {
        settle(() => reject(err));
        void worker.terminate();
      }
    });
    worker.on('error', (err) => settle(() => reject(cancelled ? new CancelledError() : err)));
    worker.on('exit', (code) => settle(() => reject(cancelled ? new CancelledError()
      : new Error(`the training worker exited with code ${code} before finishing`))));
  });
  const request: WorkerRequest = { type: 'run', task };
  worker.postMessage(request);
  return {
    result,
    async cancel() {
      cancelled = true;
      await worker.terminate();
    },
  };
}
