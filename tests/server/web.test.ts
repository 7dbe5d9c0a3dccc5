import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ServerHandle } from '../../server/index';
import { startTestServer } from './helpers/server';

const INDEX = '<!doctype html><html><head><script type="module" src="/assets/app-1234.js"></script></head><body></body></html>';

describe('serving the built client', () => {
  let h: ServerHandle;
  let dir: string;
  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'aftercue-client-'));
    mkdirSync(join(dir, 'assets'));
    writeFileSync(join(dir, 'index.html'), INDEX);
    writeFileSync(join(dir, 'assets', 'app-1234.js'), 'console.log(1)');
    h = await startTestServer({ clientDir: dir });
  });
  afterAll(async () => {
    await h.stop();
    rmSync(dir, { recursive: true, force: true });
  });

  it('answers a deep link with index.html (history fallback), not cached', async () => {
    const res = await request(h.url).get('/studies/1/participants').set('Accept', 'text/html');
    // Foundation issue: SPA history fallback for non-/api GET paths.
    expect(res.status).toBe(200);
    expect(res.text).toBe(INDEX);
    expect(res.headers['cache-control']).toBe('no-cache');
  });

  it('serves hashed assets with long caching, and 404 for a missing one', async () => {
    const res = await request(h.url).get('/assets/app-1234.js');
    expect(res.status).toBe(200);
    expect(res.headers['cache-control']).toMatch(/max-age=31536000, immutable/);
    // A missing asset must not fall back to index.html (a browser would run HTML as a script).
    const missing = await request(h.url).get('/assets/gone.js');
    expect([missing.status, missing.body.error?.code]).toEqual([404, 'not-found']);
  });

  it('keeps /api unknown paths as 404 JSON, never index.html', async () => {
    const res = await request(h.url).get('/api/unknown').set('Accept', 'text/html');
    // Foundation issue: /api/* unknown -> 404 JSON.
    expect([res.status, res.body.error.code]).toEqual([404, 'not-found']);
  });

  it('sends a CSP that allows our scripts, inline styles and our own WebSockets only', async () => {
    const res = await request(h.url).get('/');
    const csp = String(res.headers['content-security-policy']);
    // Foundation issue: self scripts, inline styles (Element Plus style attributes), ws: connect-src self.
    expect(csp).toContain("script-src 'self'");
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
    expect(csp).toContain("style-src 'self' 'unsafe-inline'");
    expect(csp).toContain(`connect-src 'self' ws://${new URL(h.url).host}`);
    expect(csp).toContain("object-src 'none'");
    // helmet defaults: no sniffing; no HSTS on plain http.
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['strict-transport-security']).toBeUndefined();
  });
});

describe('without a built client', () => {
  it('answers every unknown path with 404 JSON and leaves WebSocket upgrades to later routes', async () => {
    const h = await startTestServer({ clientDir: join(tmpdir(), 'aftercue-no-client-here') });
    try {
      const res = await request(h.url).get('/studies');
      expect([res.status, res.body.error.code]).toEqual([404, 'not-found']);
      // Foundation issue: no catch-all upgrade handling; server/ws/ attaches its own, one handler for /ws/* (issue 6).
      expect(h.httpServer.listenerCount('upgrade')).toBe(1);
    } finally {
      await h.stop();
    }
  });
});

describe('behind an HTTPS reverse proxy (public URL https)', () => {
  it('marks the session cookie Secure and sends HSTS', async () => {
    const h = await startTestServer({ publicUrl: 'https://eeg.lab.example' });
    try {
      const agent = request.agent(h.url);
      const csrf = await agent.get('/api/auth/csrf').set('X-Forwarded-Proto', 'https');
      const cookie = (csrf.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('aftercue.sid='))!;
      // Foundation issue: cookies secure when publicUrl is https (the proxy on loopback is trusted for the scheme).
      expect(cookie).toMatch(/; Secure/);
      expect(csrf.headers['strict-transport-security']).toMatch(/max-age=15552000/);
    } finally {
      await h.stop();
    }
  });
});
