/** SQL for rigs. */
import { asc, eq } from 'drizzle-orm';
import type { Db } from '../client';
import { rigs, type RigRow } from '../schema';

export function listRigs(db: Db): RigRow[] {
  return db.orm.select().from(rigs).orderBy(asc(rigs.name)).all();
}

export function findRigById(db: Db, id: number): RigRow | undefined {
  return db.orm.select().from(rigs).where(eq(rigs.id, id)).get();
}

export function findRigByName(db: Db, name: string): RigRow | undefined {
  return db.orm.select().from(rigs).where(eq(rigs.name, name)).get();
}

export function findRigByKeyHash(db: Db, keyHash: string): RigRow | undefined {
  return db.orm.select().from(rigs).where(eq(rigs.keyHash, keyHash)).get();
}

export function insertRig(db: Db, r: { name: string; location: string | null; keyHash: string; createdBy: number | null },
                          now: Date): RigRow {
  return db.orm.insert(rigs).values({ ...r, retired: false, createdAt: now, updatedAt: now }).returning().get();
}

export function updateRig(db: Db, id: number, changes: { name?: string; location?: string | null; retired?: boolean },
                          now: Date): RigRow | undefined {
  return db.orm.update(rigs).set({ ...changes, updatedAt: now }).where(eq(rigs.id, id)).returning().get();
}

export function markRigSeen(db: Db, id: number, now: Date): void {
  db.orm.update(rigs).set({ lastSeenAt: now }).where(eq(rigs.id, id)).run();
}
