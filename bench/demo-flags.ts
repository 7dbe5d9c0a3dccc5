/**
 * How many demo trials the live artifact limits flag: `npx tsx bench/demo-flags.ts [--trials 40]`.
 *
 * The demo participant (simulator/profiles/demo-hand-imagery.json, invented data) is simulated
 * twice, keeping still during trials (`stillDuringEpochs`, as shipped) and with the same artifact
 * rates placed regardless of the cues. Each run streams through the server's own SessionPipeline
 * (10-sample chunks) with a covariance decoder on the demo's 1-40 Hz + CAR + 50 Hz notch
 * pre-processing and its -0.5..4 s window, fitted on a separate simulated calibration run; the
 * artifact limits come from the session's first minute (server/live/artifact-limits.ts). Prints
 * one JSON line per run: trials, trials judged (limits existed), and those flagged.
 */
import { readFileSync } from 'node:fs';
import { serialiseArtifact } from '../shared/decoder/artifact';
import { fitDecoder } from '../shared/decoder/train';
import type { ChunkFrame } from '../shared/protocol';
import { liveDecoderFromArtifact } from '../server/live/decoder-loader';
import { SessionPipeline, type PipelineSink, type TrialDraft } from '../server/live/session-pipeline';
import { simulateRecording } from '../simulator/offline';
import { arg } from './live-setup';

const demo = JSON.parse(readFileSync(new URL('../simulator/profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as
  Record<string, unknown> & { artifacts: Record<string, unknown> };
const trialsPerClass = Number(arg('trials', '40'));
const classes: [string, string] = ['left-hand', 'right-hand'];

for (const still of [true, false]) {
  const profile = { ...demo, artifacts: { ...demo.artifacts, stillDuringEpochs: still } };
  const calibration = simulateRecording({ ...profile, trialsPerClass: 20 }, { seed: 3 }).recording;
  const artifact = fitDecoder(calibration, { recipe: 'covariance', classes, tminS: -0.5, tmaxS: 4, inner: 3, seed: 1,
    recipeOptions: { bandpassHz: [1, 40], notchHz: 50, car: true, lambda: { count: 4 } } });
  const live = liveDecoderFromArtifact(JSON.parse(serialiseArtifact(artifact)) as unknown);
  const { recording: rec, truth } = simulateRecording({ ...profile, trialsPerClass }, { seed: 11 });
  const trials: TrialDraft[] = [];
  const sink: PipelineSink = { trial: (t) => trials.push(t), wantsDisplay: () => false, display() {}, quality() {}, limits() {},
    rejudged() {}, skippedCue() {} };
  const C = rec.channelNames.length;
  const pipeline = new SessionPipeline(live, C, Int32Array.from(live.channelNames, (n) => rec.channelNames.indexOf(n)), 0, sink);
  const total = rec.data[0]!.length;
  let cue = 0;
  for (let s = 0; s < total; s += 10) {
    const n = Math.min(10, total - s);
    const samples = new Float32Array(n * C);
    for (let k = 0; k < n; k++) for (let c = 0; c < C; c++) samples[k * C + c] = rec.data[c]![s + k]!;
    pipeline.chunk({ firstSample: s, sampleCount: n, channelCount: C, samples } as unknown as ChunkFrame, 0n, 0n);
    for (; cue < truth.cues.length && truth.cues[cue]!.sample < s + n; cue++) {
      const q = truth.cues[cue]!;
      pipeline.cue(q.id, q.sample, q.class, false, 0n, 0n);
    }
  }
  const judged = trials.filter((t) => t.judged);
  process.stdout.write(`${JSON.stringify({ stillDuringEpochs: still, trials: trials.length, judged: judged.length,
    flaggedArtifact: judged.filter((t) => t.flags.includes('artifact')).length })}\n`);
}
