import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ServerHandle } from '../../server/index';
import { anonymous, countRows, EMAILS, signIn, startTestServer, tokenFromLatestMail, type Client } from './helpers/server';

let h: ServerHandle;
let admin: Client;
beforeAll(async () => {
  h = await startTestServer({ publicUrl: 'http://lab.example:8080' });
  admin = await signIn(h, EMAILS.admin);
});
afterAll(async () => { await h.stop(); });

const sha256 = (s: string) => createHash('sha256').update(s).digest('hex');

describe('invitation', () => {
  it('runs end to end: invite, mail through SMTP, follow the link, set a password, sign in', async () => {
    const invited = await admin.post('/api/users/invitations', { email: 'Ada@Lab.Example', displayName: 'Ada L.', role: 'experimenter' });
    // API contract: 201 with the user, address lower-cased, no password yet.
    expect(invited.status).toBe(201);
    expect(invited.body).toMatchObject({ email: 'ada@lab.example', role: 'experimenter', passwordSet: false, disabled: false });

    const list = (await admin.get('/api/outbox')).body as { id: number; to: string; subject: string; transport: string }[];
    const summary = list.find((m) => m.to === 'ada@lab.example')!;
    // The in-process SMTP server received and stored it (DESIGN.md "Real parts").
    expect(summary).toMatchObject({ subject: 'Your Aftercue invitation', transport: 'in-process' });
    const mail = (await admin.get(`/api/outbox/${summary.id}`)).body as { text: string; html?: string; from: string };
    const link = /(http:\/\/lab\.example:8080\/set-password\?token=([A-Za-z0-9_-]{43}))/.exec(mail.text);
    // Foundation issue: link is `${publicUrl}/set-password?token=...`.
    expect(link).not.toBeNull();
    expect(mail.html).toContain(link![1]);
    const token = link![2]!;

    // Only the SHA-256 of the token is stored.
    const stored = h.db.sqlite.prepare('SELECT token_hash, purpose, expires_at, created_at FROM password_tokens WHERE token_hash = ?')
      .get(sha256(token)) as { purpose: string; expires_at: number; created_at: number } | undefined;
    expect(stored?.purpose).toBe('invite');
    // Foundation issue: invitations expire after 72 h.
    expect(stored!.expires_at - stored!.created_at).toBe(72 * 3_600_000);
    expect(JSON.stringify(h.db.sqlite.prepare('SELECT * FROM password_tokens').all())).not.toContain(token);

    const anon = await anonymous(h);
    // An invited account without a password cannot sign in.
    expect((await anon.post('/api/auth/login', { email: 'ada@lab.example', password: 'anything-at-all' })).status).toBe(401);
    // API contract: set-password -> 204.
    expect((await anon.post('/api/auth/set-password', { token, password: 'a-long-enough-pass' })).status).toBe(204);
    const me = await anon.post('/api/auth/login', { email: 'ada@lab.example', password: 'a-long-enough-pass' });
    expect(me.status).toBe(200);
    expect(me.body.role).toBe('experimenter');
    // Single use: the same link fails the second time.
    const again = await anon.post('/api/auth/set-password', { token, password: 'another-long-pass' });
    expect([again.status, again.body.error.code]).toEqual([400, 'invalid-token']);
    const audit = (h.db.sqlite.prepare("SELECT action, details FROM audit_log WHERE target_type = 'user' AND target_id = ? ORDER BY id")
      .all(String(invited.body.id)) as { action: string; details: string }[]);
    // Foundation issue: audit rows, without secrets.
    expect(audit.map((a) => a.action)).toEqual(['user.invite', 'auth.login-failed', 'auth.password-set', 'auth.login']);
    expect(JSON.stringify(audit)).not.toContain(token);
  });

  it('refuses a duplicate address with 409 and sends nothing', async () => {
    const mails = countRows(h, 'mail_outbox');
    const res = await admin.post('/api/users/invitations', { email: EMAILS.reviewer, displayName: 'Again', role: 'reviewer' });
    // API contract: 409 duplicate-email, field error on email.
    expect([res.status, res.body.error.code, res.body.error.fields?.email]).toEqual([409, 'duplicate-email', 'Already in use']);
    expect(countRows(h, 'mail_outbox')).toBe(mails);
  });

  it('refuses a password shorter than 10 characters with a field error', async () => {
    await admin.post('/api/users/invitations', { email: 'short@lab.example', displayName: 'Short', role: 'reviewer' }).expect(201);
    const token = tokenFromLatestMail(h, 'short@lab.example');
    const res = await (await anonymous(h)).post('/api/auth/set-password', { token, password: 'nine-char' });
    // Foundation issue: password min 10 characters.
    expect([res.status, res.body.error.code]).toEqual([400, 'validation']);
    expect(res.body.error.fields.password).toMatch(/10/);
  });

  it('refuses an expired invitation link', async () => {
    await admin.post('/api/users/invitations', { email: 'late@lab.example', displayName: 'Late', role: 'reviewer' }).expect(201);
    const token = tokenFromLatestMail(h, 'late@lab.example');
    h.db.sqlite.prepare('UPDATE password_tokens SET expires_at = ? WHERE token_hash = ?').run(Date.now() - 1000, sha256(token));
    const res = await (await anonymous(h)).post('/api/auth/set-password', { token, password: 'a-long-enough-pass' });
    // Foundation issue: tokens expire.
    expect([res.status, res.body.error.code]).toEqual([400, 'invalid-token']);
  });
});

