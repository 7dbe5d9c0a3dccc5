import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ServerHandle } from '../../server/index';
import { verifyRigKey } from '../../server/services/rigs';
import { EMAILS, signIn, startTestServer, type Client } from './helpers/server';

let h: ServerHandle;
let admin: Client;
beforeAll(async () => {
  h = await startTestServer();
  admin = await signIn(h, EMAILS.admin);
});
afterAll(async () => { await h.stop(); });

describe('rigs', () => {
  it('shows the key once at creation and stores only its SHA-256', async () => {
    const res = await admin.post('/api/rigs', { name: 'Booth 2', location: 'Room B.14' });
    // API contract: 201 {rig, rigKey}; key 'rig_' + 32 bytes base64url (43 characters, RFC 4648 §5).
    expect(res.status).toBe(201);
    expect(res.body.rigKey).toMatch(/^rig_[A-Za-z0-9_-]{43}$/);
    expect(res.headers['cache-control']).toBe('no-store');
    const key = res.body.rigKey as string;
    const row = h.db.sqlite.prepare('SELECT * FROM rigs WHERE id = ?').get(res.body.rig.id) as Record<string, unknown>;
    // Foundation issue: store only the SHA-256 of the key.
    expect(row.key_hash).toBe(createHash('sha256').update(key).digest('hex'));
    expect(JSON.stringify(h.db.sqlite.prepare('SELECT * FROM rigs').all())).not.toContain(key.slice(4));
    // The key is never shown again: not in the list, not in the audit log.
    const list = await admin.get('/api/rigs');
    expect(JSON.stringify(list.body)).not.toContain(key);
    expect(list.body.map((r: { name: string }) => r.name)).toEqual(['Booth 2', 'Demo rig']);
    expect(JSON.stringify(h.db.sqlite.prepare('SELECT * FROM audit_log').all())).not.toContain(key.slice(4));
  });

  it('verifies a rig key to its rig, and refuses unknown, malformed or retired keys', async () => {
    const created = (await admin.post('/api/rigs', { name: 'Booth 3' }).expect(201)).body as { rig: { id: number }; rigKey: string };
    // Foundation issue: verifyRigKey(key) -> rig | null, for the feed ingest.
    expect(verifyRigKey(h.db, created.rigKey)?.id).toBe(created.rig.id);
    expect(h.services.rigs.verifyRigKey(created.rigKey)?.lastSeenAt).not.toBeNull();
    expect(verifyRigKey(h.db, created.rigKey.replace(/.$/, (c) => (c === 'A' ? 'B' : 'A')))).toBeNull();
    expect(verifyRigKey(h.db, 'rig_short')).toBeNull();
    expect(verifyRigKey(h.db, '')).toBeNull();
    const retired = await admin.patch(`/api/rigs/${created.rig.id}`, { retired: true });
    expect(retired.body.retired).toBe(true);
    expect(verifyRigKey(h.db, created.rigKey)).toBeNull();
  });

  it('renames and clears the location; refuses a name in use with 409', async () => {
    const { rig } = (await admin.post('/api/rigs', { name: 'Booth 4', location: 'Cellar' }).expect(201)).body as { rig: { id: number } };
    const renamed = await admin.patch(`/api/rigs/${rig.id}`, { name: 'Booth 4b', location: '' });
    // API contract (shared/api/rigs.ts): an empty location clears it.
    expect(renamed.body).toMatchObject({ name: 'Booth 4b', location: null });
    const clash = await admin.patch(`/api/rigs/${rig.id}`, { name: 'Demo rig' });
    expect([clash.status, clash.body.error.code]).toEqual([409, 'duplicate-name']);
    // A missing rig is 404.
    expect((await admin.patch('/api/rigs/9999', { name: 'x' })).status).toBe(404);
  });

  it('writes audit rows for creation and changes', async () => {
    const { rig } = (await admin.post('/api/rigs', { name: 'Booth 5' }).expect(201)).body as { rig: { id: number } };
    await admin.patch(`/api/rigs/${rig.id}`, { location: 'Room 1' }).expect(200);
    const rows = h.db.sqlite.prepare("SELECT action FROM audit_log WHERE target_type = 'rig' AND target_id = ? ORDER BY id")
      .all(String(rig.id)) as { action: string }[];
    // Foundation issue: every state change writes an audit row.
    expect(rows.map((r) => r.action)).toEqual(['rig.create', 'rig.update']);
  });
});
