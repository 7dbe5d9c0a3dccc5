/**
 * Time-frequency speed figures (not a test): `npx tsx bench/tf.ts`.
 * Complex Morlet CWT log power of one 64-channel, 4.5 s epoch at 160 Hz (720 samples) on 20
 * log-spaced frequencies 4-40 Hz, 7 cycles, unit-energy normalisation, as the decoder runs it:
 * one plan, many epochs. Issue 3's goal: under 5 ms per epoch on one core. Reports the median
 * over repeats of wall-clock time and of this process's CPU time (the "one core" figure when
 * other processes compete for the cores), for several output decimations and both paddings.
 * Prints readable lines, then one JSON line.
 */
import os from 'node:os';
import { cwtLogPower, cwtPower } from '../shared/tf/cwt';
import { logSpacedFrequencies } from '../shared/tf/frequencies';
import { createMorletPlan, type MorletPadding } from '../shared/tf/morlet-plan';
import { welchPsd } from '../shared/tf/welch';

const CHANNELS = 64;
const RATE_HZ = 160;
const SAMPLES = 720; // 4.5 s
const FREQUENCIES = logSpacedFrequencies(4, 40, 20);
const REPEATS = 41;

function noise(channels: number, n: number, seed = 1): Float64Array[] {
  let s = seed;
  const rand = () => ((s = (s * 1664525 + 1013904223) >>> 0) / 4294967296) - 0.5;
  return Array.from({ length: channels }, () => Float64Array.from({ length: n }, () => 40 * rand()));
}

/**
 * Median over REPEATS runs after a warm-up, in milliseconds: wall-clock and process CPU time; also
 * the fastest CPU time, the closest figure to an idle machine when other processes share the cores.
 */
function time(fn: () => void): { wallMs: number; cpuMs: number; bestCpuMs: number } {
  for (let w = 0; w < 5; w++) fn(); // warm-up (JIT)
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < REPEATS; r++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    fn();
    wall.push(performance.now() - t0);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1000);
  }
  const median = (v: number[]) => v.sort((a, b) => a - b)[Math.floor(v.length / 2)]!;
  return { wallMs: median(wall), cpuMs: median(cpu), bestCpuMs: Math.min(...cpu) };
}

const epoch = noise(CHANNELS, SAMPLES);

function caseFigures(decimation: number, padding: MorletPadding, output: 'logPower' | 'power') {
  const plan = createMorletPlan({ sampleRateHz: RATE_HZ, nSamples: SAMPLES, frequenciesHz: FREQUENCIES, cycles: 7,
    normalisation: 'unit-energy', padding, decimation });
  const out = new Float64Array(plan.nFrequencies * plan.nTimes);
  const run = output === 'logPower'
    ? () => { for (const x of epoch) cwtLogPower(plan, x, out); }
    : () => { for (const x of epoch) cwtPower(plan, x, out); };
  const t = time(run);
  return { decimation, outputRateHz: RATE_HZ / decimation, columns: plan.nTimes, padding, output,
    fftSize: plan.fftSize, inverseSize: plan.kernel.inverseSize, msPerEpochWall: t.wallMs, msPerEpochCpu: t.cpuMs,
    msPerEpochCpuBest: t.bestCpuMs };
}

const cases = [
  caseFigures(8, 'zero', 'logPower'),
  caseFigures(8, 'zero', 'power'),
  caseFigures(16, 'zero', 'logPower'),
  caseFigures(4, 'zero', 'logPower'),
  caseFigures(1, 'zero', 'logPower'),
  caseFigures(5, 'zero', 'logPower'),
  caseFigures(8, 'reflect', 'logPower'),
];
const long = noise(1, RATE_HZ * 120, 2)[0]!;
const welch = time(() => { welchPsd(long, RATE_HZ, { segmentLength: 320, overlap: 160 }); });

const figures = {
  bench: 'tf',
  node: process.version,
  loadAverage1m: os.loadavg()[0] ?? 0,
  cores: os.cpus().length,
  epoch: { channels: CHANNELS, sampleRateHz: RATE_HZ, samples: SAMPLES, frequencies: '20 log-spaced 4-40 Hz', cycles: 7,
    normalisation: 'unit-energy' },
  goalMsPerEpoch: 5,
  headline: cases[0],
  cases,
  welch: { samples: long.length, segmentLength: 320, overlap: 160, msWall: welch.wallMs, msCpu: welch.cpuMs },
};

console.log(`machine: ${figures.cores} cores, load average ${figures.loadAverage1m.toFixed(1)} ` +
  '(wall-clock figures suffer when it exceeds the cores)');
console.log(`CWT of one ${CHANNELS}-channel ${SAMPLES / RATE_HZ} s epoch at ${RATE_HZ} Hz, 20 frequencies 4-40 Hz, 7 cycles ` +
  `(median of ${REPEATS}; goal < 5 ms on one core):`);
for (const c of cases) {
  console.log(`  ${c.output.padEnd(8)} decimation ${String(c.decimation).padStart(2)} (${c.columns} columns, ${c.padding} padding, ` +
    `FFT ${c.fftSize} -> ${c.inverseSize}): ${c.msPerEpochCpu.toFixed(2)} ms CPU (best ${c.msPerEpochCpuBest.toFixed(2)}), ` +
    `${c.msPerEpochWall.toFixed(2)} ms wall`);
}
console.log(`Welch PSD, 120 s at ${RATE_HZ} Hz, 320-sample segments (Bluestein): ${welch.cpuMs.toFixed(2)} ms CPU`);
console.log(JSON.stringify(figures));
