// Entry of a training worker thread. Node 20 does not apply the parent's `--import tsx` to
// worker threads, so the thread registers tsx's ESM loader itself, then loads the TypeScript
// worker. Works the same under `tsx server/main.ts` and under vitest.
import { register } from 'tsx/esm/api';

register();
await import('./train-worker.ts');
