import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ServerHandle } from '../../server/index';
import { anonymous, countRows, DEMO_PASSWORD, EMAILS, signIn, startTestServer } from './helpers/server';

let h: ServerHandle;
beforeAll(async () => { h = await startTestServer(); });
afterAll(async () => { await h.stop(); });

function sessionCookie(setCookie: unknown): string | undefined {
  const list = Array.isArray(setCookie) ? setCookie as string[] : [];
  return list.find((c) => c.startsWith('aftercue.sid='))?.split(';')[0];
}

describe('sign-in, sign-out and the signed-in user', () => {
  it('answers health publicly with the package version', async () => {
    const res = await (await anonymous(h)).get('/api/health');
    // API contract (shared/api/health.ts); version from package.json 0.1.0.
    expect(res.body).toEqual({ status: 'ok', version: '0.1.0' });
  });

  it('refuses a login without the CSRF token with 403 csrf', async () => {
    const c = await anonymous(h);
    const res = await c.agent.post('/api/auth/login').send({ email: EMAILS.admin, password: DEMO_PASSWORD });
    // Foundation issue: every unsafe /api call, login included, needs X-CSRF-Token (OWASP synchronizer token).
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
  });

  it('refuses a token from another session', async () => {
    const a = await anonymous(h);
    const b = await anonymous(h);
    const res = await a.agent.post('/api/auth/login').set('X-CSRF-Token', b.csrf).send({ email: EMAILS.admin, password: DEMO_PASSWORD });
    // OWASP CSRF cheat sheet: the token is bound to the session.
    expect(res.status).toBe(403);
  });

  it('signs in, returns the user with permissions, and rotates the session id', async () => {
    const c = await anonymous(h);
    const first = await c.agent.get('/api/auth/csrf');
    const before = sessionCookie(first.headers['set-cookie']);
    const res = await c.post('/api/auth/login', { email: '  Investigator@Aftercue.TEST ', password: DEMO_PASSWORD });
    // API contract (shared/api/auth.ts Me); permissions per the foundation issue for investigator, plus the
    // issue 6 contract's decoder, session, training and recording permissions.
    expect(res.body).toMatchObject({ email: EMAILS.investigator, role: 'investigator', displayName: 'Demo Investigator' });
    expect(res.body.permissions).toEqual(['study:read', 'study:create', 'study:edit', 'study:archive',
      'participant:create', 'participant:edit', 'rig:read', 'decoder:read', 'decoder:import', 'decoder:freeze', 'session:read',
      'session:run', 'training:run', 'recording:upload']);
    const after = sessionCookie(res.headers['set-cookie']);
    // OWASP Session Management cheat sheet: a new session id at sign-in (no fixation).
    expect(after).toBeDefined();
    expect(after).not.toBe(before);
    // Contract: the CSRF token survives the sign-in.
    expect((await c.agent.get('/api/auth/csrf')).body.token).toBe(c.csrf);
    // Contract: GET /api/auth/me returns the same user.
    expect((await c.get('/api/auth/me')).body).toEqual(res.body);
  });

  it('sets the session cookie httpOnly and SameSite=Lax', async () => {
    const c = await anonymous(h);
    const res = await c.post('/api/auth/login', { email: EMAILS.reviewer, password: DEMO_PASSWORD });
    const cookie = (res.headers['set-cookie'] as unknown as string[]).find((s) => s.startsWith('aftercue.sid='))!;
    // Foundation issue: httpOnly + sameSite lax (secure only behind an https public URL).
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Lax/);
    expect(cookie).not.toMatch(/Secure/);
  });

  it('rejects a wrong password with 401 invalid-credentials and an unknown address the same way', async () => {
    const c = await anonymous(h);
    const wrong = await c.post('/api/auth/login', { email: EMAILS.admin, password: 'not the password' });
    const unknown = await c.post('/api/auth/login', { email: 'nobody@aftercue.test', password: 'whatever1234' });
    // Common practice (OWASP Authentication cheat sheet): one generic answer for both.
    expect([wrong.status, wrong.body.error.code]).toEqual([401, 'invalid-credentials']);
    expect([unknown.status, unknown.body]).toEqual([wrong.status, wrong.body]);
    // Foundation issue: signed out -> 401 on a protected route.
    expect((await c.get('/api/auth/me')).status).toBe(401);
  });

  it('signs out with 204; afterwards me is 401 and the old session is gone', async () => {
    const c = await signIn(h, EMAILS.experimenter);
    const sessionsBefore = countRows(h, 'login_sessions');
    const res = await c.post('/api/auth/logout');
    // API contract: logout -> 204.
    expect(res.status).toBe(204);
    expect((await c.get('/api/auth/me')).status).toBe(401);
    // The token carries over the sign-out, so the same tab can sign in again.
    expect((await c.post('/api/auth/login', { email: EMAILS.experimenter, password: DEMO_PASSWORD })).status).toBe(200);
    // Session store: the regenerated session replaces the old row rather than adding one.
    expect(countRows(h, 'login_sessions')).toBe(sessionsBefore);
  });

  it('keeps sessions in the login_sessions table as JSON with an expiry', async () => {
    const c = await signIn(h, EMAILS.admin);
    const me = (await c.get('/api/auth/me')).body as { id: number };
    const row = h.db.sqlite.prepare("SELECT sess, expires FROM login_sessions WHERE json_extract(sess, '$.passport.user') = ?")
      .get(me.id) as { sess: string; expires: number } | undefined;
    // Foundation issue: express-session store over login_sessions; expiry 12 h ahead (rolling).
    expect(row).toBeDefined();
    expect(row!.expires).toBeGreaterThan(Date.now() + 11 * 3_600_000);
  });

  it('writes audit rows for sign-in, failed sign-in and sign-out', async () => {
    const c = await anonymous(h);
    await c.post('/api/auth/login', { email: EMAILS.reviewer, password: 'wrong password!' });
    await c.post('/api/auth/login', { email: EMAILS.reviewer, password: DEMO_PASSWORD });
    await c.post('/api/auth/logout');
    const actions = (h.db.sqlite.prepare("SELECT action FROM audit_log WHERE actor_email = ? ORDER BY id DESC LIMIT 3")
      .all(EMAILS.reviewer) as { action: string }[]).map((r) => r.action);
    // Foundation issue: every state change writes an audit row.
    expect(actions).toEqual(['auth.logout', 'auth.login', 'auth.login-failed']);
  });
});

