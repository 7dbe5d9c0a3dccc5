import { describe, expect, it } from 'vitest';
import { createSimulation, generateChunk, simulationTruth } from '../../simulator/generator';
import { simulateRecording } from '../../simulator/offline';
import { expectAllClose } from '../helpers/all-close';
import { busyProfile, demoProfile } from './fixtures';

function generateInChunks(sizes: number[], overrides = {}) {
  const st = createSimulation(busyProfile(overrides));
  const rows = st.channelNames.map(() => [] as number[]);
  for (const n of sizes) generateChunk(st, n).data.forEach((r, c) => rows[c]!.push(...r));
  return { st, rows };
}

describe('the generator', () => {
  it('gives the same numbers in any split of chunks, including empty and one-sample chunks', () => {
    const total = 250 * 40;
    const whole = generateInChunks([total]);
    let s = 0x2545f491;
    const sizes: number[] = [0, 1, 0, 1];
    let left = total - 2;
    while (left > 0) {
      s = (Math.imul(s, 1103515245) + 12345) >>> 0;
      const n = Math.min(left, [0, 1, 7, 40, 250, 1111][s % 6]!);
      sizes.push(n);
      left -= n;
    }
    const split = generateInChunks(sizes);
    // Invariant (STYLE.md §3): chunked equals whole, bit for bit, every channel.
    whole.rows.forEach((r, c) => expectAllClose(split.rows[c]!, r, { rtol: 0, atol: 0 }));
    expect(simulationTruth(split.st)).toEqual(simulationTruth(whole.st));
  });

  it('is determined by its seed', () => {
    const a = simulateRecording(busyProfile(), { seconds: 10 }).recording.data[4]!;
    const b = simulateRecording(busyProfile(), { seconds: 10 }).recording.data[4]!;
    const c = simulateRecording(busyProfile(), { seconds: 10, seed: 8 }).recording.data[4]!;
    // Invariant: same profile and seed -> same data; another seed -> other data.
    expectAllClose(b, a, { rtol: 0, atol: 0 });
    expect(c.some((v, i) => v !== a[i])).toBe(true);
  });

  it('turning one artifact kind off changes the data only where that kind was', () => {
    const on = simulateRecording(busyProfile(), { seconds: 60 });
    const base = busyProfile();
    const off = simulateRecording({ ...base, artifacts: { ...base.artifacts, blinksPerMin: 0 } }, { seconds: 60 });
    const blinks = on.truth.artifacts.filter((a) => a.kind === 'blink');
    expect(blinks.length).toBeGreaterThan(10);
    const inBlink = new Uint8Array(on.recording.data[0]!.length);
    for (const b of blinks) inBlink.fill(1, b.startSample, b.endSample);
    for (const d of on.truth.dropouts) inBlink.fill(0, d.startSample, d.endSample);
    const fp1 = on.recording.data[0]!;
    const fp1Off = off.recording.data[0]!;
    const outside = Array.from(fp1).filter((_, i) => !inBlink[i]);
    const outsideOff = Array.from(fp1Off).filter((_, i) => !inBlink[i]);
    // Invariant (independent random streams per kind): identical outside blinks ...
    expectAllClose(outside, outsideOff, { rtol: 0, atol: 0 });
    // ... and different inside them.
    expect(fp1.some((v, i) => inBlink[i] && v !== fp1Off[i])).toBe(true);
  });

  it('writes a ground truth consistent with the data: cues, flat channels, dropouts, effects', () => {
    const st = createSimulation(busyProfile());
    const chunk = generateChunk(st, st.runLengthSamples);
    const truth = simulationTruth(st);
    // Issue 5 part 2: one run holds trialsPerClass cues of every class.
    expect(truth.cues.length).toBe(2 * 5);
    expect(truth.cues.filter((c) => c.class === 'left-hand').length).toBe(5);
    // Profile cueIntervalS [5, 6]: every interval inside it; leadInS 2.
    expect(truth.cues[0]!.sample).toBe(500);
    truth.cues.slice(1).forEach((c, i) => {
      const gapS = (c.sample - truth.cues[i]!.sample) / 250;
      expect(gapS).toBeGreaterThanOrEqual(5 - 0.004);
      expect(gapS).toBeLessThanOrEqual(6 + 0.004);
    });
    // Last epoch ends 1 s before the run does (docs/simulation-profile.md).
    expect(st.runLengthSamples).toBe(Math.ceil((truth.cues[9]!.timeS + 4 + 1) * 250));
    // Flat channel T8 reads 0 throughout; every channel reads 0 inside dropouts.
    expect(truth.flatChannels).toEqual(['T8']);
    expect(chunk.data[8]!.every((v) => v === 0)).toBe(true);
    expect(truth.dropouts.length).toBeGreaterThan(0);
    for (const d of truth.dropouts) for (const row of chunk.data) expect(row.subarray(d.startSample, d.endSample).every((v) => v === 0)).toBe(true);
    expect(chunk.dropouts).toEqual(truth.dropouts.map((d) => [d.startSample, Math.min(d.endSample, st.runLengthSamples)]));
    // The C4 effect rides on the mu-right rhythm; the 30 Hz Cz effect has no rhythm and gets its own source.
    expect(truth.effects.map((e) => e.sourceId)).toEqual(['rhythm-mu-right', 'rhythm-mu-left', 'effect-3']);
    const own = truth.sources.find((s) => s.id === 'effect-3')!;
    expect(own.timeCourse).toEqual({ type: 'rhythm', frequencyHz: 30, bandwidthHz: 4, rmsUv: 5 });
    expect(own.pattern.length).toBe(12);
    // Pops never land on a flat channel; every artifact kind occurred.
    expect(truth.artifacts.filter((a) => a.kind === 'pop').every((a) => a.channel !== 'T8')).toBe(true);
    expect(new Set(truth.artifacts.map((a) => a.kind))).toEqual(new Set(['blink', 'saccade', 'muscle', 'pop']));
    // The truth is plain JSON.
    expect(JSON.parse(JSON.stringify(truth))).toEqual(truth);
  });

  it('cues the demo run 100 times per class', () => {
    // The cue schedule has its own stream, so one channel gives the demo's cues quickly.
    const demo = demoProfile();
    const st = createSimulation({ ...demo, channels: ['Cz'], artifacts: { ...demo.artifacts, flatChannels: [] } });
    generateChunk(st, st.runLengthSamples);
    const cues = simulationTruth(st).cues;
    // Issue 5 part 2 / simulator/profiles/demo-hand-imagery.json: trialsPerClass 100, two classes.
    expect(cues.length).toBe(200);
    expect(cues.filter((c) => c.class === 'left-hand').length).toBe(100);
    expect(cues.every((c) => c.block === 0)).toBe(true);
  });

  it('names channels in canonical 10-10 spelling whatever the profile wrote', () => {
    const st = createSimulation(busyProfile({ channels: ['fp1', 'C3..', 'T4', 'cz'], artifacts: { ...busyProfile().artifacts, flatChannels: [] } }));
    // shared/montage normaliseChannelName / positionOf (ACNS: T4 is now T8).
    expect(st.channelNames).toEqual(['Fp1', 'C3', 'T8', 'Cz']);
  });

  it('keeps cueing after the first run: the next block is balanced too', () => {
    const st = createSimulation(busyProfile());
    generateChunk(st, 2 * st.runLengthSamples);
    const cues = simulationTruth(st).cues.filter((c) => c.block === 1);
    // docs/simulation-profile.md: runs repeat with a fresh shuffle.
    expect(cues.length).toBeGreaterThanOrEqual(8);
    expect(simulationTruth(st).cues.filter((c) => c.block === 0).length).toBe(10);
  });
});
