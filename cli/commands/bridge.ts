// `aftercue bridge`: streams a feed to an Aftercue server, from the synthetic generator
// (--profile) or from an EDF/EDF+/BDF recording (--replay), paced at --speed x real time.
// Protocol: docs/feed-protocol.md. The rig key may come from AFTERCUE_RIG_KEY instead of the
// command line (keeps it out of shell history and process listings).
import type { Command } from 'commander';
import { randomUUID } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { edfToRecording, readEdf } from '../../shared/formats/edf';
import { FeedBridgeClient, type BridgeEvent, type BridgeStats } from '../../simulator/bridge-client';
import { runBridge } from '../../simulator/bridge-run';
import type { FeedSource } from '../../simulator/feed-items';
import { createSimulation } from '../../simulator/generator';
import { replaySource } from '../../simulator/replay';
import { simulatedSource } from '../../simulator/simulated-source';
import { readJsonFile } from './simulate';

export interface BridgeCommandOptions {
  profile?: string;
  replay?: string;
  server: string;
  rigKey?: string;
  rigId?: string;
  speed?: string;
  seconds?: string;
  classes?: string;
  chunkMs?: string;
  bufferSeconds?: string;
  seed?: string;
}

function num(text: string | undefined, name: string, fallback?: number): number | undefined {
  if (text === undefined) return fallback;
  const v = Number(text);
  if (!Number.isFinite(v) || v <= 0) throw new Error(`--${name} expects a positive number, got '${text}'`);
  return v;
}

function describe(e: BridgeEvent): string | null {
  switch (e.kind) {
    case 'connecting': return e.attempt === 0 ? `connecting to ${e.url}` : null;
    case 'connected': return `connected; server holds frames up to ${e.serverSeq}, sending from ${Math.max(e.resumeFromSeq, e.serverSeq + 1)}`;
    case 'disconnected': return `disconnected (${e.code}${e.reason ? ` ${e.reason}` : ''})${e.retryInMs !== null ? `, retrying in ${e.retryInMs} ms` : ''}`;
    case 'overflow': return `buffer full: gave up samples ${e.fromSample}..${e.toSample} (announced as a gap)`;
    case 'refused': return `refused by the server (${e.code}): ${e.reason}`;
    case 'acked': return null;
  }
}

export async function runBridgeCommand(o: BridgeCommandOptions, signal?: AbortSignal,
                                       log: (line: string) => void = (l) => process.stderr.write(`${l}\n`)): Promise<BridgeStats> {
  if ((o.profile === undefined) === (o.replay === undefined)) throw new Error('give exactly one of --profile FILE or --replay FILE.edf');
  const rigKey = o.rigKey ?? process.env.AFTERCUE_RIG_KEY;
  if (!rigKey) throw new Error('missing --rig-key (or AFTERCUE_RIG_KEY)');
  const seconds = num(o.seconds, 'seconds');
  let source: FeedSource;
  if (o.profile !== undefined) {
    if (o.classes) throw new Error('--classes applies to --replay only');
    const seed = o.seed === undefined ? undefined : Number(o.seed);
    source = simulatedSource(createSimulation(readJsonFile(o.profile), { seed }));
    if (seconds === undefined && !signal) throw new Error('--profile streams without end: give --seconds N (or stop it with Ctrl-C)');
  } else {
    const rec = edfToRecording(readEdf(new Uint8Array(readFileSync(o.replay!))));
    const classes = o.classes?.split(',').map((c) => c.trim()).filter((c) => c !== '');
    source = replaySource(rec, { classes });
  }
  const client = new FeedBridgeClient({
    serverUrl: o.server, rigKey,
    hello: { rigId: o.rigId ?? hostname(), bridgeSessionId: randomUUID(), sampleRateHz: source.sampleRateHz,
      startTime: new Date().toISOString(), channelNames: source.channelNames, units: source.units },
    maxBufferedSamples: Math.round(num(o.bufferSeconds, 'buffer-seconds', 60)! * source.sampleRateHz),
    onEvent: (e) => { const line = describe(e); if (line) log(line); },
  });
  const stats = await runBridge(source, client, {
    speed: num(o.speed, 'speed', 1), seconds, chunkMs: num(o.chunkMs, 'chunk-ms', 40), signal,
  });
  log(`done: ${stats.lastAckedSeq} frames acknowledged over ${stats.connections} connection(s)` +
    (stats.unackedFrames > 0 ? `, ${stats.unackedFrames} NOT acknowledged` : '') +
    (stats.overflowSamples > 0 ? `, ${stats.overflowSamples} samples lost to buffer overflow (announced)` : ''));
  return stats;
}

export function register(program: Command): void {
  program.command('bridge')
    .description('stream a feed to an Aftercue server: synthetic (--profile) or an EDF replay (--replay)')
    .option('--profile <file>', 'simulation profile (JSON) for the synthetic generator')
    .option('--replay <file.edf>', 'EDF/EDF+/BDF recording to replay, annotations as cues')
    .requiredOption('--server <url>', 'server base URL, e.g. http://localhost:5170')
    .option('--rig-key <key>', 'the rig key (default: $AFTERCUE_RIG_KEY)')
    .option('--rig-id <id>', 'rig name sent in the stream header (default: host name)')
    .option('--speed <x>', 'multiple of real time', '1')
    .option('--seconds <n>', 'stop after this many seconds of data')
    .option('--classes <list>', 'replay: annotation texts to send as cues, e.g. T1,T2 (default: all)')
    .option('--chunk-ms <ms>', 'chunk length', '40')
    .option('--buffer-seconds <s>', 'unacknowledged data kept through an outage before gaps are announced', '60')
    .option('--seed <n>', 'override the profile seed')
    .action(async (o: BridgeCommandOptions) => {
      const stop = new AbortController();
      const onSignal = () => stop.abort();
      process.once('SIGINT', onSignal);
      process.once('SIGTERM', onSignal);
      try {
        const stats = await runBridgeCommand(o, stop.signal);
        if (stats.unackedFrames > 0) process.exitCode = 2;
      } finally {
        process.off('SIGINT', onSignal);
        process.off('SIGTERM', onSignal);
      }
    });
}
