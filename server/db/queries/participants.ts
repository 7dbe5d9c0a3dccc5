/** SQL for participants (pseudonymous codes; no names exist to store). */
import { and, asc, eq, ne, sql } from 'drizzle-orm';
import type { Db } from '../client';
import { participants, type ParticipantRow } from '../schema';

export type ParticipantValues = Pick<ParticipantRow, 'code' | 'consentStatus' | 'consentDate' | 'notes'>;

export function listParticipants(db: Db, studyId: number): ParticipantRow[] {
  return db.orm.select().from(participants).where(eq(participants.studyId, studyId)).orderBy(asc(participants.code)).all();
}

export function findParticipant(db: Db, studyId: number, id: number): ParticipantRow | undefined {
  return db.orm.select().from(participants)
    .where(and(eq(participants.studyId, studyId), eq(participants.id, id))).get();
}

/** True when another participant of the study has the code (case-insensitive, like the unique index). */
export function codeTaken(db: Db, studyId: number, code: string, exceptId?: number): boolean {
  const sameCode = and(eq(participants.studyId, studyId), sql`lower(${participants.code}) = lower(${code})`);
  const where = exceptId === undefined ? sameCode : and(sameCode, ne(participants.id, exceptId));
  return db.orm.select({ id: participants.id }).from(participants).where(where).get() !== undefined;
}

export function insertParticipant(db: Db, studyId: number, values: ParticipantValues, now: Date): ParticipantRow {
  return db.orm.insert(participants).values({ ...values, studyId, createdAt: now, updatedAt: now }).returning().get();
}

export function updateParticipant(db: Db, id: number, changes: Partial<ParticipantValues>, now: Date): ParticipantRow | undefined {
  return db.orm.update(participants).set({ ...changes, updatedAt: now }).where(eq(participants.id, id)).returning().get();
}
