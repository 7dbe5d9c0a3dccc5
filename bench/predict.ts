/**
 * Prediction latency of a frozen decoder (STYLE.md §9: measured by a script, not a test).
 * Fits each recipe on S001 R04+R08+R12 (eegmmidb; Schalk et al. 2004, Goldberger et al. 2000,
 * ODC-By 1.0), loads the sealed artifact, then times on real epochs:
 *   raw      predictRawEpoch on the epoch's raw samples only (filters from a fresh steady state)
 *   raw+1s   the same with one second of raw run-in before the epoch
 *   filtered predictFilteredEpoch on an epoch the stream already filtered (the live path's cost
 *            after the last sample arrived; the stream filters each chunk as it comes)
 * Covariance decoders with both feature maps ('log' has no low-rank shortcut), then component-tf.
 * Run: npx tsx bench/predict.ts [--subject S001] [--reps 300]
 */
import { readFileSync } from 'node:fs';
import { channelsInOrder } from '../shared/decoder/online';
import { createDecoderStream, loadDecoder, predictFilteredEpoch, predictRawEpoch, type FilteredEpoch } from '../shared/decoder/predict';
import type { RecipeName } from '../shared/decoder/recipes';
import type { CovarianceMap } from '../shared/decoder/recipes/covariance-map';
import { fitDecoder } from '../shared/decoder/train';
import { edfToRecording, readEdf } from '../shared/formats/edf';

function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(name);
  return i >= 0 ? process.argv[i + 1]! : fallback;
}
const subject = arg('--subject', 'S001');
const reps = Number(arg('--reps', '300'));
const dir = new URL('../../shared/data/eegmmidb/', import.meta.url);
const runs = ['R04', 'R08', 'R12'].map((r) => edfToRecording(readEdf(new Uint8Array(readFileSync(new URL(`${subject}${r}.edf`, dir))))));

function stats(r: { ms: number[]; cpuMs: number }): string {
  const s = [...r.ms].sort((a, b) => a - b);
  const q = (p: number) => s[Math.min(s.length - 1, Math.floor(p * s.length))]!;
  return `wall median ${q(0.5).toFixed(3)} ms, p95 ${q(0.95).toFixed(3)} ms; CPU ${r.cpuMs.toFixed(3)} ms per call`;
}

/** Wall time per call and CPU time per call (process CPU over the batch / calls). */
function time(f: () => unknown): { ms: number[]; cpuMs: number } {
  for (let i = 0; i < 20; i++) f(); // warm-up (JIT)
  const ms: number[] = [];
  const c0 = process.cpuUsage();
  for (let i = 0; i < reps; i++) {
    const t = performance.now();
    f();
    ms.push(performance.now() - t);
  }
  const c = process.cpuUsage(c0);
  return { ms, cpuMs: (c.user + c.system) / 1000 / reps };
}

const variants: [RecipeName, CovarianceMap | null][] = [['covariance', 'log'], ['covariance', 'linear'], ['component-tf', null]];
for (const [recipe, map] of variants) {
  const artifact = fitDecoder(runs, { recipe, classes: ['T1', 'T2'], seed: 0, ...(map === null ? {} : { recipeOptions: { covarianceMap: map } }) });
  const decoder = loadDecoder(JSON.parse(JSON.stringify(artifact)) as unknown);
  const rec = runs[2]!;
  const fs = rec.sampleRateHz;
  const data = channelsInOrder(rec, decoder.preprocess.channelNames);
  const cue = Math.round(rec.annotations.find((a) => a.text === 'T2' && a.onsetS > 5)!.onsetS * fs);
  const start = cue + decoder.epochOffset;
  const rawOnly = { kind: 'raw-segment' as const, data: data.map((ch) => ch.slice(start, start + decoder.epochLength)), cueIndex: -decoder.epochOffset };
  const runIn = Math.round(fs);
  const rawRunIn = { kind: 'raw-segment' as const, data: data.map((ch) => ch.slice(start - runIn, start + decoder.epochLength)), cueIndex: runIn - decoder.epochOffset };
  const stream = createDecoderStream(decoder);
  stream.push(data.map((ch) => ch.subarray(0, start + decoder.epochLength)));
  const filtered: FilteredEpoch = stream.epochAt(cue)!;
  const selected = artifact.model.kind === 'component-tf' ? `${artifact.model.selected.length} of ${artifact.model.fittedComponents} components`
    : `rank-${artifact.model.rank} covariance, ${artifact.model.map ?? 'linear'} map`;
  console.log(`${recipe} (${selected}; ${decoder.preprocess.channelNames.length} channels, epoch ${decoder.epochLength} samples at ${fs} Hz):`);
  console.log(`  raw       ${stats(time(() => predictRawEpoch(decoder, rawOnly)))}`);
  console.log(`  raw+1s    ${stats(time(() => predictRawEpoch(decoder, rawRunIn)))}`);
  console.log(`  filtered  ${stats(time(() => predictFilteredEpoch(decoder, filtered)))}`);
}
const u = process.resourceUsage();
console.log(`CPU ${(u.userCPUTime / 1e6).toFixed(1)} s user; peak RSS ${(u.maxRSS / 1024).toFixed(0)} MB; load average ${(await import('node:os')).loadavg().map((v) => v.toFixed(1)).join(' ')}`);
