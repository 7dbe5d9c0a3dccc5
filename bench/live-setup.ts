/**
 * What the live benchmarks share (bench/live.ts, bench/console.ts): the simulated 64-channel
 * participant (the demo profile on a 64-channel cap, invented data), a frozen decoder fitted on
 * it by the decoder library, a study with K rigs and ready sessions in a real server, and the
 * bridges' child process (real WebSocket clients over loopback, so they do not share the
 * server's CPU).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { createInterface } from 'node:readline';
import { serialiseArtifact, type DecoderArtifact } from '../shared/decoder/artifact';
import * as train from '../shared/decoder/train';
import type { Recording } from '../shared/types';
import { FeedBridgeClient } from '../simulator/bridge-client';
import { runBridge } from '../simulator/bridge-run';
import { simulateRecording } from '../simulator/offline';
import { replaySource } from '../simulator/replay';
import type { ServerHandle } from '../server/index';

export const CHANNELS = ['FC5', 'FC3', 'FC1', 'FCz', 'FC2', 'FC4', 'FC6', 'C5', 'C3', 'C1', 'Cz', 'C2', 'C4', 'C6', 'CP5', 'CP3', 'CP1', 'CPz',
  'CP2', 'CP4', 'CP6', 'Fp1', 'Fpz', 'Fp2', 'AF7', 'AF3', 'AFz', 'AF4', 'AF8', 'F7', 'F5', 'F3', 'F1', 'Fz', 'F2', 'F4', 'F6', 'F8', 'FT7',
  'FT8', 'T7', 'T8', 'T9', 'T10', 'TP7', 'TP8', 'P7', 'P5', 'P3', 'P1', 'Pz', 'P2', 'P4', 'P6', 'P8', 'PO7', 'PO3', 'POz', 'PO4', 'PO8',
  'O1', 'Oz', 'O2', 'Iz'];
export const CLASSES: [string, string] = ['left-hand', 'right-hand'];
export type Recipe = 'covariance' | 'component-tf';

export const arg = (name: string, dflt: string): string => {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? process.argv[i + 1] ?? dflt : dflt;
};
export const pct = (xs: number[], p: number): number | null => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length ? s[Math.min(s.length - 1, Math.floor(p * s.length))]! : null;
};
export const cpuMs = (u: NodeJS.CpuUsage): number => (u.user + u.system) / 1000;

/** The demo participant on a 64-channel cap at `rateHz` (invented data). */
export function benchProfile(rateHz: number, trialsPerClass: number): Record<string, unknown> {
  const demo = JSON.parse(readFileSync(new URL('../simulator/profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as Record<string, unknown>;
  return { ...demo, sampleRateHz: rateHz, channels: CHANNELS, trialsPerClass };
}

/** A sealed decoder of `recipe` fitted on a simulated calibration run (the decoder library's own fit). */
export function trainBenchDecoder(recipe: Recipe, rateHz: number): DecoderArtifact {
  const { recording } = simulateRecording(benchProfile(rateHz, 12), { seed: 3 });
  const opts: train.TrainOptions = { recipe, classes: [CLASSES[0], CLASSES[1]], inner: 3, seed: 1,
    ...(recipe === 'covariance' ? { tminS: 0.5, tmaxS: 2.5 } : { components: 8 }),
    recipeOptions: { notchHz: 50, car: true, lambda: { count: 4 } } };
  type Fit = (rec: Recording, o: train.TrainOptions) => DecoderArtifact;
  const fit = (train as unknown as { fitDecoder?: Fit }).fitDecoder;
  return fit ? fit(recording, opts) : train.trainDecoder(recording, { ...opts, folds: 2, baselines: false }).artifact;
}

/** A study, one participant, the frozen decoder, `feeds` rigs and a ready session on each. */
export function setUpSessions(h: ServerHandle, artifact: DecoderArtifact, feeds: number, rateHz: number) {
  const admin = h.services.auth.sessionUser(1)!;
  const study = h.services.studies.create({ name: 'Live benchmark', ethicsReference: 'BENCH (invented data)', cueClasses: CLASSES,
    epochStartS: artifact.epoch.tminS, epochEndS: artifact.epoch.tmaxS, channelNames: CHANNELS, sampleRateHz: rateHz, powerLineHz: 50,
    recipe: artifact.recipe }, admin);
  const participant = h.services.participants.create(study.id, { code: 'B-001', consentStatus: 'given', consentDate: '2026-01-05' }, admin);
  // Imported and frozen through the decoder service, as an investigator would in the app.
  const imported = h.services.decoders.import(study.id, { name: `Bench ${artifact.recipe}`, artifact: JSON.parse(serialiseArtifact(artifact)) as never }, admin);
  const decoderId = h.services.decoders.freeze(imported.id, admin).id;
  const rigs = Array.from({ length: feeds }, (_, i) => h.services.rigs.create({ name: `Bench rig ${i + 1}`, location: '' }, admin));
  const sessions = rigs.map((r) => h.services.sessions.create({ studyId: study.id, participantId: participant.id, rigId: r.rig.id, decoderId }, admin));
  return { admin, decoderId, rigs, sessions };
}

/** Configuration of the bridges' child process. */
export interface BridgesConfig { url: string; keys: string[]; seconds: number; staggerMs: number; rateHz: number }
/** What the child reports when its bridges are done. */
export interface BridgesDone { stats: Array<{ unackedFrames: number; overflowSamples: number }>; cpuMs: number }

const CHILD_ENV = 'AFTERCUE_BENCH_CHILD';

/** In the child process (`--child`): K bridges replaying one simulated run, reports on stdout, one JSON per line. */
export async function runBridgesChild(): Promise<void> {
  const cfg = JSON.parse(process.env[CHILD_ENV]!) as BridgesConfig;
  const rate = cfg.rateHz;
  const { recording } = simulateRecording(benchProfile(rate, 20), { seed: 4, seconds: cfg.seconds + 5 });
  // The parent may be gone (it kills this process when it has what it measures): EPIPE is not an error here.
  process.stdout.on('error', () => process.exit(0));
  const say = (m: unknown) => process.stdout.write(`${JSON.stringify(m)}\n`);
  // Bridge i's sample 0 is due at startAt + i * staggerMs (its HELLO says so), once everything is connected.
  const startAt = Date.now() + 3000 + cfg.keys.length * 100;
  const clients = cfg.keys.map((key, i) => {
    const source = replaySource(recording, { classes: CLASSES });
    const client = new FeedBridgeClient({ serverUrl: cfg.url, rigKey: key, maxBufferedSamples: 120 * rate,
      onEvent: (e) => { if (e.kind === 'connected') say({ type: 'connected', i }); if (e.kind === 'refused') say({ type: 'refused', i, e }); },
      hello: { sampleRateHz: rate, rigId: `bench-${i}`, bridgeSessionId: `bench-${i}-${startAt}`,
        startTime: new Date(startAt + i * cfg.staggerMs).toISOString(), channelNames: source.channelNames, units: source.units } });
    client.start();
    return { client, source };
  });
  const cpu0 = process.cpuUsage();
  const stats = await Promise.all(clients.map(async ({ client, source }, i) => {
    await new Promise((r) => setTimeout(r, Math.max(0, startAt + i * cfg.staggerMs - Date.now())));
    return runBridge(source, client, { speed: 1, seconds: cfg.seconds, chunkMs: 40, finishTimeoutMs: 60_000 });
  }));
  say({ type: 'done', stats, cpuMs: cpuMs(process.cpuUsage(cpu0)) });
}

/**
 * Starts the bridges' child (this same script with `--child`), calls `onAllConnected` once every
 * bridge is connected, and resolves with the child's report when the bridges are done.
 */
export function spawnBridges(script: string, cfg: BridgesConfig, onAllConnected: () => void): { proc: ChildProcess; done: Promise<BridgesDone> } {
  const proc = spawn(process.execPath, [...process.execArgv, script, '--child'],
    { env: { ...process.env, [CHILD_ENV]: JSON.stringify(cfg) }, stdio: ['ignore', 'pipe', 'inherit'] });
  const lines = createInterface({ input: proc.stdout! });
  let connected = 0;
  let finished = false;
  const done = new Promise<BridgesDone>((resolve, reject) => {
    lines.on('line', (line) => {
      const m = JSON.parse(line) as { type: string };
      if (m.type === 'connected' && ++connected === cfg.keys.length) onAllConnected();
      if (m.type === 'refused') reject(new Error(line));
      if (m.type === 'done') { finished = true; resolve(m as unknown as BridgesDone); }
    });
    proc.on('exit', (code) => { if (!finished) reject(new Error(`bridge process exited with ${code}`)); });
  });
  return { proc, done };
}
