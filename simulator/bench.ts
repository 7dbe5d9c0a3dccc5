// Generator and feed-codec speed (run: npx tsx simulator/bench.ts). Prints figures; no assertions.
// Wall and CPU time are both shown: on a shared machine CPU time is the steadier measure.
import { readFileSync } from 'node:fs';
import { MONTAGE_1010 } from '../shared/montage';
import { decodeFrame, encodeFrame } from '../shared/protocol';
import { createSimulation, generateChunk } from './generator';
import { interleave } from './feed-items';

const demo = JSON.parse(readFileSync(new URL('./profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as Record<string, unknown>;
const ch64 = MONTAGE_1010.slice(0, 64).map((p) => p.name);

function measure(label: string, profile: Record<string, unknown>, seconds: number, chunkMs: number, feeds = 1): void {
  const states = Array.from({ length: feeds }, (_, i) => createSimulation(profile, { seed: 1000 + i }));
  const fs = states[0]!.sampleRateHz;
  const nCh = states[0]!.channelNames.length;
  const chunk = Math.round((chunkMs * fs) / 1000);
  const chunks = Math.ceil((seconds * fs) / chunk);
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  for (let k = 0; k < chunks; k++) for (const st of states) generateChunk(st, chunk);
  const wall = (performance.now() - t0) / 1000;
  const cpuU = process.cpuUsage(c0);
  const cpu = (cpuU.user + cpuU.system) / 1e6;
  const samples = chunks * chunk * feeds;
  console.log(`${label}: ${feeds} feed(s) x ${nCh} ch @ ${fs} Hz, ${chunkMs} ms chunks: ` +
    `${(samples / wall).toFixed(0)} samples/s per channel (wall), ${((samples * nCh) / wall / 1e6).toFixed(2)} M channel-samples/s; ` +
    `${((seconds * feeds) / wall).toFixed(1)}x real time summed over feeds (wall), ${((seconds * feeds) / cpu).toFixed(1)}x (CPU)`);
}

function codec(): void {
  const st = createSimulation({ ...demo, sampleRateHz: 1000, channels: ch64 });
  const c = generateChunk(st, 40);
  const frame = { type: 'chunk' as const, seq: 1, firstSample: 0, channelCount: 64, sampleCount: 40, samples: interleave(c.data, 0, 40) };
  const n = 20000;
  const t0 = performance.now();
  let bytes = 0;
  for (let i = 0; i < n; i++) bytes += decodeFrame(encodeFrame({ ...frame, seq: i + 1 })).type.length;
  const s = (performance.now() - t0) / 1000;
  console.log(`codec: encode+decode of a 64 ch x 40 sample CHUNK: ${(n / s).toFixed(0)} frames/s (${bytes > 0 ? 'ok' : ''})`);
}

measure('demo profile', demo, 120, 40);
measure('64 channels at 1000 Hz', { ...demo, sampleRateHz: 1000, channels: ch64 }, 30, 40);
measure('16 feeds of 64 channels at 1000 Hz, one thread', { ...demo, sampleRateHz: 1000, channels: ch64 }, 5, 40, 16);
codec();
