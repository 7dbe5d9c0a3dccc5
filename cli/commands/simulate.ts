// `aftercue simulate`: an offline synthetic recording (EDF+ with cue annotations, text = class
// label) and its ground-truth JSON, from a simulation profile (docs/simulation-profile.md).
import type { Command } from 'commander';
import { readFileSync, writeFileSync } from 'node:fs';
import { writeEdfPlus } from '../../shared/formats/edf';
import { simulateRecording } from '../../simulator/offline';

export interface SimulateCommandOptions {
  profile: string;
  out: string;
  truth?: string;
  seconds?: string;
  seed?: string;
  startTime?: string;
  bdf?: boolean;
}

function positiveNumber(text: string | undefined, name: string): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text);
  if (!Number.isFinite(v) || v <= 0) throw new Error(`--${name} expects a positive number, got '${text}'`);
  return v;
}

/** Reads and parses a JSON file, naming the file when it is not JSON. */
export function readJsonFile(path: string): unknown {
  const text = readFileSync(path, 'utf8');
  try {
    return JSON.parse(text) as unknown;
  } catch (e) {
    throw new Error(`${path} is not valid JSON: ${(e as Error).message}`);
  }
}

export async function runSimulate(o: SimulateCommandOptions, log: (line: string) => void = (l) => process.stderr.write(`${l}\n`)): Promise<void> {
  const seed = o.seed === undefined ? undefined : Number(o.seed);
  if (seed !== undefined && !(Number.isInteger(seed) && seed >= 0 && seed <= 0xffff_ffff)) throw new Error(`--seed expects an integer in [0, 2^32), got '${o.seed}'`);
  const { recording, truth } = simulateRecording(readJsonFile(o.profile), {
    seconds: positiveNumber(o.seconds, 'seconds'), seed, startTime: o.startTime ?? new Date().toISOString(),
  });
  const edf = writeEdfPlus(recording, { format: o.bdf ? 'BDF+C' : 'EDF+C', recordingCode: 'SIMULATED' });
  writeFileSync(o.out, edf);
  if (o.truth) writeFileSync(o.truth, `${JSON.stringify(truth, null, 1)}\n`);
  const count = (k: string) => truth.artifacts.filter((a) => a.kind === k).length;
  log(`wrote ${o.out}: ${recording.channelNames.length} channels, ${truth.durationS.toFixed(1)} s at ${truth.sampleRateHz} Hz, ` +
    `${truth.cues.length} cues (${truth.profile.classes.join(', ')})`);
  log(`artifacts: ${count('blink')} blinks, ${count('saccade')} saccades, ${count('muscle')} muscle bursts, ${count('pop')} pops, ` +
    `${truth.dropouts.length} dropouts (zeros in the file)${o.truth ? `; ground truth in ${o.truth}` : ''}`);
}

export function register(program: Command): void {
  program.command('simulate')
    .description('write a synthetic EEG recording (EDF+, cues as annotations) and its ground truth from a simulation profile')
    .requiredOption('--profile <file>', 'simulation profile (JSON, see docs/simulation-profile.md)')
    .requiredOption('--out <file.edf>', 'EDF+ file to write')
    .option('--truth <file.json>', 'ground-truth JSON to write')
    .option('--seconds <n>', 'length in seconds (default: one run of every trial)')
    .option('--seed <n>', 'override the profile seed')
    .option('--start-time <iso>', 'start of the recording (default: now)')
    .option('--bdf', 'write 24-bit BDF+ instead of 16-bit EDF+')
    .action(async (o: SimulateCommandOptions) => runSimulate(o));
}
