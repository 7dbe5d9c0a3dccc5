/**
 * Console benchmark: `npx tsx bench/console.ts [--seconds 30] [--rate 500] [--json]`.
 *
 * Is the session console smooth with 64 channels at 500 Hz? Starts a real server (the production
 * client bundle, built first), one running session fed by a bridge in a child process (simulated
 * 64-channel EEG at --rate Hz, invented data, real time, decoding on), and Debian's Chromium
 * (headless, software rendering: no GPU) at a 1366x768 laptop size, signed in as the demo admin,
 * on the session's console. In the page it records, for --seconds: every animation-frame
 * interval (requestAnimationFrame), every long task (main-thread work over 50 ms, the Long Tasks
 * API), and the trace's redraws (canvas draws counted by the page). Prints one JSON object with
 * fps, frame-interval percentiles, frames over 2 display refreshes, long tasks, trials seen.
 * Smooth here means: the trace redraws at the display's rate with p95 frame interval under two
 * refreshes (33 ms) and no long task (common practice for 60 Hz displays; the 50 ms long-task
 * threshold is the W3C Long Tasks API's).
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';
import { start } from '../server/index';
import { DEFAULT_DEMO_PASSWORD } from '../server/config';
import { arg, pct, runBridgesChild, setUpSessions, spawnBridges, trainBenchDecoder } from './live-setup';

interface PageFigures { frameIntervalsMs: number[]; longTasksMs: number[]; traceDraws: number; trialRows: number }

/** Counts the 2D context's stroke() calls (the trace draws one path per channel and frame). */
const COUNT_STROKES = `(() => {
  window.__strokes = 0;
  const orig = CanvasRenderingContext2D.prototype.stroke;
  CanvasRenderingContext2D.prototype.stroke = function (...a) { window.__strokes++; return orig.apply(this, a); };
})()`;

/** In the page: animation-frame intervals, long tasks and strokes over \`ms\` milliseconds. */
const MEASURE = `async (ms) => {
  const longTasksMs = [];
  const po = new PerformanceObserver((l) => { for (const e of l.getEntries()) longTasksMs.push(e.duration); });
  po.observe({ type: 'longtask', buffered: false });
  const frameIntervalsMs = [];
  const strokes0 = window.__strokes;
  await new Promise((resolve) => {
    let t0 = 0, last = 0;
    const tick = (t) => {
      frameIntervalsMs.push(t - last);
      last = t;
      if (t - t0 < ms) requestAnimationFrame(tick); else resolve();
    };
    requestAnimationFrame((t) => { t0 = t; last = t; requestAnimationFrame(tick); });
  });
  po.disconnect();
  return { frameIntervalsMs, longTasksMs, traceDraws: window.__strokes - strokes0,
           trialRows: document.querySelectorAll('[data-test="trial-row"]').length };
}`;

async function main(): Promise<void> {
  const seconds = Number(arg('seconds', '30'));
  const rate = Number(arg('rate', '500'));
  const json = process.argv.includes('--json');
  const log = (s: string) => { if (!json) process.stderr.write(`${s}\n`); };
  const root = fileURLToPath(new URL('..', import.meta.url));
  log('building the client...');
  execFileSync(process.execPath, [join(root, 'node_modules/vite/bin/vite.js'), 'build', '--logLevel', 'warn'], { cwd: root, stdio: 'inherit' });
  log(`training a covariance decoder (64 channels, ${rate} Hz)...`);
  const artifact = trainBenchDecoder('covariance', rate);
  const dataDir = mkdtempSync(join(tmpdir(), 'aftercue-bench-console-'));
  const loadBefore = loadavg();
  const h = await start({ port: 0, dataDir, quiet: true, bcryptCost: 4, demoDecoder: false, host: '127.0.0.1' });
  const browser = await chromium.launch({ executablePath: process.env.AFTERCUE_CHROMIUM ?? '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking'] });
  try {
    const { admin, rigs, sessions } = setUpSessions(h, artifact, 1, rate);
    const session = sessions[0]!;
    let running: Promise<unknown> = Promise.resolve();
    const bridges = spawnBridges(new URL(import.meta.url).pathname,
      { url: h.url, keys: [rigs[0]!.rigKey], seconds: seconds + 25, staggerMs: 0, rateHz: rate },
      () => { running = h.services.sessions.start(session.id, admin); });

    const page = await (await browser.newContext({ viewport: { width: 1366, height: 768 } })).newPage();
    await page.goto(`${h.url}/sign-in`);
    await page.locator('input[name="email"]').fill('admin@aftercue.test');
    await page.locator('input[name="password"]').fill(DEFAULT_DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
    // Count the trace's canvas draws: wrap the 2D context's stroke() before the console mounts.
    // (Page scripts are strings: tsx's transform would add helpers the page does not have.)
    await page.addInitScript(COUNT_STROKES);
    await page.goto(`${h.url}/sessions/${session.id}`);
    await page.locator('[data-test="live-trace"] canvas').first().waitFor({ timeout: 60_000 });
    await running;
    log(`console open on a running session; measuring ${seconds} s...`);
    await page.waitForTimeout(3000); // the trace fills, the first trials' cues arrive
    const figures = await page.evaluate(`(${MEASURE})(${seconds * 1000})`) as PageFigures;
    const f = figures.frameIntervalsMs;
    const total = f.reduce((a, b) => a + b, 0);
    const result = {
      channels: 64, sampleRateHz: rate, seconds, browser: 'Debian Chromium, headless, --disable-gpu', viewport: '1366x768',
      frames: f.length, fps: Math.round((f.length / total) * 1000 * 10) / 10,
      frameIntervalMsP50: pct(f, 0.5), frameIntervalMsP95: pct(f, 0.95), frameIntervalMsP99: pct(f, 0.99), frameIntervalMsMax: pct(f, 1),
      framesOver33Ms: f.filter((x) => x > 33.4).length,
      longTasks: figures.longTasksMs.length, longTaskMsMax: figures.longTasksMs.length ? Math.max(...figures.longTasksMs) : 0,
      canvasStrokesPerSecond: Math.round(figures.traceDraws / (total / 1000)), trialRows: figures.trialRows,
      conditions: { cores: cpus().length, loadAvgBefore: loadBefore.map((x) => Math.round(x * 100) / 100),
        loadAvgAfter: loadavg().map((x) => Math.round(x * 100) / 100), node: process.version },
    };
    process.stdout.write(`${JSON.stringify(result, null, json ? 0 : 2)}\n`);
    bridges.done.catch(() => undefined); // killed on purpose
    bridges.proc.kill();
    await h.services.sessions.stop(session.id, admin).catch(() => undefined);
  } finally {
    await browser.close();
    await h.stop();
    rmSync(dataDir, { recursive: true, force: true });
  }
}

if (process.argv.includes('--child')) await runBridgesChild();
else await main();
