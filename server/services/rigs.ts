/**
 * Rigs and their keys. A key is `rig_` + 32 random bytes (base64url), returned once at
 * creation; only its SHA-256 is stored, and verifyRigKey is how a feed proves which rig it is.
 */
import type { CreateRigRequest, CreateRigResponse, Rig, UpdateRigRequest } from '../../shared/api';
import type { Db } from '../db/client';
import { findRigById, findRigByKeyHash, findRigByName, insertRig, listRigs, markRigSeen, updateRig } from '../db/queries/rigs';
import type { RigRow } from '../db/schema';
import type { Actor, AppContext } from '../context';
import { AppError, notFound } from '../errors';
import { writeAudit } from './audit';
import { newToken, sha256Hex } from './passwords';

const RIG_KEY_PATTERN = /^rig_[A-Za-z0-9_-]{43}$/;

export function toRig(r: RigRow): Rig {
  return {
    id: r.id, name: r.name, location: r.location, retired: r.retired, createdAt: r.createdAt.toISOString(),
    lastSeenAt: r.lastSeenAt ? r.lastSeenAt.toISOString() : null,
  };
}

/**
 * The rig a key belongs to, or null for an unknown, malformed or retired rig's key.
 * Records the time as the rig's lastSeenAt.
 */
export function verifyRigKey(db: Db, key: string, now = new Date()): Rig | null {
  if (!RIG_KEY_PATTERN.test(key)) return null;
  const rig = findRigByKeyHash(db, sha256Hex(key));
  if (!rig || rig.retired) return null;
  markRigSeen(db, rig.id, now);
  return toRig({ ...rig, lastSeenAt: now });
}

function duplicateName(): AppError {
  return new AppError('duplicate-name', 'Another rig has this name', 409, { name: 'Already in use' });
}

/** Inserts a rig with a fresh key (no audit; callers write it). */
export function insertRigWithKey(db: Db, input: { name: string; location: string | null }, createdBy: number | null,
                                 now: Date): CreateRigResponse {
  const { token, hash } = newToken('rig_');
  const row = insertRig(db, { name: input.name, location: input.location, keyHash: hash, createdBy }, now);
  return { rig: toRig(row), rigKey: token };
}

export function rigService(ctx: AppContext) {
  const { db } = ctx;
  return {
    list(): Rig[] {
      return listRigs(db).map(toRig);
    },

    create(input: CreateRigRequest, actor: Actor): CreateRigResponse {
      const now = ctx.now();
      return db.transaction(() => {
        if (findRigByName(db, input.name)) throw duplicateName();
        const created = insertRigWithKey(db, { name: input.name, location: input.location || null }, actor.id, now);
        writeAudit(db, actor, { action: 'rig.create', targetType: 'rig', targetId: created.rig.id,
          details: { name: created.rig.name, location: created.rig.location } }, now);
        return created;
      });
    },

    update(rigId: number, input: UpdateRigRequest, actor: Actor): Rig {
      const now = ctx.now();
      return db.transaction(() => {
        if (!findRigById(db, rigId)) throw notFound('Rig');
        const other = input.name !== undefined ? findRigByName(db, input.name) : undefined;
        if (other && other.id !== rigId) throw duplicateName();
        const changes = { ...input, ...(input.location !== undefined ? { location: input.location || null } : {}) };
        const row = updateRig(db, rigId, changes, now)!;
        writeAudit(db, actor, { action: 'rig.update', targetType: 'rig', targetId: rigId, details: { changes } }, now);
        return toRig(row);
      });
    },

    verifyRigKey(key: string): Rig | null {
      return verifyRigKey(db, key, ctx.now());
    },
  };
}
export type RigService = ReturnType<typeof rigService>;
