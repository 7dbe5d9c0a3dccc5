import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { runBridgeCommand } from '../../cli/commands/bridge';
import { runSimulate } from '../../cli/commands/simulate';
import { startAcceptorServer, type AcceptorServer } from '../simulator/acceptor-server';
import { busyProfile } from '../simulator/fixtures';

let dir = '';
let server: AcceptorServer | null = null;
beforeEach(() => { dir = mkdtempSync(join(tmpdir(), 'aftercue-bridge-')); });
afterEach(async () => {
  rmSync(dir, { recursive: true, force: true });
  await server?.close();
  server = null;
});
const quiet = () => undefined;

describe('aftercue bridge', () => {
  it('streams a simulated profile to the server for the requested seconds', async () => {
    server = await startAcceptorServer('key-1');
    const profile = join(dir, 'p.json');
    writeFileSync(profile, JSON.stringify(busyProfile()));
    const lines: string[] = [];
    const stats = await runBridgeCommand({ profile, server: server.url, rigKey: 'key-1', speed: '50', seconds: '4', rigId: 'rig-a' },
      undefined, (l) => lines.push(l));
    const s = [...server.sessions.values()][0]!;
    // Issue 5 part 3: a separate-process bridge streaming a profile; every frame acknowledged.
    expect(s.acceptor.durableSampleCount).toBe(4 * 250);
    expect(s.acceptor.stream?.rigId).toBe('rig-a');
    expect(stats.unackedFrames).toBe(0);
    expect(lines.some((l) => l.startsWith('connected'))).toBe(true);
  });

  it('replays an EDF+ file with only the listed annotation texts as cues', async () => {
    const edf = join(dir, 'sim.edf');
    await runSimulate({ profile: writeProfile(), out: edf, seconds: '30', startTime: '2024-05-06T07:08:09' }, quiet);
    server = await startAcceptorServer('key-2');
    await runBridgeCommand({ replay: edf, server: server.url, rigKey: 'key-2', speed: '100', classes: 'left-hand' }, undefined, quiet);
    const s = [...server.sessions.values()][0]!;
    // Issue 5 part 3: annotations become cue markers; --classes filters them.
    expect(s.cues.length).toBeGreaterThan(0);
    expect(s.cues.every((c) => c.label === 'left-hand')).toBe(true);
    expect(s.acceptor.durableSampleCount).toBe(30 * 250);
  });

  it('needs exactly one source and a rig key', async () => {
    await expect(runBridgeCommand({ server: 'http://127.0.0.1:1', rigKey: 'k' }, undefined, quiet)).rejects.toThrow(/exactly one/);
    const saved = process.env.AFTERCUE_RIG_KEY;
    delete process.env.AFTERCUE_RIG_KEY;
    try {
      await expect(runBridgeCommand({ profile: 'x.json', server: 'http://127.0.0.1:1' }, undefined, quiet)).rejects.toThrow(/rig-key/);
    } finally {
      if (saved !== undefined) process.env.AFTERCUE_RIG_KEY = saved;
    }
  });
});

function writeProfile(): string {
  const p = join(dir, 'p.json');
  writeFileSync(p, JSON.stringify(busyProfile()));
  return p;
}
