import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Command } from 'commander';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { register } from '../../cli/commands/simulate';
import { edfToRecording, readEdf } from '../../shared/formats/edf';
import { simulateRecording } from '../../simulator/offline';
import type { GroundTruth } from '../../simulator/truth';
import { expectAllClose } from '../helpers/all-close';
import { busyProfile } from '../simulator/fixtures';

let dir = '';
beforeEach(() => { dir = mkdtempSync(join(tmpdir(), 'aftercue-sim-')); });
afterEach(() => rmSync(dir, { recursive: true, force: true }));

async function run(args: string[]): Promise<void> {
  const program = new Command('aftercue').exitOverride();
  register(program);
  await program.parseAsync(['node', 'aftercue', ...args]);
}

describe('aftercue simulate', () => {
  it('writes an EDF+ file with the cues as class-label annotations and the ground truth', async () => {
    const profile = join(dir, 'p.json');
    writeFileSync(profile, JSON.stringify(busyProfile()));
    const out = join(dir, 'sim.edf');
    const truthPath = join(dir, 'truth.json');
    const stderr = process.stderr.write;
    process.stderr.write = () => true;
    try {
      await run(['simulate', '--profile', profile, '--seconds', '30', '--out', out, '--truth', truthPath, '--start-time', '2024-05-06T07:08:09']);
    } finally { process.stderr.write = stderr; }
    const file = readEdf(new Uint8Array(readFileSync(out)));
    const rec = edfToRecording(file);
    const truth = JSON.parse(readFileSync(truthPath, 'utf8')) as GroundTruth;
    const expected = simulateRecording(busyProfile(), { seconds: 30 });
    // Issue 5 part 3: EDF+ with cues as annotations, text = class label.
    expect(file.format).toBe('EDF+C');
    expect(rec.annotations.map((a) => [a.text, a.onsetS])).toEqual(truth.cues.map((c) => [c.class, c.sample / 250]));
    expect(truth.cues.length).toBeGreaterThan(3);
    expect(rec.channelNames).toEqual(expected.recording.channelNames);
    expect(truth).toEqual(JSON.parse(JSON.stringify(expected.truth)));
    rec.data.forEach((row, c) => {
      const x = expected.recording.data[c]!;
      let lo = Infinity;
      let hi = -Infinity;
      for (const v of x) { lo = Math.min(lo, v); hi = Math.max(hi, v); }
      // REFERENCES.md §7: 16-bit EDF stores (max - min) / 65535 per step; the reader is within half a step
      // (one step here, allowing for the writer's outward rounding of the 8-character range fields).
      expectAllClose(row.subarray(0, x.length), x, { atol: Math.max(hi - lo, 2) / 65535 + 1e-9, rtol: 0 });
    });
  });

  it('refuses a profile with an unknown field, naming it', async () => {
    const profile = join(dir, 'bad.json');
    writeFileSync(profile, JSON.stringify({ ...busyProfile(), blinkz: 1 }));
    // docs/simulation-profile.md: unknown fields are refused with their name.
    await expect(run(['simulate', '--profile', profile, '--out', join(dir, 'x.edf')])).rejects.toThrow(/blinkz: unknown field/);
    writeFileSync(profile, '{ not json');
    await expect(run(['simulate', '--profile', profile, '--out', join(dir, 'x.edf')])).rejects.toThrow(/not valid JSON/);
  });
});
