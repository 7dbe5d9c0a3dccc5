import { vi } from 'vitest';

/** One recorded request: what the client sent through fetch. */
export interface SentRequest {
  method: string;
  path: string;
  headers: Record<string, string>; // names lower-cased
  body: unknown;
}

type Reply = { status: number; body?: unknown } | ((req: SentRequest) => { status: number; body?: unknown });

/**
 * A stand-in for the API behind `fetch`: answers `METHOD /path` (query string ignored) from a
 * table, records every request, and answers 404 with the API's error shape otherwise.
 * GET /api/auth/csrf answers a fixed token unless the table overrides it.
 */
export function fakeServer(table: Record<string, Reply>) {
  const sent: SentRequest[] = [];
  const routes: Record<string, Reply> = { 'GET /api/auth/csrf': { status: 200, body: { token: 'csrf-1' } }, ...table };
  const fetchMock = vi.fn(async (input: RequestInfo | URL, init: RequestInit = {}) => {
    const url = new URL(String(input), 'http://localhost');
    const headers: Record<string, string> = {};
    new Headers(init.headers).forEach((v, k) => {
      headers[k.toLowerCase()] = v;
    });
    const req: SentRequest = {
      method: (init.method ?? 'GET').toUpperCase(),
      path: url.pathname,
      headers,
      body: typeof init.body === 'string' ? JSON.parse(init.body) : undefined,
    };
    sent.push(req);
    const route = routes[`${req.method} ${req.path}`];
    const reply = typeof route === 'function' ? route(req) : route ?? { status: 404, body: { error: { code: 'not-found', message: 'Not found' } } };
    const text = reply.body === undefined ? '' : JSON.stringify(reply.body);
    return new Response(text || null, { status: reply.status, headers: text ? { 'content-type': 'application/json' } : {} });
  });
  vi.stubGlobal('fetch', fetchMock);
  return { sent, fetchMock };
}

/**
 * Let pending promises and Vue's render queue settle. Element Plus shows a form item's error
 * after a 100 ms debounce, hence the default wait.
 */
export async function settle(ms = 150): Promise<void> {
  for (let i = 0; i < 5; i++) await new Promise((r) => setTimeout(r, 0));
  await new Promise((r) => setTimeout(r, ms));
}
