import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { User } from '../../shared/api';
import type { ServerHandle } from '../../server/index';
import { anonymous, DEMO_PASSWORD, EMAILS, signIn, startTestServer, type Client } from './helpers/server';

let h: ServerHandle;
let admin: Client;
let users: User[];
beforeAll(async () => {
  h = await startTestServer();
  admin = await signIn(h, EMAILS.admin);
  users = (await admin.get('/api/users')).body as User[];
});
afterAll(async () => { await h.stop(); });

const idOf = (email: string) => users.find((u) => u.email === email)!.id;

describe('user management', () => {
  it('lists the seeded accounts without password hashes', async () => {
    // Foundation issue: four demo accounts seeded on an empty database.
    expect(users.map((u) => [u.email, u.role, u.passwordSet])).toEqual([
      [EMAILS.admin, 'admin', true], [EMAILS.experimenter, 'experimenter', true],
      [EMAILS.investigator, 'investigator', true], [EMAILS.reviewer, 'reviewer', true]]);
    // Common practice: hashes never leave the server.
    expect(JSON.stringify(users)).not.toMatch(/\$2[aby]\$/);
  });

  it('stores bcrypt hashes of the configured cost', () => {
    const row = h.db.sqlite.prepare('SELECT password_hash AS hash FROM users WHERE email = ?').get(EMAILS.admin) as { hash: string };
    // bcrypt modular crypt format $2b$<cost>$... (Provos & Mazières 1999); tests pass cost 4.
    expect(row.hash).toMatch(/^\$2[ab]\$04\$/);
  });

  it('lets an admin change role and display name; the user sees the new permissions at once', async () => {
    const reviewer = await signIn(h, EMAILS.reviewer);
    const res = await admin.patch(`/api/users/${idOf(EMAILS.reviewer)}`, { role: 'experimenter', displayName: 'Rev. Iewer' });
    expect(res.body).toMatchObject({ role: 'experimenter', displayName: 'Rev. Iewer' });
    // The role is read per request, so a signed-in user's rights change without signing in again.
    expect((await reviewer.get('/api/auth/me')).body.permissions).toContain('participant:create');
    await admin.patch(`/api/users/${idOf(EMAILS.reviewer)}`, { role: 'reviewer' }).expect(200);
    const audit = h.db.sqlite.prepare("SELECT details FROM audit_log WHERE action = 'user.update' ORDER BY id LIMIT 1").get() as { details: string };
    // Audit details hold before/after of the changed fields.
    expect(JSON.parse(audit.details)).toEqual({ before: { role: 'reviewer', displayName: 'Demo Reviewer' },
      after: { role: 'experimenter', displayName: 'Rev. Iewer' } });
  });

  it('refuses to let an admin disable or demote themselves', async () => {
    const self = idOf(EMAILS.admin);
    const disable = await admin.patch(`/api/users/${self}`, { disabled: true });
    const demote = await admin.patch(`/api/users/${self}`, { role: 'reviewer' });
    // Foundation issue: an admin cannot disable or demote themselves.
    expect([disable.status, disable.body.error.code]).toEqual([409, 'own-account']);
    expect([demote.status, demote.body.error.code]).toEqual([409, 'own-account']);
    // Renaming oneself is fine.
    expect((await admin.patch(`/api/users/${self}`, { displayName: 'Chief Admin' })).status).toBe(200);
    expect((await admin.get('/api/auth/me')).body.role).toBe('admin');
  });

  it('answers 404 for a user who does not exist', async () => {
    expect((await admin.patch('/api/users/9999', { disabled: true })).status).toBe(404);
  });

  it('ends every session of a user who is disabled', async () => {
    const a = await signIn(h, EMAILS.investigator);
    const b = await signIn(h, EMAILS.investigator);
    await admin.patch(`/api/users/${idOf(EMAILS.investigator)}`, { disabled: true }).expect(200);
    const rows = h.db.sqlite.prepare("SELECT count(*) AS n FROM login_sessions WHERE json_extract(sess, '$.passport.user') = ?")
      .get(idOf(EMAILS.investigator)) as { n: number };
    // Common practice: disabling revokes existing sessions.
    expect(rows.n).toBe(0);
    expect((await a.get('/api/auth/me')).status).toBe(401);
    expect((await b.get('/api/auth/me')).status).toBe(401);
    await admin.patch(`/api/users/${idOf(EMAILS.investigator)}`, { disabled: false }).expect(200);
    expect((await (await anonymous(h)).post('/api/auth/login', { email: EMAILS.investigator, password: DEMO_PASSWORD })).status).toBe(200);
  });

  it('pages the audit log newest first with a total', async () => {
    const page = (await admin.get('/api/audit?limit=2&offset=1')).body as { items: { id: number }[]; total: number };
    const all = (await admin.get('/api/audit?limit=200')).body as { items: { id: number }[]; total: number };
    // API contract (shared/api/audit.ts): {items, total}, newest first.
    expect(page.total).toBe(all.total);
    expect(page.items.map((i) => i.id)).toEqual(all.items.slice(1, 3).map((i) => i.id));
    expect(all.items[0]!.id).toBeGreaterThan(all.items[1]!.id);
  });
});
