/**
 * Starting a real server for a test file and talking HTTP to it: `start({ port: 0, dataDir })`
 * with an in-memory database (real migrations), bcrypt cost 4 and a generous login limit.
 */
import request from 'supertest';
import { start, type ServerHandle, type StartOptions } from '../../../server/index';

export const DEMO_PASSWORD = 'demo-password-for-tests';
export const EMAILS = {
  admin: 'admin@aftercue.test',
  investigator: 'investigator@aftercue.test',
  experimenter: 'experimenter@aftercue.test',
  reviewer: 'reviewer@aftercue.test',
} as const;

export function startTestServer(opts: StartOptions = {}): Promise<ServerHandle> {
  return start({
    port: 0, dataDir: ':memory:', quiet: true, bcryptCost: 4, demoPassword: DEMO_PASSWORD,
    loginRateLimit: { max: 1000, windowMs: 60_000 }, demoDecoder: false, ...opts,
  });
}

/** A cookie-keeping HTTP client that sends the session's CSRF token on unsafe methods. */
export interface Client {
  agent: request.Agent;
  csrf: string;
  get(path: string): request.Test;
  post(path: string, body?: unknown): request.Test;
  patch(path: string, body?: unknown): request.Test;
  send(method: string, path: string, body?: unknown): request.Test;
  /** Re-reads the CSRF token (after the session ended). */
  refreshCsrf(): Promise<void>;
}

export async function anonymous(h: ServerHandle): Promise<Client> {
  const agent = request.agent(h.url);
  const client: Client = {
    agent,
    csrf: '',
    get: (path) => agent.get(path),
    post: (path, body) => client.send('POST', path, body),
    patch: (path, body) => client.send('PATCH', path, body),
    send: (method, path, body) => {
      const t = agent[method.toLowerCase() as 'post'](path).set('X-CSRF-Token', client.csrf);
      return body === undefined ? t : t.send(body as object);
    },
    refreshCsrf: async () => { client.csrf = (await agent.get('/api/auth/csrf').expect(200)).body.token as string; },
  };
  await client.refreshCsrf();
  return client;
}

export async function signIn(h: ServerHandle, email: string, password = DEMO_PASSWORD): Promise<Client> {
  const c = await anonymous(h);
  await c.post('/api/auth/login', { email, password }).expect(200);
  return c;
}

/** Row count of a table, read straight from SQLite. */
export function countRows(h: ServerHandle, table: string): number {
  return (h.db.sqlite.prepare(`SELECT count(*) AS n FROM ${table}`).get() as { n: number }).n;
}

/** Row counts of every table the foundation owns, to prove a refused request changed nothing. */
export function snapshotCounts(h: ServerHandle): Record<string, number> {
  const tables = ['users', 'studies', 'participants', 'rigs', 'password_tokens', 'mail_outbox', 'audit_log'];
  return Object.fromEntries(tables.map((t) => [t, countRows(h, t)]));
}

/** The token in the newest outbox mail to `to` (the set-password link). */
export function tokenFromLatestMail(h: ServerHandle, to: string): string {
  const row = h.db.sqlite.prepare('SELECT text_body AS text FROM mail_outbox WHERE to_address = ? ORDER BY id DESC LIMIT 1')
    .get(to) as { text: string } | undefined;
  const m = row && /\/set-password\?token=([A-Za-z0-9_-]+)/.exec(row.text);
  if (!m) throw new Error(`no set-password link in a mail to ${to}`);
  return m[1]!;
}