describe('disabled accounts', () => {
  it('cannot sign in, and a disabled user loses the session they had', async () => {
    const admin = await signIn(h, EMAILS.admin);
    const victim = await signIn(h, EMAILS.experimenter);
    const users = (await admin.get('/api/users')).body as { id: number; email: string }[];
    const id = users.find((u) => u.email === EMAILS.experimenter)!.id;
    await admin.patch(`/api/users/${id}`, { disabled: true }).expect(200);
    // Foundation issue: disabled users cannot log in.
    expect((await victim.get('/api/auth/me')).status).toBe(401);
    const retry = await (await anonymous(h)).post('/api/auth/login', { email: EMAILS.experimenter, password: DEMO_PASSWORD });
    expect([retry.status, retry.body.error.code]).toEqual([403, 'account-disabled']);
    await admin.patch(`/api/users/${id}`, { disabled: false }).expect(200);
    // Re-enabled: the same password works again.
    expect((await (await anonymous(h)).post('/api/auth/login', { email: EMAILS.experimenter, password: DEMO_PASSWORD })).status).toBe(200);
  });
});

describe('login rate limit', () => {
  it('answers 429 after the configured number of failed attempts per address, other addresses unaffected', async () => {
    const limited = await startTestServer({ loginRateLimit: { max: 3, windowMs: 60_000 } });
    try {
      const c = await anonymous(limited);
      const statuses: number[] = [];
      for (let i = 0; i < 4; i++) statuses.push((await c.post('/api/auth/login', { email: EMAILS.admin, password: 'wrong password' })).status);
      // Foundation issue: N attempts per IP + e-mail; RFC 6585 §4: 429 Too Many Requests.
      expect(statuses).toEqual([401, 401, 401, 429]);
      const blocked = await c.post('/api/auth/login', { email: EMAILS.admin, password: DEMO_PASSWORD });
      expect([blocked.status, blocked.body.error.code]).toEqual([429, 'rate-limited']);
      // The key includes the address: another account from the same IP still signs in.
      expect((await c.post('/api/auth/login', { email: EMAILS.reviewer, password: DEMO_PASSWORD })).status).toBe(200);
    } finally {
      await limited.stop();
    }
  });

  it('limits password-reset requests per address too, although each answers 202', async () => {
    const limited = await startTestServer({ loginRateLimit: { max: 2, windowMs: 60_000 } });
    try {
      const c = await anonymous(limited);
      const statuses: number[] = [];
      for (let i = 0; i < 3; i++) statuses.push((await c.post('/api/auth/password-reset', { email: EMAILS.reviewer })).status);
      // Common practice (OWASP Forgot Password cheat sheet): rate-limit reset requests; RFC 6585 §4.
      expect(statuses).toEqual([202, 202, 429]);
    } finally {
      await limited.stop();
    }
  });

  it('does not count successful sign-ins', async () => {
    const limited = await startTestServer({ loginRateLimit: { max: 2, windowMs: 60_000 } });
    try {
      const c = await anonymous(limited);
      const statuses: number[] = [];
      for (let i = 0; i < 4; i++) statuses.push((await c.post('/api/auth/login', { email: EMAILS.admin, password: DEMO_PASSWORD })).status);
      // express-rate-limit skipSuccessfulRequests: a lab behind one address must not lock itself out.
      expect(statuses).toEqual([200, 200, 200, 200]);
    } finally {
      await limited.stop();
    }
  });
});