describe('password reset', () => {
  it('answers 202 for any address but mails only existing, enabled accounts', async () => {
    const anon = await anonymous(h);
    const before = countRows(h, 'mail_outbox');
    const unknown = await anon.post('/api/auth/password-reset', { email: 'nobody@lab.example' });
    // Foundation issue: 202 always (no account enumeration).
    expect(unknown.status).toBe(202);
    expect(countRows(h, 'mail_outbox')).toBe(before);
    const known = await anon.post('/api/auth/password-reset', { email: EMAILS.investigator });
    expect(known.status).toBe(202);
    expect(countRows(h, 'mail_outbox')).toBe(before + 1);
  });

  it('sets a new password with a 1 h token, ends the old sessions, and old password stops working', async () => {
    const victim = await signIn(h, EMAILS.reviewer);
    const anon = await anonymous(h);
    await anon.post('/api/auth/password-reset', { email: EMAILS.reviewer }).expect(202);
    const token = tokenFromLatestMail(h, EMAILS.reviewer);
    const row = h.db.sqlite.prepare('SELECT purpose, expires_at, created_at FROM password_tokens WHERE token_hash = ?')
      .get(sha256(token)) as { purpose: string; expires_at: number; created_at: number };
    // Foundation issue: reset tokens expire after 1 h.
    expect([row.purpose, row.expires_at - row.created_at]).toEqual(['reset', 3_600_000]);
    await anon.post('/api/auth/set-password', { token, password: 'brand-new-password' }).expect(204);
    // OWASP Forgot Password cheat sheet: existing sessions end when the password changes.
    expect((await victim.get('/api/auth/me')).status).toBe(401);
    expect((await anon.post('/api/auth/login', { email: EMAILS.reviewer, password: 'demo-password-for-tests' })).status).toBe(401);
    expect((await anon.post('/api/auth/login', { email: EMAILS.reviewer, password: 'brand-new-password' })).status).toBe(200);
  });

  it('sends no mail for a disabled account', async () => {
    await admin.post('/api/users/invitations', { email: 'gone@lab.example', displayName: 'Gone', role: 'reviewer' }).expect(201);
    const id = ((await admin.get('/api/users')).body as { id: number; email: string }[]).find((u) => u.email === 'gone@lab.example')!.id;
    await admin.patch(`/api/users/${id}`, { disabled: true }).expect(200);
    const before = countRows(h, 'mail_outbox');
    await (await anonymous(h)).post('/api/auth/password-reset', { email: 'gone@lab.example' }).expect(202);
    // Foundation issue: mail only if the account exists and is enabled.
    expect(countRows(h, 'mail_outbox')).toBe(before);
    // Nor can the pending invitation of a disabled account be used.
    const res = await (await anonymous(h)).post('/api/auth/set-password', { token: tokenFromLatestMail(h, 'gone@lab.example'), password: 'a-long-enough-pass' });
    expect(res.status).toBe(400);
  });
});
