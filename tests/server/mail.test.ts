import { createServer, type AddressInfo } from 'node:net';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ServerHandle } from '../../server/index';
import { EMAILS, signIn, startTestServer } from './helpers/server';

describe('mail through the in-process SMTP server', () => {
  let h: ServerHandle;
  beforeAll(async () => { h = await startTestServer(); });
  afterAll(async () => { await h.stop(); });

  it('stores what it receives over SMTP in the outbox, text and HTML', async () => {
    // DESIGN.md: an in-process SMTP server stands in for the lab's relay, on 127.0.0.1.
    expect(h.mail.smtpPort).toBeGreaterThan(0);
    await h.mail.sendMail({ to: 'pi@lab.example', subject: 'Report ready', text: 'See attached numbers: 0.81', html: '<p>0.81</p>' });
    const admin = await signIn(h, EMAILS.admin);
    const [latest] = (await admin.get('/api/outbox')).body as { id: number }[];
    const full = (await admin.get(`/api/outbox/${latest!.id}`)).body;
    // API contract (shared/api/outbox.ts): from, to, subject, text, html?, receivedAt.
    expect(full).toMatchObject({ to: 'pi@lab.example', subject: 'Report ready', text: 'See attached numbers: 0.81',
      html: '<p>0.81</p>', transport: 'in-process' });
    expect(full.from).toContain('aftercue@localhost');
    expect(Date.parse(full.receivedAt)).toBeGreaterThan(Date.now() - 60_000);
  });

  it('leaves html out when a message has none, and answers 404 for an unknown message', async () => {
    await h.mail.sendMail({ to: 'plain@lab.example', subject: 'Plain', text: 'Only text' });
    const admin = await signIn(h, EMAILS.admin);
    const [latest] = (await admin.get('/api/outbox')).body as { id: number }[];
    const full = (await admin.get(`/api/outbox/${latest!.id}`)).body;
    expect('html' in full).toBe(false);
    expect((await admin.get('/api/outbox/99999')).status).toBe(404);
  });
});

describe('mail through a real relay (AFTERCUE_SMTP_URL)', () => {
  const received: { to: string; subject: string }[] = [];
  let relay: SMTPServer;
  let h: ServerHandle;
  beforeAll(async () => {
    relay = new SMTPServer({
      authOptional: true, disabledCommands: ['STARTTLS'], logger: false,
      onData(stream, _s, cb) {
        simpleParser(stream).then((m) => {
          received.push({ to: Array.isArray(m.to) ? m.to[0]!.text : m.to?.text ?? '', subject: m.subject ?? '' });
          cb();
        }, cb);
      },
    });
    await new Promise<void>((r) => relay.listen(0, '127.0.0.1', () => r()));
    const port = (relay.server.address() as AddressInfo).port;
    h = await startTestServer({ smtpUrl: `smtp://127.0.0.1:${port}`, mailFrom: 'Lab EEG <eeg@lab.example>' });
  });
  afterAll(async () => {
    await h.stop();
    await new Promise<void>((r) => relay.close(() => r()));
  });

  it('sends to the relay, runs no SMTP server of its own, and records the message as relayed', async () => {
    // Foundation issue: with AFTERCUE_SMTP_URL set, no in-process SMTP server.
    expect(h.mail.smtpPort).toBeNull();
    const admin = await signIn(h, EMAILS.admin);
    await admin.post('/api/users/invitations', { email: 'new@lab.example', displayName: 'New', role: 'reviewer' }).expect(201);
    // The relay got the invitation over SMTP.
    expect(received).toEqual([{ to: 'new@lab.example', subject: 'Your Aftercue invitation' }]);
    const [row] = (await admin.get('/api/outbox')).body as { to: string; from: string; transport: string }[];
    expect(row).toMatchObject({ to: 'new@lab.example', from: 'Lab EEG <eeg@lab.example>', transport: 'relay' });
  });
});

describe('when the mail cannot be sent', () => {
  it('undoes the invitation and answers 502 mail-failed', async () => {
    // A relay URL on a port that was just free: bind port 0, note the port, close it.
    const probe = createServer();
    await new Promise<void>((r) => probe.listen(0, '127.0.0.1', () => r()));
    const closedPort = (probe.address() as AddressInfo).port;
    await new Promise<void>((r) => probe.close(() => r()));
    const h = await startTestServer({ smtpUrl: `smtp://127.0.0.1:${closedPort}` });
    try {
      const admin = await signIn(h, EMAILS.admin);
      const users = (h.db.sqlite.prepare('SELECT count(*) AS n FROM users').get() as { n: number }).n;
      const res = await admin.post('/api/users/invitations', { email: 'lost@lab.example', displayName: 'Lost', role: 'reviewer' });
      expect([res.status, res.body.error.code]).toEqual([502, 'mail-failed']);
      expect((h.db.sqlite.prepare('SELECT count(*) AS n FROM users').get() as { n: number }).n).toBe(users);
      expect((h.db.sqlite.prepare('SELECT count(*) AS n FROM password_tokens').get() as { n: number }).n).toBe(0);
    } finally {
      await h.stop();
    }
  });
});
