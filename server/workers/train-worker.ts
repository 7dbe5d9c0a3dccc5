/**
 * The training worker thread: receives one task, runs it (server/workers/train-task.ts), posts
 * progress and the result or the error, then lets the thread end.
 */
import { parentPort } from 'node:worker_threads';
import type { WorkerMessage, WorkerRequest } from './protocol';
import { runTrainTask } from './train-task';

const port = parentPort;
if (!port) throw new Error('train-worker.ts runs only as a worker thread');

port.once('message', (req: WorkerRequest) => {
  const post = (m: WorkerMessage, transfer: ArrayBuffer[] = []) => port.postMessage(m, transfer);
  try {
    const result = runTrainTask(req.task, {
      progress: (fraction, stage) => post({ type: 'progress', fraction, stage }),
      recording: (bytes, name, facts) => post({ type: 'recording', bytes, name, facts }, [bytes.buffer as ArrayBuffer]),
    });
    post({ type: 'result', result });
  } catch (err) {
    post({ type: 'error', message: err instanceof Error ? err.message : String(err) });
  }
  port.close();
});
