/**
 * Live benchmark: `npm run bench:live -- [--json] [--feeds 16] [--seconds 40] [--recipe covariance|component-tf]`.
 *
 * Starts a real server (start({ port: 0, dataDir: tmp })) and, in a child process so they do not
 * share the server's CPU, K bridges (simulator/bridge-client.ts, real WebSocket clients over
 * loopback) each streaming simulated 64-channel 1000 Hz EEG (one pre-generated run, invented
 * data, replayed with staggered starts so the rigs' cues do not coincide) at real time into its
 * own rig and running session with one frozen decoder. Prints one JSON object: feeds, channels,
 * sampleRateHz, prediction latency after the epoch's last sample (p50/p99, the engine's totalMs),
 * lag of the newest sample behind the bridge's clock (max, and its change from the first to the
 * last 10 s), feedsSustained, the largest online-offline probability difference over every
 * trial (offline predict on the samples read back from SQLite), CPU time, and the machine load.
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { createInterface } from 'node:readline';
import { monitorEventLoopDelay, PerformanceObserver } from 'node:perf_hooks';
import { readFileSync } from 'node:fs';
import { serialiseArtifact, type DecoderArtifact } from '../shared/decoder/artifact';
import * as train from '../shared/decoder/train';
import type { Recording } from '../shared/types';
import { FeedBridgeClient } from '../simulator/bridge-client';
import { runBridge } from '../simulator/bridge-run';
import { simulateRecording } from '../simulator/offline';
import { replaySource } from '../simulator/replay';
import { start } from '../server/index';
import { offlineTrials } from '../server/live/offline';

const arg = (name: string, dflt: string) => { const i = process.argv.indexOf(`--${name}`); return i > 0 ? process.argv[i + 1] ?? dflt : dflt; };
const CHANNELS = ['FC5', 'FC3', 'FC1', 'FCz', 'FC2', 'FC4', 'FC6', 'C5', 'C3', 'C1', 'Cz', 'C2', 'C4', 'C6', 'CP5', 'CP3', 'CP1', 'CPz',
  'CP2', 'CP4', 'CP6', 'Fp1', 'Fpz', 'Fp2', 'AF7', 'AF3', 'AFz', 'AF4', 'AF8', 'F7', 'F5', 'F3', 'F1', 'Fz', 'F2', 'F4', 'F6', 'F8', 'FT7',
  'FT8', 'T7', 'T8', 'T9', 'T10', 'TP7', 'TP8', 'P7', 'P5', 'P3', 'P1', 'Pz', 'P2', 'P4', 'P6', 'P8', 'PO7', 'PO3', 'POz', 'PO4', 'PO8',
  'O1', 'Oz', 'O2', 'Iz'];
const RATE = 1000;
const CLASSES: [string, string] = ['left-hand', 'right-hand'];

/** The demo participant on a 64-channel 1000 Hz cap (invented data). */
function profile(trialsPerClass: number): Record<string, unknown> {
  const demo = JSON.parse(readFileSync(new URL('../simulator/profiles/demo-hand-imagery.json', import.meta.url), 'utf8')) as Record<string, unknown>;
  return { ...demo, sampleRateHz: RATE, channels: CHANNELS, trialsPerClass };
}

const pct = (xs: number[], p: number) => { const s = [...xs].sort((a, b) => a - b); return s.length ? s[Math.min(s.length - 1, Math.floor(p * s.length))]! : null; };
const cpuMs = (u: NodeJS.CpuUsage) => (u.user + u.system) / 1000;

interface ChildConfig { url: string; keys: string[]; seconds: number; staggerMs: number }

