import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ConfigError, resolveConfig } from '../../server/config';
import { startTestServer } from './helpers/server';

const dirs: string[] = [];
afterAll(() => { for (const d of dirs) rmSync(d, { recursive: true, force: true }); });

describe('configuration', () => {
  it.each([
    [{ port: 70000 }, 'PORT'],
    [{ port: 1.5 }, 'PORT'],
    [{ publicUrl: 'lab.example' }, 'AFTERCUE_PUBLIC_URL'],
    [{ publicUrl: 'ftp://lab.example' }, 'AFTERCUE_PUBLIC_URL'],
    [{ smtpUrl: 'http://relay' }, 'AFTERCUE_SMTP_URL'],
    [{ demoPassword: 'short' }, 'AFTERCUE_DEMO_PASSWORD'],
    [{ host: 'bad host;' }, 'AFTERCUE_HOST'],
    [{ bcryptCost: 2 }, 'bcryptCost'],
  ])('refuses %o, naming %s', (opts, variable) => {
    // Foundation issue: bad value -> throw naming the variable.
    expect(() => resolveConfig({ dataDir: ':memory:', ...opts })).toThrow(ConfigError);
    expect(() => resolveConfig({ dataDir: ':memory:', ...opts })).toThrow(variable);
  });

  it('stops start() before listening when a value is bad', async () => {
    await expect(startTestServer({ port: -1 })).rejects.toThrow('PORT');
  });

  it('rejects start() when the port is taken, and runs stop hooks once at stop', async () => {
    const a = await startTestServer();
    const calls: string[] = [];
    a.onStop(() => { calls.push('first'); });
    a.onStop(async () => { calls.push('second'); });
    try {
      // Node net: listening on a bound port fails with EADDRINUSE.
      await expect(startTestServer({ port: a.port })).rejects.toThrow(/EADDRINUSE/);
    } finally {
      await Promise.all([a.stop(), a.stop()]);
    }
    // Hooks run newest first, once, even when stop() is called twice.
    expect(calls).toEqual(['second', 'first']);
  });

  it('uses an https public URL to switch on secure cookies', () => {
    // Foundation issue: secure cookies when publicUrl is https.
    expect(resolveConfig({ dataDir: ':memory:', publicUrl: 'https://eeg.lab.example/' })).toMatchObject({
      publicUrl: 'https://eeg.lab.example', secureCookies: true });
    expect(resolveConfig({ dataDir: ':memory:' }).secureCookies).toBe(false);
  });

  it('puts the database, uploads and a private session secret in the data folder', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'aftercue-config-'));
    dirs.push(dir);
    const h = await startTestServer({ dataDir: dir });
    try {
      const journal = h.db.sqlite.pragma('journal_mode', { simple: true });
      const fk = h.db.sqlite.pragma('foreign_keys', { simple: true });
      // STYLE.md §6: WAL and foreign keys on, file in the data directory.
      expect([journal, fk]).toEqual(['wal', 1]);
      expect(statSync(join(dir, 'aftercue.sqlite')).isFile()).toBe(true);
      expect(statSync(join(dir, 'uploads')).isDirectory()).toBe(true);
      // Common practice: secrets readable by the owner only.
      expect(statSync(join(dir, 'session-secret')).mode & 0o077).toBe(0);
    } finally {
      await h.stop();
    }
  });

  it('seeds only once: a restart on the same data folder keeps the data and seeds nothing', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'aftercue-restart-'));
    dirs.push(dir);
    const first = await startTestServer({ dataDir: dir });
    const seeded = first.seeded;
    await first.stop();
    const second = await startTestServer({ dataDir: dir });
    try {
      // Foundation issue: seeding when the users table is empty.
      expect(seeded?.accounts).toHaveLength(4);
      expect(second.seeded).toBeNull();
      expect((second.db.sqlite.prepare('SELECT count(*) AS n FROM users').get() as { n: number }).n).toBe(4);
    } finally {
      await second.stop();
    }
  });
});
