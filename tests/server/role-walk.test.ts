import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Role } from '../../shared/api';
import type { ServerHandle } from '../../server/index';
import { ROUTES, registeredApiRoutes, type RouteCase } from './helpers/routes';
import { anonymous, EMAILS, signIn, snapshotCounts, startTestServer, type Client } from './helpers/server';

let h: ServerHandle;
beforeAll(async () => { h = await startTestServer(); });
afterAll(async () => { await h.stop(); });

type Caller = Role | 'none';
const CALLERS: Caller[] = ['none', 'admin', 'investigator', 'experimenter', 'reviewer'];

function expected(route: RouteCase, caller: Caller): 'unauthenticated' | 'forbidden' | 'through' {
  if (route.access === 'public') return 'through';
  if (caller === 'none') return 'unauthenticated';
  if (route.access === 'signed-in') return 'through';
  return route.access.includes(caller) ? 'through' : 'forbidden';
}

async function clientFor(caller: Caller): Promise<Client> {
  return caller === 'none' ? anonymous(h) : signIn(h, EMAILS[caller]);
}

describe('the role walk', () => {
  it('lists every registered API route in the table, and no route the app lacks', () => {
    const registered = registeredApiRoutes(h.app);
    const table = [...new Set(ROUTES.map((r) => `${r.method} ${r.pattern}`))].sort();
    // Source: the foundation issue ("fails if any route is missing from the table").
    expect(registered).toEqual(table);
  });

  it.each(CALLERS)('answers 401 / 403 / neither on every route as the table says, for caller %s', async (caller) => {
    let c = await clientFor(caller);
    const before = snapshotCounts(h);
    const wrong: string[] = [];
    for (const route of ROUTES) {
      const res = await c.send(route.method, route.sample, route.body);
      const want = expected(route, caller);
      const got = res.status === 401 ? 'unauthenticated' : res.status === 403 ? 'forbidden' : 'through';
      if (got !== want) wrong.push(`${route.method} ${route.sample}: expected ${want}, got ${res.status} ${JSON.stringify(res.body)}`);
      if (res.status !== 204 && !/application\/json/.test(String(res.headers['content-type']))) {
        wrong.push(`${route.method} ${route.sample}: answer is not JSON (${String(res.headers['content-type'])})`);
      }
      if (route.endsSession) c = await clientFor(caller);
    }
    // Source: the foundation issue's permission list, written out role by role in helpers/routes.ts.
    expect(wrong).toEqual([]);
    const after = snapshotCounts(h);
    // Common practice: a walk with empty bodies and missing ids must change no data (audit rows of sign-ins aside).
    expect({ ...after, audit_log: 0 }).toEqual({ ...before, audit_log: 0 });
  });
});
