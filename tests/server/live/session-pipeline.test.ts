import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import type { ChunkFrame } from '../../../shared/protocol';
import type { LiveDecoder } from '../../../server/live/live-decoder';
import { channelMap, deinterleaveHold, fillHold } from '../../../server/live/samples';
import { SessionPipeline, type PipelineSink, type TrialDraft } from '../../../server/live/session-pipeline';
import { createSimulation } from '../../../simulator/generator';
import { simulateRecording } from '../../../simulator/offline';
import { simulatedSource } from '../../../simulator/simulated-source';
import type { FeedItem } from '../../../simulator/feed-items';
import { expectAllClose } from '../../helpers/all-close';
import { trainDecoder } from './helpers/decoder';

const PROFILE = JSON.parse(readFileSync(new URL('../../../simulator/profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as
  Record<string, unknown>;
const CLASSES: [string, string] = ['left-hand', 'right-hand'];

let decoder: LiveDecoder;
beforeAll(() => {
  // Covariance recipe (Tomioka & Müller 2010) through the decoder library's own fit and seal.
  const { recording } = simulateRecording({ ...PROFILE, trialsPerClass: 10 }, { seed: 11 });
  decoder = trainDecoder(recording, { classes: CLASSES, window: { tminS: 0.5, tmaxS: 2.5 }, car: true, notchHz: 50 });
}, 60_000);

/** Items of `seconds` of a simulated session (its own seed), as a bridge would send them. */
function sessionItems(seconds: number, seed: number, maxChunk: number, profile = PROFILE): { items: FeedItem[]; channels: string[] } {
  const state = createSimulation(profile, { seed });
  const total = Math.round(seconds * state.sampleRateHz);
  const source = simulatedSource(state, total);
  const items: FeedItem[] = [];
  let k = 0;
  while (source.nextSample < total) {
    // Irregular chunk sizes, 1..maxChunk samples, from a fixed sequence.
    const n = 1 + ((k++ * 7919) % maxChunk);
    items.push(...source.read(n));
  }
  return { items, channels: source.channelNames };
}

function collectingSink(): PipelineSink & { trials: TrialDraft[]; judgedLater: Map<number, string[]> } {
  const trials: TrialDraft[] = [];
  const judgedLater = new Map<number, string[]>();
  return {
    trials, judgedLater,
    trial: (d) => trials.push(d),
    wantsDisplay: () => false,
    display: () => {},
    quality: () => {},
    limits: () => {},
    rejudged: (id, ch) => { judgedLater.set(id, ch); },
    skippedCue: () => {},
  };
}

/** Runs items through a pipeline starting at `startSample`; returns the trials. */
function runOnline(items: FeedItem[], channels: string[], startSample: number, sink = collectingSink()) {
  const { map } = channelMap(channels, decoder.channelNames);
  const p = new SessionPipeline(decoder, channels.length, map, startSample, sink);
  const t = process.hrtime.bigint();
  let seq = 0;
  for (const it of items) {
    if (it.kind === 'chunk') {
      if (it.firstSample < startSample) continue;
      const f: ChunkFrame = { type: 'chunk', seq: ++seq, firstSample: it.firstSample, channelCount: it.channelCount,
        sampleCount: it.sampleCount, samples: it.samples };
      p.chunk(f, t, t);
    } else if (it.kind === 'gap') {
      if (it.fromSample >= startSample) p.gap(it.fromSample, it.toSample, t, t);
    } else {
      p.cue(it.cueId, it.sample, it.label, false, t, t);
    }
  }
  return { pipeline: p, sink };
}

/** The stored-samples path: the raw run rebuilt with the same hold rule, filtered at once. */
function offlineProbabilities(items: FeedItem[], channels: string[], startSample: number, cues: number[]) {
  const { map } = channelMap(channels, decoder.channelNames);
  let end = startSample;
  for (const it of items) {
    if (it.kind === 'chunk') end = Math.max(end, it.firstSample + it.sampleCount);
    if (it.kind === 'gap') end = Math.max(end, it.toSample);
  }
  const raw = decoder.channelNames.map(() => new Float64Array(end - startSample));
  const last = new Float64Array(raw.length);
  for (const it of items) {
    if (it.kind === 'chunk' && it.firstSample >= startSample) {
      deinterleaveHold(it.samples, it.channelCount, it.sampleCount, map, raw, it.firstSample - startSample, last);
    } else if (it.kind === 'gap' && it.fromSample >= startSample) {
      fillHold(raw, it.fromSample - startSample, it.toSample - it.fromSample, last);
    }
  }
  return decoder.predictOffline(raw, cues.map((c) => c - startSample));
}

describe('the session pipeline', () => {
  it('runs the component-tf recipe live through the same predict as offline', () => {
    const { recording } = simulateRecording({ ...PROFILE, trialsPerClass: 10 }, { seed: 15 });
    const tf = trainDecoder(recording, { classes: CLASSES, window: { tminS: -0.5, tmaxS: 4 }, recipe: 'component-tf', components: 6,
      bandpassHz: [1, 40], car: true, notchHz: 50 });
    const saved = decoder;
    decoder = tf;
    try {
      const { items, channels } = sessionItems(40, 41, 25);
      const { sink } = runOnline(items, channels, 0);
      // Demo profile: cues every 6.5-8 s after 3 s; a -0.5..4 s window gives 4 or more whole epochs in 40 s.
      expect(sink.trials.length).toBeGreaterThanOrEqual(4);
      const offline = offlineProbabilities(items, channels, 0, sink.trials.map((t) => t.cueSample));
      // Issue 6: both recipes run live through the same predict; online equals offline to 1e-9.
      sink.trials.forEach((t, i) => expectAllClose(t.probabilities, offline[i]!, { atol: 1e-9, rtol: 0 }));
    } finally {
      decoder = saved;
    }
  }, 60_000);

  it('gives every cue the same probabilities as offline predict on the whole run, for irregular chunks', () => {
    const { items, channels } = sessionItems(70, 23, 37);
    const { sink } = runOnline(items, channels, 0);
    const cueCount = items.filter((i) => i.kind === 'cue').length;
    // Demo profile: cues every 6.5-8 s after a 3 s lead-in, so 70 s hold 8 or more whole epochs.
    expect(sink.trials.length).toBeGreaterThanOrEqual(8);
    expect(sink.trials.length).toBeLessThanOrEqual(cueCount);
    const offline = offlineProbabilities(items, channels, 0, sink.trials.map((t) => t.cueSample));
    for (const [i, t] of sink.trials.entries()) {
      // Issue 6: online equals offline predict on the stored samples, probabilities to 1e-9.
      expectAllClose(t.probabilities, offline[i]!, { atol: 1e-9, rtol: 0 });
    }
  });

  it('starts mid-stream at the session start sample and still matches offline from that sample', () => {
    const { items, channels } = sessionItems(45, 29, 64);
    const start = items.find((i) => i.kind === 'chunk' && i.firstSample >= 2000)!;
    const s0 = (start as { firstSample: number }).firstSample;
    const { sink } = runOnline(items, channels, s0);
    expect(sink.trials.length).toBeGreaterThanOrEqual(3);
    expect(sink.trials.every((t) => t.cueSample + decoder.epoch.offset >= s0)).toBe(true);
    const offline = offlineProbabilities(items, channels, s0, sink.trials.map((t) => t.cueSample));
    // Issue 6: online equals offline, 1e-9.
    sink.trials.forEach((t, i) => expectAllClose(t.probabilities, offline[i]!, { atol: 1e-9, rtol: 0 }));
  });

  it('flags a trial whose epoch overlaps a gap, and one holding non-finite samples, and matches offline anyway', () => {
    const { items, channels } = sessionItems(40, 31, 50);
    const cues = items.filter((i): i is Extract<FeedItem, { kind: 'cue' }> => i.kind === 'cue');
    const gapCue = cues[1]!, nanCue = cues[3]!;
    const off = decoder.epoch.offset;
    // Turn the chunks covering 0.2 s inside the second cue's epoch into a GAP, and put a NaN in the fourth's.
    const gapFrom = gapCue.sample + off + 10;
    const edited: FeedItem[] = [];
    let gapOpen: { from: number; to: number } | null = null;
    for (const it of items) {
      if (it.kind === 'chunk' && it.firstSample + it.sampleCount > gapFrom && it.firstSample < gapFrom + 50) {
        gapOpen = gapOpen ? { from: gapOpen.from, to: it.firstSample + it.sampleCount } : { from: it.firstSample, to: it.firstSample + it.sampleCount };
        continue;
      }
      if (gapOpen) { edited.push({ kind: 'gap', fromSample: gapOpen.from, toSample: gapOpen.to, reason: 'source' }); gapOpen = null; }
      if (it.kind === 'chunk' && it.firstSample <= nanCue.sample + off + 100 && nanCue.sample + off + 100 < it.firstSample + it.sampleCount) {
        const s = it.samples.slice();
        s[(nanCue.sample + off + 100 - it.firstSample) * it.channelCount + 5] = NaN;
        edited.push({ ...it, samples: s });
        continue;
      }
      edited.push(it);
    }
    const { sink } = runOnline(edited, channels, 0);
    const byCue = new Map(sink.trials.map((t) => [t.cueId, t]));
    // Issue 6: trials overlapping a gap or a dropout are flagged.
    expect(byCue.get(gapCue.cueId)!.flags).toContain('gap');
    expect(byCue.get(nanCue.cueId)!.flags).toContain('dropout');
    expect(byCue.get(cues[0]!.cueId)!.flags).not.toContain('gap');
    const offline = offlineProbabilities(edited, channels, 0, sink.trials.map((t) => t.cueSample));
    // Issue 6: online equals offline on the stored samples (same hold rule), 1e-9.
    sink.trials.forEach((t, i) => expectAllClose(t.probabilities, offline[i]!, { atol: 1e-9, rtol: 0 }));
  });

  it('sets artifact limits from the session baseline and flags a trial with a large blink-like deflection', () => {
    const { items, channels } = sessionItems(90, 37, 40, { ...PROFILE, artifacts: { ...(PROFILE.artifacts as object),
      blinksPerMin: 0, saccadesPerMin: 0, muscleBurstsPerMin: 0, popsPerMin: 0, dropoutsPerMin: 0 } });
    const cues = items.filter((i): i is Extract<FeedItem, { kind: 'cue' }> => i.kind === 'cue');
    const target = cues[cues.length - 3]!;
    const at = target.sample + decoder.epoch.offset + 200;
    const fp1 = channels.indexOf('Fp1');
    const edited = items.map((it) => {
      if (it.kind !== 'chunk' || at + 60 <= it.firstSample || at >= it.firstSample + it.sampleCount) return it;
      const s = it.samples.slice();
      for (let i = 0; i < it.sampleCount; i++) {
        const k = it.firstSample + i - at;
        // A 300 µV half-sine of 240 ms at Fp1: a blink's size and length (REFERENCES §8).
        if (k >= 0 && k < 60) s[i * it.channelCount + fp1]! += 300 * Math.sin((Math.PI * k) / 60);
      }
      return { ...it, samples: s };
    });
    const { sink, pipeline } = runOnline(edited, channels, 0);
    expect(pipeline.artifactLimits).not.toBeNull();
    const t = sink.trials.find((x) => x.cueId === target.cueId)!;
    const judged = sink.trials.filter((x) => x.judged && x.cueId !== target.cueId);
    // Common practice: a 300 µV frontal deflection on a ~30 µV background is an artifact.
    expect(t.flags).toContain('artifact');
    expect(t.artifactChannels).toContain('Fp1');
    // Robust limits (median + 5 MAD) leave most clean simulated trials unflagged.
    expect(judged.filter((x) => x.flags.includes('artifact')).length).toBeLessThanOrEqual(Math.ceil(judged.length * 0.2));
  });
});
