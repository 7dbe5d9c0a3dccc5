import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, describe, expect, it, vi } from 'vitest';
import type { DecoderSummary } from '../../shared/api/decoders';
import type { RecordingSummary } from '../../shared/api/recordings';
import type { ServerHandle } from '../../server/index';
import { EMAILS, signIn, startTestServer } from './helpers/server';

// A small demo run so the test stays short; the shipped size is server/workers/demo.ts demoDecoderParams().
const SMALL_DEMO = { trialsPerClass: 12, folds: 2, inner: 2, components: 5 };
const dir = mkdtempSync(join(tmpdir(), 'aftercue-demo-test-'));
let h: ServerHandle | null = null;
afterAll(async () => { await h?.stop(); rmSync(dir, { recursive: true, force: true }); });

function jobRow(db: Database.Database): { status: string; stage: string; decoder_id: number | null; error: string | null } {
  return db.prepare('SELECT status, stage, decoder_id, error FROM training_jobs ORDER BY id LIMIT 1').get() as never;
}

async function waitFor<T>(what: string, fn: () => T | null | undefined, timeoutMs: number): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = fn();
    if (v) return v;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe('the demo decoder', () => {
  it('is queued on first start without blocking it, survives a stop, and appears frozen after the restart', async () => {
    h = await startTestServer({ dataDir: dir, demoDecoder: SMALL_DEMO });
    const first = h;
    // Start-up returns while the job is still queued or running (it never waits for training).
    expect(['queued', 'running']).toContain(jobRow(first.db.sqlite).status);
    await waitFor('the demo job to run', () => jobRow(first.db.sqlite).status === 'running', 30_000);
    await first.stop();
    h = null;
    const file = new Database(join(dir, 'aftercue.sqlite'), { readonly: true });
    // stop() cancels the worker and puts the job back in the queue.
    expect(jobRow(file)).toMatchObject({ status: 'queued', decoder_id: null });
    file.close();

    const log = vi.spyOn(console, 'log').mockImplementation(() => {});
    h = await startTestServer({ dataDir: dir, demoDecoder: SMALL_DEMO, quiet: false });
    const second = h;
    expect(second.seeded).toBeNull();
    const done = await waitFor('the demo job to finish', () => {
      const j = jobRow(second.db.sqlite);
      return j.status === 'done' || j.status === 'failed' ? j : null;
    }, 240_000);
    expect([done.status, done.error]).toEqual(['done', null]);
    const lines = log.mock.calls.map((c) => String(c[0]));
    log.mockRestore();
    expect(lines.some((l) => /^Demo decoder ready: .*frozen/.test(l))).toBe(true);

    const reviewer = await signIn(second, EMAILS.reviewer);
    const decoders = (await reviewer.get('/api/decoders?studyId=1').expect(200)).body as DecoderSummary[];
    // Issue 6 part 6: the demo study is seeded with a frozen demo decoder trained on a simulated calibration recording.
    expect(decoders).toHaveLength(1);
    expect(decoders[0]).toMatchObject({ status: 'frozen', source: 'demo', recipe: 'component-tf', classes: ['left-hand', 'right-hand'],
      sampleRateHz: 250, epochStartS: -0.5, epochEndS: 4, trials: 24 });
    expect(decoders[0]!.frozenAt).not.toBeNull();
    const recordings = (await reviewer.get('/api/studies/1/recordings').expect(200)).body as RecordingSummary[];
    // Exactly one simulated run, even though the job ran twice: 12 cues per class (SMALL_DEMO).
    expect(recordings.map((r) => [r.source, r.cueCounts])).toEqual([['simulated', { 'left-hand': 12, 'right-hand': 12 }]]);
  }, 300_000);
});
