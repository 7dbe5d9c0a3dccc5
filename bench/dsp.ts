/**
 * DSP speed figures (not a test): `npx tsx bench/dsp.ts`.
 * Streaming band-pass (Butterworth 4th order, 8-30 Hz) + 50 Hz notch (Q 30) on 64 channels at
 * 1000 Hz in 50 ms chunks, with carried state, as the live path runs it; common average
 * reference throughput; resampling throughput. Prints readable lines, then one JSON line.
 */
import os from 'node:os';
import { butterSos } from '../shared/dsp/butter';
import { iirNotchSos } from '../shared/dsp/notch';
import { commonAverageReferenceInPlace } from '../shared/dsp/reference';
import { resample } from '../shared/dsp/resample';
import { createSosState, sosfiltChunk } from '../shared/dsp/sosfilt';
import type { ChannelMajor } from '../shared/types';

const CHANNELS = 64;
const RATE_HZ = 1000;
const CHUNK = 50; // 50 ms at 1000 Hz
const SECONDS = 120;

function noise(channels: number, n: number, seed = 1): ChannelMajor {
  let s = seed;
  const rand = () => ((s = (s * 1664525 + 1013904223) >>> 0) / 4294967296) - 0.5;
  return Array.from({ length: channels }, () => Float64Array.from({ length: n }, () => 40 * rand()));
}

/**
 * Best of `repeats` runs after a warm-up, in seconds: wall-clock time, and the CPU time this
 * (single-threaded) process used, which is the "one core" figure even when other processes
 * compete for the machine's cores.
 */
function time(fn: () => void, repeats = 3): { wallS: number; cpuS: number } {
  fn(); // warm-up (JIT)
  let wallS = Infinity, cpuS = Infinity;
  for (let r = 0; r < repeats; r++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    fn();
    wallS = Math.min(wallS, (performance.now() - t0) / 1000);
    const c = process.cpuUsage(c0);
    cpuS = Math.min(cpuS, (c.user + c.system) / 1e6);
  }
  return { wallS, cpuS };
}

const source = noise(CHANNELS, RATE_HZ * 10);
const chunks = SECONDS * RATE_HZ / CHUNK;
const views = Array.from({ length: (RATE_HZ * 10) / CHUNK },
  (_, k) => source.map((c) => c.subarray(k * CHUNK, (k + 1) * CHUNK)));
const sos = [...butterSos(4, [8, 30], 'bandpass', RATE_HZ), ...iirNotchSos(50, 30, RATE_HZ)];

const out = source.map(() => new Float64Array(CHUNK));
const filterS = time(() => {
  const state = createSosState(sos, CHANNELS);
  for (let k = 0; k < chunks; k++) sosfiltChunk(sos, views[k % views.length]!, state, out);
});
const filterAllocS = time(() => {
  const state = createSosState(sos, CHANNELS);
  for (let k = 0; k < chunks; k++) sosfiltChunk(sos, views[k % views.length]!, state);
});

const carBuf = source.map((c) => c.slice(0, CHUNK));
const scratch = new Float64Array(CHUNK);
const carS = time(() => {
  for (let k = 0; k < chunks; k++) {
    const v = views[k % views.length]!;
    for (let c = 0; c < CHANNELS; c++) carBuf[c]!.set(v[c]!);
    commonAverageReferenceInPlace(carBuf, undefined, scratch);
  }
});

const rs = noise(CHANNELS, 160 * 60, 2); // one minute at 160 Hz
const resampleS = time(() => { resample(rs, 160, 250); }, 1);

const samples = SECONDS * RATE_HZ * CHANNELS;
const figures = {
  bench: 'dsp',
  node: process.version,
  loadAverage1m: os.loadavg()[0] ?? 0,
  cores: os.cpus().length,
  streamingFilter: {
    design: 'butter 4th 8-30 Hz bandpass + iirnotch 50 Hz Q30 (5 sections)', channels: CHANNELS, sampleRateHz: RATE_HZ,
    chunkSamples: CHUNK, signalSeconds: SECONDS, wallS: filterS.wallS, cpuS: filterS.cpuS,
    timesRealTimeWall: SECONDS / filterS.wallS, timesRealTimeCpu: SECONDS / filterS.cpuS,
    timesRealTimeCpuAllocatingOutput: SECONDS / filterAllocS.cpuS, goalTimesRealTime: 200,
  },
  car: { channels: CHANNELS, chunkSamples: CHUNK, wallS: carS.wallS, cpuS: carS.cpuS,
    channelSamplesPerCpuS: samples / carS.cpuS, timesRealTimeCpu: SECONDS / carS.cpuS },
  resample: { channels: CHANNELS, fromHz: 160, toHz: 250, signalSeconds: 60, wallS: resampleS.wallS, cpuS: resampleS.cpuS,
    timesRealTimeCpu: 60 / resampleS.cpuS },
};

const f = figures.streamingFilter;
console.log(`machine: ${figures.cores} cores, load average ${figures.loadAverage1m.toFixed(1)} (wall-clock figures suffer when it exceeds the cores)`);
console.log(`streaming band-pass + notch, ${CHANNELS} ch @ ${RATE_HZ} Hz, ${CHUNK}-sample chunks, ${SECONDS} s of signal: ` +
  `${(f.cpuS * 1000).toFixed(1)} ms CPU = ${f.timesRealTimeCpu.toFixed(0)}x real time on one core ` +
  `(wall ${(f.wallS * 1000).toFixed(1)} ms = ${f.timesRealTimeWall.toFixed(0)}x; ` +
  `${f.timesRealTimeCpuAllocatingOutput.toFixed(0)}x when sosfiltChunk allocates its output; goal > 200x)`);
console.log(`common average reference, ${CHANNELS} ch, ${CHUNK}-sample chunks: ` +
  `${(figures.car.channelSamplesPerCpuS / 1e6).toFixed(0)} M channel-samples per CPU second = ` +
  `${figures.car.timesRealTimeCpu.toFixed(0)}x real time at ${RATE_HZ} Hz`);
console.log(`resample 160 -> 250 Hz, ${CHANNELS} ch x 60 s: ${(resampleS.cpuS * 1000).toFixed(0)} ms CPU = ` +
  `${figures.resample.timesRealTimeCpu.toFixed(0)}x real time`);
console.log(JSON.stringify(figures));