/** Child process: K bridges replaying one simulated run. Reports on stdout, one JSON per line. */
async function child(): Promise<void> {
  const cfg = JSON.parse(process.env.AFTERCUE_BENCH_CHILD!) as ChildConfig;
  const { recording } = simulateRecording(profile(20), { seed: 4, seconds: cfg.seconds + 5 });
  const say = (m: unknown) => process.stdout.write(`${JSON.stringify(m)}\n`);
  // Bridge i's sample 0 is due at startAt + i * staggerMs (its HELLO says so), once everything is connected.
  const startAt = Date.now() + 3000 + cfg.keys.length * 100;
  const clients = cfg.keys.map((key, i) => {
    const source = replaySource(recording, { classes: CLASSES });
    const client = new FeedBridgeClient({ serverUrl: cfg.url, rigKey: key, maxBufferedSamples: 120 * RATE,
      onEvent: (e) => { if (e.kind === 'connected') say({ type: 'connected', i }); if (e.kind === 'refused') say({ type: 'refused', i, e }); },
      hello: { sampleRateHz: RATE, rigId: `bench-${i}`, bridgeSessionId: `bench-${i}-${startAt}`,
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

/** A sealed decoder of `recipe` fitted on a simulated calibration run (the decoder library's own fit). */
function trainDecoder(recipe: 'covariance' | 'component-tf'): DecoderArtifact {
  const { recording } = simulateRecording(profile(12), { seed: 3 });
  const opts: train.TrainOptions = { recipe, classes: [CLASSES[0]!, CLASSES[1]!], inner: 3, seed: 1,
    ...(recipe === 'covariance' ? { tminS: 0.5, tmaxS: 2.5 } : { components: 8 }),
    recipeOptions: { notchHz: 50, car: true, lambda: { count: 4 } } };
  type Fit = (rec: Recording, o: train.TrainOptions) => DecoderArtifact;
  const fit = (train as unknown as { fitDecoder?: Fit }).fitDecoder;
  return fit ? fit(recording, opts) : train.trainDecoder(recording, { ...opts, folds: 2, baselines: false }).artifact;
}

async function main(): Promise<void> {
  const feeds = Number(arg('feeds', '16'));
  const seconds = Number(arg('seconds', '40'));
  const recipe = arg('recipe', 'covariance') === 'component-tf' ? 'component-tf' : 'covariance';
  const json = process.argv.includes('--json');
  const log = (s: string) => { if (!json) process.stderr.write(`${s}\n`); };
  const dataDir = mkdtempSync(join(tmpdir(), 'aftercue-bench-live-'));
  const loadBefore = loadavg();
  log(`training the ${recipe} decoder (64 channels, 1000 Hz)...`);
  const artifact = trainDecoder(recipe);
  const h = await start({ port: 0, dataDir, quiet: true, bcryptCost: 4, demoDecoder: false, host: '127.0.0.1' });
  try {
    const admin = h.services.auth.sessionUser(1)!;
    const study = h.services.studies.create({ name: 'Live benchmark', ethicsReference: 'BENCH (invented data)', cueClasses: CLASSES,
      epochStartS: artifact.epoch.tminS, epochEndS: artifact.epoch.tmaxS, channelNames: CHANNELS, sampleRateHz: RATE, powerLineHz: 50, recipe }, admin);
    const participant = h.services.participants.create(study.id, { code: 'B-001', consentStatus: 'given', consentDate: '2026-01-05' }, admin);
    const text = serialiseArtifact(artifact);
    const now = Date.now();
    const decoderId = Number(h.db.sqlite.prepare(`INSERT INTO decoders (study_id, name, recipe, classes, channel_names, sample_rate_hz,
      epoch_start_s, epoch_end_s, artifact, sha256, status, metrics, source, created_at, frozen_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?,
      'frozen', '{}', 'import', ?, ?)`).run(study.id, `Bench ${recipe}`, recipe, JSON.stringify(CLASSES), JSON.stringify(artifact.channelNames),
      RATE, artifact.epoch.tminS, artifact.epoch.tmaxS, text, artifact.sha256, now, now).lastInsertRowid);
    const rigs = Array.from({ length: feeds }, (_, i) => h.services.rigs.create({ name: `Bench rig ${i + 1}`, location: '' }, admin));
    const sessions = rigs.map((r) => h.services.sessions.create({ studyId: study.id, participantId: participant.id, rigId: r.rig.id, decoderId }, admin));

    const staggerMs = Math.round(7000 / feeds);
    const cfg: ChildConfig = { url: h.url, keys: rigs.map((r) => r.rigKey), seconds, staggerMs };
    const proc = spawn(process.execPath, [...process.execArgv, new URL(import.meta.url).pathname, '--child'],
      { env: { ...process.env, AFTERCUE_BENCH_CHILD: JSON.stringify(cfg) }, stdio: ['ignore', 'pipe', 'inherit'] });
    const lines = createInterface({ input: proc.stdout! });
    let connected = 0;
    let started = false;
    let done: { stats: Array<{ unackedFrames: number; overflowSamples: number }>; cpuMs: number } | null = null;
    const lagSamples: Array<{ t: number; lags: (number | null)[] }> = [];
    const loopDelay = monitorEventLoopDelay({ resolution: 10 });
    const gcPauses: number[] = [];
    const gcObserver = new PerformanceObserver((list) => { if (started) for (const e of list.getEntries()) { gcPauses.push(e.duration); if (process.env.BENCH_DEBUG && e.duration > 5) process.stderr.write(`gc ${JSON.stringify((e as unknown as { detail: unknown }).detail)} ${e.duration.toFixed(1)} ms heap ${Math.round(process.memoryUsage().heapUsed / 1e6)} MB\n`); } });
    gcObserver.observe({ entryTypes: ['gc'] });
    let cpu0 = process.cpuUsage();
    let wall0 = Date.now();
    const sampler = setInterval(() => {
      if (!started) return;
      lagSamples.push({ t: Date.now(), lags: sessions.map((s) => h.services.live.sessions.get(s.id)?.feed?.lagMs ?? null) });
    }, 1000);
    await new Promise<void>((resolve, reject) => {
      lines.on('line', (line) => {
        const m = JSON.parse(line) as { type: string };
        if (m.type === 'connected' && ++connected === feeds && !started) {
          void Promise.all(sessions.map((s) => h.services.sessions.start(s.id, admin))).then(() => {
            started = true;
            cpu0 = process.cpuUsage();
            wall0 = Date.now();
            loopDelay.enable();
            log(`${feeds} sessions running; streaming ${seconds} s...`);
          }, reject);
        }
        if (m.type === 'refused') reject(new Error(line));
        if (m.type === 'done') { done = m as unknown as typeof done; resolve(); }
      });
      proc.on('exit', (code) => { if (!done) reject(new Error(`bridge process exited with ${code}`)); });
    });
    clearInterval(sampler);
    gcObserver.disconnect();
    if (process.env.BENCH_DEBUG) process.stderr.write(`${JSON.stringify(lagSamples.map((x) => [x.t - wall0, ...x.lags.map((l) => l && Math.round(l))]))}\n`);
    loopDelay.disable();
    const serverCpuMs = cpuMs(process.cpuUsage(cpu0));
    const wallMs = Date.now() - wall0;
    for (const s of sessions) await h.services.sessions.stop(s.id, admin);
    await h.services.live.store.flush();

    const latencies = sessions.flatMap((s) => (h.db.sqlite.prepare('SELECT latency FROM trials WHERE session_id = ?').all(s.id) as
      Array<{ latency: string }>).map((r) => (JSON.parse(r.latency) as { totalMs: number }).totalMs));
    if (process.env.BENCH_DEBUG) {
      const rows = sessions.flatMap((s) => (h.db.sqlite.prepare('SELECT latency FROM trials WHERE session_id = ?').all(s.id) as Array<{ latency: string }>));
      const worst = rows.map((r) => JSON.parse(r.latency) as Record<string, number>).sort((a, b) => b.totalMs! - a.totalMs!).slice(0, 8);
      process.stderr.write(`${JSON.stringify(worst)}\n`);
    }
    const decoder = h.services.live.options.loadDecoder(h.db.sqlite.prepare('SELECT * FROM decoders WHERE id = ?').get(decoderId) as never);
    // The decoder's compute alone, one epoch, repeated on this (busy) machine: min ~ uncontended cost.
    const epoch = CHANNELS.map((_, c) => Float64Array.from({ length: decoder.epoch.length }, (_v, k) => Math.sin(k * 0.05 + c) * 20));
    const computeMs: number[] = [];
    for (let i = 0; i < 30; i++) { const t = process.hrtime.bigint(); decoder.predictEpoch(epoch); computeMs.push(Number(process.hrtime.bigint() - t) / 1e6); }
    let maxDiff = 0;
    let compared = 0;
    for (const s of sessions) {
      for (const o of offlineTrials(h.db, s.id, decoder)) {
        compared++;
        o.online.forEach((p, k) => { maxDiff = Math.max(maxDiff, Math.abs(p - (o.offline?.[k] ?? NaN))); });
      }
    }
    // Per feed, over the samples taken while it streamed: the largest lag, and the mean of its last
    // 10 samples (s) minus the mean of its first 10 (growth: a feed the server cannot keep up with lags more and more).
    const perFeed = sessions.map((_, i) => {
      const v = lagSamples.map((x) => x.lags[i]).filter((l): l is number => l !== null && l !== undefined);
      const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / Math.max(1, xs.length);
      return { maxLagMs: v.length ? Math.max(...v) : Infinity, growthMs: mean(v.slice(-10)) - mean(v.slice(0, 10)),
        unacked: done!.stats[i]!.unackedFrames, overflow: done!.stats[i]!.overflowSamples };
    });
    const sustained = perFeed.filter((f) => f.maxLagMs < 1000 && f.growthMs < 100 && f.unacked === 0 && f.overflow === 0).length;
    const commit = h.services.live.store.stats.commitMs;
    const result = {
      feeds, channels: CHANNELS.length, sampleRateHz: RATE, recipe, seconds, trials: latencies.length,
      predictionLatencyMsP50: pct(latencies, 0.5), predictionLatencyMsP99: pct(latencies, 0.99), predictionLatencyMsMax: pct(latencies, 1),
      maxLagMs: Math.max(...perFeed.map((f) => f.maxLagMs)), maxLagGrowthMs: Math.max(...perFeed.map((f) => f.growthMs)),
      feedsSustained: sustained, onlineOfflineMaxAbsDiff: maxDiff, trialsCompared: compared,
      predictComputeMs: { min: pct(computeMs, 0), p50: pct(computeMs, 0.5) },
      gc: { pauses: gcPauses.length, maxMs: gcPauses.length ? Math.max(...gcPauses) : 0, totalMs: Math.round(gcPauses.reduce((a, b) => a + b, 0)) },
      cpu: { serverCpuMs: Math.round(serverCpuMs), bridgesCpuMs: Math.round(done!.cpuMs), wallMs, serverCores: serverCpuMs / wallMs,
        eventLoopDelayMsP99: loopDelay.percentile(99) / 1e6, commitMsP50: pct(commit, 0.5), commitMsP99: pct(commit, 0.99) },
      conditions: { cores: cpus().length, loadAvgBefore: loadBefore.map((x) => Math.round(x * 100) / 100),
        loadAvgAfter: loadavg().map((x) => Math.round(x * 100) / 100), node: process.version, bridges: 'child process, loopback WebSocket',
        note: 'shared 2-core machine; other work was running (see loadAvg)' },
    };
    process.stdout.write(`${JSON.stringify(json ? result : result, null, json ? 0 : 2)}\n`);
  } finally {
    await h.stop();
    rmSync(dataDir, { recursive: true, force: true });
  }
}

if (process.argv.includes('--child')) await child();
else await main();
