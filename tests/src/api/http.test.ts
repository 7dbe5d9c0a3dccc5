import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { ApiError, http, resetCsrfToken, setUnauthorizedHandler } from '../../../src/api/http';
import { fakeServer } from '../helpers/fake-server';

describe('the http layer', () => {
  beforeEach(() => {
    resetCsrfToken();
  });
  afterEach(() => {
    setUnauthorizedHandler(null);
    vi.unstubAllGlobals();
  });

  it('fetches the CSRF token once and sends it on every state-changing request', async () => {
    const server = fakeServer({
      'POST /api/rigs': { status: 201, body: { ok: 1 } },
      'PATCH /api/rigs/1': { status: 200, body: { ok: 2 } },
      'GET /api/rigs': { status: 200, body: [] },
    });
    await http.get('/rigs');
    await http.post('/rigs', { name: 'Booth 1' });
    await http.patch('/rigs/1', { retired: true });
    // API contract (shared/api/auth.ts): POST/PUT/PATCH/DELETE carry X-CSRF-Token from GET /api/auth/csrf.
    expect(server.sent.filter((r) => r.path === '/api/auth/csrf')).toHaveLength(1);
    expect(server.sent.find((r) => r.method === 'GET' && r.path === '/api/rigs')?.headers['x-csrf-token']).toBeUndefined();
    expect(server.sent.filter((r) => r.method !== 'GET').map((r) => r.headers['x-csrf-token'])).toEqual(['csrf-1', 'csrf-1']);
    expect(server.sent.find((r) => r.method === 'POST')?.body).toEqual({ name: 'Booth 1' });
  });

  it('on a stale token it fetches a fresh one and retries once', async () => {
    let tokens = 0;
    const server = fakeServer({
      'GET /api/auth/csrf': () => ({ status: 200, body: { token: `t${++tokens}` } }),
      'POST /api/studies/3/archive': (req) => (req.headers['x-csrf-token'] === 't2'
        ? { status: 200, body: { archived: true } }
        : { status: 403, body: { error: { code: 'csrf', message: 'Stale token' } } }),
    });
    const result = await http.post('/studies/3/archive');
    // shared/api/auth.ts: "on a 403 'csrf' a client fetches a fresh token and retries once".
    expect(result).toEqual({ archived: true });
    expect(server.sent.filter((r) => r.method === 'POST').map((r) => r.headers['x-csrf-token'])).toEqual(['t1', 't2']);
  });

  it('turns an error body into an ApiError with code, message, fields and status', async () => {
    fakeServer({
      'POST /api/users/invitations': {
        status: 400,
        body: { error: { code: 'validation', message: 'Check the fields', fields: { email: 'Enter a valid e-mail address' } } },
      },
    });
    // Error shape: shared/api/errors.ts apiErrorBodySchema.
    const err = await http.post('/users/invitations', { email: 'x' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ApiError);
    expect(err).toMatchObject({ code: 'validation', message: 'Check the fields', status: 400, fields: { email: 'Enter a valid e-mail address' } });
  });

  it('reports a non-JSON failure by its status', async () => {
    vi.stubGlobal('fetch', vi.fn(async () => new Response('Bad gateway', { status: 502, statusText: 'Bad Gateway' })));
    const err = await http.get('/studies').catch((e: unknown) => e);
    expect(err).toMatchObject({ code: 'http-502', status: 502 });
  });

  it('calls the unauthorized handler on a 401 outside /auth', async () => {
    fakeServer({
      'GET /api/studies': { status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in' } } },
      'GET /api/auth/me': { status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in' } } },
    });
    const seen: string[] = [];
    setUnauthorizedHandler((path) => seen.push(path));
    await http.get('/auth/me').catch(() => undefined);
    await http.get('/studies').catch(() => undefined);
    expect(seen).toEqual(['/studies']);
  });

  it('rejects a response that does not match its schema', async () => {
    fakeServer({ 'GET /api/health': { status: 200, body: { status: 'down' } } });
    const schema = { parse: (d: unknown) => { if ((d as { status?: unknown }).status !== 'ok') throw new Error('bad'); return d; } };
    const err = await http.get('/health', { schema }).catch((e: unknown) => e);
    expect(err).toMatchObject({ code: 'bad-response' });
  });
});
