import { readdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { openDb, type Db } from '../../server/db/client';
import { SqliteSessionStore } from '../../server/http/session-store';
import type session from 'express-session';

let db: Db;
beforeEach(() => { db = openDb(':memory:'); });
afterEach(() => { db.close(); });

const tables = () => (db.sqlite.prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' AND name NOT LIKE '__drizzle%' ORDER BY name")
  .all() as { name: string }[]).map((r) => r.name);

describe('the database', () => {
  it('applies the committed migrations to a fresh in-memory database', () => {
    // Foundation issue: the tables of the foundation, created by server/db/migrations; they are all there
    // (later features add their own: decoders, recordings, training jobs, pilot sessions).
    expect(tables()).toEqual(expect.arrayContaining(['audit_log', 'login_sessions', 'mail_outbox', 'participants', 'password_tokens',
      'rigs', 'studies', 'users']));
    // Issue 6: the pilot-session tables (sessions, raw feed log, trials, events, display links).
    expect(tables()).toEqual(expect.arrayContaining(['pilot_sessions', 'feeds', 'feed_chunks', 'feed_marks', 'trials',
      'session_events', 'display_tokens', 'embedded_rigs']));
    const files = readdirSync(fileURLToPath(new URL('../../server/db/migrations', import.meta.url))).filter((f) => f.endsWith('.sql'));
    const applied = (db.sqlite.prepare('SELECT count(*) AS n FROM __drizzle_migrations').get() as { n: number }).n;
    expect(applied).toBe(files.length);
  });

  it('enforces foreign keys', () => {
    // STYLE.md §6: foreign keys on.
    expect(() => db.sqlite.prepare(`INSERT INTO participants (study_id, code, consent_status, created_at, updated_at)
      VALUES (42, 'P-1', 'pending', 0, 0)`).run()).toThrow(/FOREIGN KEY/);
  });

  it('keeps participant codes unique per study regardless of case, in the schema itself', () => {
    db.sqlite.prepare(`INSERT INTO users (email, display_name, role, created_at, updated_at) VALUES ('a@b.cd', 'A', 'admin', 0, 0)`).run();
    db.sqlite.prepare(`INSERT INTO studies (name, ethics_reference, cue_classes, epoch_start_s, epoch_end_s, channel_names,
      sample_rate_hz, power_line_hz, recipe, created_by, created_at, updated_at)
      VALUES ('S', 'E', '["a","b"]', 0, 1, '["Cz"]', 250, 50, 'covariance', 1, 0, 0)`).run();
    const insert = db.sqlite.prepare(`INSERT INTO participants (study_id, code, consent_status, created_at, updated_at)
      VALUES (1, ?, 'pending', 0, 0)`);
    insert.run('P-001');
    // Foundation issue: unique within its study.
    expect(() => insert.run('p-001')).toThrow(/UNIQUE/);
  });

  it('has no column that could hold a participant name', () => {
    const columns = (db.sqlite.prepare('PRAGMA table_info(participants)').all() as { name: string }[]).map((c) => c.name);
    // Foundation issue: a code is pseudonymous; no name field exists.
    expect(columns).toEqual(['id', 'study_id', 'code', 'consent_status', 'consent_date', 'notes', 'created_at', 'updated_at']);
  });
});

describe('the SQLite session store', () => {
  const sess = (expires: Date, user?: number) => ({ cookie: { expires, originalMaxAge: 1000 }, ...(user ? { passport: { user } } : {}) }) as unknown as session.SessionData;
  const get = (store: SqliteSessionStore, sid: string) =>
    new Promise<unknown>((resolve, reject) => store.get(sid, (err, s) => (err ? reject(err as Error) : resolve(s))));

  it('stores, reads, touches and destroys sessions', async () => {
    const store = new SqliteSessionStore(db, 60_000);
    store.set('a', sess(new Date(Date.now() + 60_000), 7));
    // express-session Store contract: get returns what set stored (dates as JSON strings).
    expect(await get(store, 'a')).toMatchObject({ passport: { user: 7 } });
    store.touch('a', sess(new Date(Date.now() + 120_000)));
    const expires = (db.sqlite.prepare('SELECT expires FROM login_sessions WHERE sid = ?').get('a') as { expires: number }).expires;
    expect(expires).toBeGreaterThan(Date.now() + 100_000);
    store.destroy('a');
    expect(await get(store, 'a')).toBeNull();
  });

  it('treats expired sessions as absent and prunes them', async () => {
    const store = new SqliteSessionStore(db, 60_000);
    store.set('old', sess(new Date(Date.now() - 1000)));
    store.set('new', sess(new Date(Date.now() + 60_000)));
    expect(await get(store, 'old')).toBeNull();
    // Only the expired row goes.
    expect(store.prune()).toBe(1);
    expect(await get(store, 'new')).not.toBeNull();
  });
});
