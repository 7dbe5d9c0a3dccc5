import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ServerHandle } from '../../server/index';
import { EMAILS, signIn, snapshotCounts, startTestServer, type Client } from './helpers/server';

let h: ServerHandle;
let admin: Client;
beforeAll(async () => {
  h = await startTestServer();
  admin = await signIn(h, EMAILS.admin);
});
afterAll(async () => { await h.stop(); });

/** Sends the request and checks the status, the error code, and that no table changed. */
async function refusedWithoutChange(send: () => Promise<{ status: number; body: { error?: { code: string } } }>,
                                    status: number, code: string): Promise<void> {
  const before = snapshotCounts(h);
  const res = await send();
  expect([res.status, res.body.error?.code]).toEqual([status, code]);
  expect(snapshotCounts(h)).toEqual(before);
}

describe('bad input gives 4xx and changes nothing', () => {
  it('malformed JSON -> 400 invalid-json', async () => {
    // Foundation issue: malformed JSON -> 400 'invalid-json'.
    await refusedWithoutChange(() => admin.agent.post('/api/studies').set('X-CSRF-Token', admin.csrf)
      .set('Content-Type', 'application/json').send('{"name": "x",'), 400, 'invalid-json');
  });

  it('a body over 100 kB -> 413', async () => {
    const description = 'x'.repeat(101 * 1024);
    // Foundation issue: body over the limit (100 kB) -> 413 (RFC 9110 §15.5.14 Content Too Large).
    await refusedWithoutChange(() => admin.post('/api/studies', { name: 'Big', description }), 413, 'payload-too-large');
  });

  it('a body that is not an object -> 400 validation on the form', async () => {
    const res = await admin.agent.post('/api/users/invitations').set('X-CSRF-Token', admin.csrf)
      .set('Content-Type', 'application/json').send('[1,2]');
    // API contract (shared/api/errors.ts): whole-body problems are reported under '_form'.
    expect([res.status, Object.keys(res.body.error.fields)]).toEqual([400, ['_form']]);
  });

  it('missing and wrong-typed fields -> 400 with one message per field', async () => {
    await refusedWithoutChange(() => admin.post('/api/users/invitations', { email: 42 }), 400, 'validation');
    const res = await admin.post('/api/users/invitations', { email: 'not-an-address', role: 'admin' });
    // Foundation issue: zod failures -> fields {path: message}.
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['displayName', 'email']);
  });

  it('an unknown role -> 400 naming role', async () => {
    await refusedWithoutChange(() => admin.post('/api/users/invitations', { email: 'x@lab.example', displayName: 'X', role: 'superuser' }),
      400, 'validation');
    const res = await admin.patch('/api/users/4', { role: 'owner' });
    expect(Object.keys(res.body.error.fields)).toEqual(['role']);
  });

  it('a duplicate e-mail address -> 409', async () => {
    await refusedWithoutChange(() => admin.post('/api/users/invitations', { email: ` ${EMAILS.investigator.toUpperCase()} `,
      displayName: 'Dup', role: 'reviewer' }), 409, 'duplicate-email');
  });

  it('an empty change -> 400', async () => {
    await refusedWithoutChange(() => admin.patch('/api/studies/1', {}), 400, 'validation');
    await refusedWithoutChange(() => admin.patch('/api/rigs/1', {}), 400, 'validation');
  });

  it('a wrong query parameter -> 400', async () => {
    await refusedWithoutChange(() => admin.get('/api/audit?limit=0'), 400, 'validation');
    await refusedWithoutChange(() => admin.get('/api/studies?includeArchived=yes'), 400, 'validation');
  });

  it('an unknown /api path -> 404 JSON', async () => {
    await refusedWithoutChange(() => admin.get('/api/nothing-here'), 404, 'not-found');
    await refusedWithoutChange(() => admin.post('/api/studies/1/unknown', {}), 404, 'not-found');
  });

  it('a form-encoded body is not read as fields', async () => {
    await refusedWithoutChange(() => admin.agent.post('/api/rigs').set('X-CSRF-Token', admin.csrf).type('form').send('name=Sneaky'),
      400, 'validation');
  });
});
