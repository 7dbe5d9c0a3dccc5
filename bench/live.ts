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
import { mkdtempSync, rmSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { monitorEventLoopDelay, PerformanceObserver } from 'node:perf_hooks';
import { start } from '../server/index';
import { offlineTrials } from '../server/live/offline';
import {
  arg, CHANNELS, cpuMs, pct, runBridgesChild, setUpSessions, spawnBridges, trainBenchDecoder, type BridgesConfig, type BridgesDone,
} from './live-setup';

const RATE = 1000;

async function main(): Promise<void> {
  const feeds = Number(arg('feeds', '16'));
  const seconds = Number(arg('seconds', '40'));
  const recipe = arg('recipe', 'covariance') === 'component-tf' ? 'component-tf' : 'covariance';
  const json = process.argv.includes('--json');
  const log = (s: string) => { if (!json) process.stderr.write(`${s}\n`); };
  const dataDir = mkdtempSync(join(tmpdir(), 'aftercue-bench-live-'));
  const loadBefore = loadavg();
  log(`training the ${recipe} decoder (64 channels, 1000 Hz)...`);
  const artifact = trainBenchDecoder(recipe, RATE);
  const h = await start({ port: 0, dataDir, quiet: true, bcryptCost: 4, demoDecoder: false, host: '127.0.0.1' });
  try {
    const { admin, decoderId, rigs, sessions } = setUpSessions(h, artifact, feeds, RATE);
    const staggerMs = Math.round(7000 / feeds);
    const cfg: BridgesConfig = { url: h.url, keys: rigs.map((r) => r.rigKey), seconds, staggerMs, rateHz: RATE };
    let started = false;
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
    const bridges = spawnBridges(new URL(import.meta.url).pathname, cfg, () => {
      void Promise.all(sessions.map((s) => h.services.sessions.start(s.id, admin))).then(() => {
        started = true;
        cpu0 = process.cpuUsage();
        wall0 = Date.now();
        loopDelay.enable();
        log(`${feeds} sessions running; streaming ${seconds} s...`);
      }, (e: unknown) => { process.stderr.write(`starting the sessions failed: ${String(e)}\n`); bridges.proc.kill(); });
    });
    const done: BridgesDone = await bridges.done;
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
        unacked: done.stats[i]!.unackedFrames, overflow: done.stats[i]!.overflowSamples };
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
      cpu: { serverCpuMs: Math.round(serverCpuMs), bridgesCpuMs: Math.round(done.cpuMs), wallMs, serverCores: serverCpuMs / wallMs,
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

if (process.argv.includes('--child')) await runBridgesChild();
else await main();
