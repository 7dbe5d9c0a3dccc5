import { afterEach, describe, expect, it } from 'vitest';
import { edfToRecording, readEdf } from '../../shared/formats/edf';
import type { Recording } from '../../shared/types';
import { FeedBridgeClient } from '../../simulator/bridge-client';
import { runBridge } from '../../simulator/bridge-run';
import { feedChannelNames, replayCues, replaySource } from '../../simulator/replay';
import { expectAllClose } from '../helpers/all-close';
import { readEegmmidb, skipWithoutRealData } from '../helpers/real-data';
import { startAcceptorServer, type AcceptorServer } from './acceptor-server';

let server: AcceptorServer | null = null;
afterEach(async () => { await server?.close(); server = null; });

describe('EDF replay source', () => {
  it('streams NaN runs (missing on every channel) as GAPs and annotations as cues', () => {
    const a = Float64Array.from({ length: 20 }, (_, i) => i);
    const b = Float64Array.from({ length: 20 }, (_, i) => -i);
    for (const i of [5, 6, 7, 19]) { a[i] = NaN; b[i] = NaN; }
    b[10] = NaN; // one channel only: data, not a gap
    const rec: Recording = { channelNames: ['C3..', 'Fc5.'], sampleRateHz: 10, data: [a, b], startTime: null,
      annotations: [{ onsetS: 0.4, durationS: 1, text: 'T1' }, { onsetS: 0.2, durationS: 1, text: 'T0' }, { onsetS: 5, durationS: null, text: 'T2' }] };
    const items = replaySource(rec, { classes: ['T1', 'T2'] }).read(100);
    // docs/feed-protocol.md GAP reason 1: samples the source never had.
    expect(items.filter((i) => i.kind === 'gap')).toEqual([
      { kind: 'gap', fromSample: 5, toSample: 8, reason: 'source' }, { kind: 'gap', fromSample: 19, toSample: 20, reason: 'source' }]);
    // Only listed classes become cues; an onset past the data is dropped.
    expect(items.filter((i) => i.kind === 'cue')).toEqual([{ kind: 'cue', sample: 4, cueId: 1, label: 'T1' }]);
    expect(feedChannelNames(rec.channelNames)).toEqual(['C3', 'FC5']);
    expect(replayCues(rec).map((c) => c.label)).toEqual(['T0', 'T1']);
  });

  it.skipIf(skipWithoutRealData)('replays eegmmidb S001R04 to an acceptor sample for sample, T1/T2 as cues', async () => {
    const rec = edfToRecording(readEdf(readEegmmidb('S001R04.edf')));
    server = await startAcceptorServer('k');
    const source = replaySource(rec, { classes: ['T1', 'T2'] });
    const client = new FeedBridgeClient({
      serverUrl: server.url, rigKey: 'k', backoff: { initialMs: 10, maxMs: 50 },
      hello: { rigId: 'replay', bridgeSessionId: 'r1', sampleRateHz: source.sampleRateHz, startTime: '2009-08-12T16:15:00.000Z',
        channelNames: source.channelNames, units: source.units },
    });
    await runBridge(source, client, { speed: 400, chunkMs: 100 });
    const s = [...server.sessions.values()][0]!;
    // Real data file S001R04.edf (README: 64 channels, 160 Hz, 125 one-second records).
    expect(s.acceptor.stream?.channelNames.length).toBe(64);
    expect(s.acceptor.stream?.channelNames[0]).toBe('FC5');
    expect(s.acceptor.durableSampleCount).toBe(125 * 160);
    // README: 15 task cues per run (7 or 8 per class); T0 rest markers are skipped.
    expect(s.cues.length).toBe(15);
    expect(new Set(s.cues.map((c) => c.label))).toEqual(new Set(['T1', 'T2']));
    const t1 = rec.annotations.filter((a) => a.text === 'T1' || a.text === 'T2');
    expect(s.cues.map((c) => c.sample)).toEqual(t1.map((a) => Math.round(a.onsetS * 160)));
    const nCh = 64;
    for (const c of s.chunks) {
      const want = Float32Array.from({ length: c.sampleCount * nCh }, (_, k) => rec.data[k % nCh]![c.firstSample + Math.floor(k / nCh)]!);
      // Reference: the file's own samples (read by shared/formats), as float32.
      expectAllClose(c.samples, want, { rtol: 0, atol: 0 });
    }
    expect(s.gaps).toEqual([]);
  });
});
