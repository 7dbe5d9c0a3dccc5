/**
 * SQL for pilot sessions (the `sessions.ts` beside this file holds the login sessions), their
 * trials, events and one-time display tokens. Live writes (trials, events, counters) go through
 * the live store (queries/feed.ts); these are the main thread's reads and lifecycle updates.
 */
import { and, asc, desc, eq, inArray, isNull, max, sql } from 'drizzle-orm';
import type { Db } from '../client';
import {
  decoders, displayTokens, embeddedRigs, participants, pilotSessions, rigs, sessionEvents, studies, trials,
  type DecoderRow, type PilotSessionRow, type SessionEventRow, type TrialRow,
} from '../schema';
import type { SessionStatus } from '../../../shared/api';

/** A session row with the names lists show. */
export interface SessionWithNames extends PilotSessionRow {
  studyName: string;
  participantCode: string;
  rigName: string;
  decoderName: string;
  decoderSha256: string;
}

const withNames = {
  session: pilotSessions,
  studyName: studies.name,
  participantCode: participants.code,
  rigName: rigs.name,
  decoderName: decoders.name,
  decoderSha256: decoders.sha256,
};

function joined(db: Db) {
  return db.orm.select(withNames).from(pilotSessions)
    .innerJoin(studies, eq(studies.id, pilotSessions.studyId))
    .innerJoin(participants, eq(participants.id, pilotSessions.participantId))
    .innerJoin(rigs, eq(rigs.id, pilotSessions.rigId))
    .innerJoin(decoders, eq(decoders.id, pilotSessions.decoderId));
}

function flatten(r: { session: PilotSessionRow; studyName: string; participantCode: string; rigName: string; decoderName: string;
  decoderSha256: string }): SessionWithNames {
  const { session, ...names } = r;
  return { ...session, ...names };
}

export function listPilotSessions(db: Db, studyId?: number): SessionWithNames[] {
  const q = joined(db);
  const rows = (studyId === undefined ? q : q.where(eq(pilotSessions.studyId, studyId))).orderBy(desc(pilotSessions.id)).all();
  return rows.map(flatten);
}

export function findPilotSession(db: Db, id: number): SessionWithNames | undefined {
  const r = joined(db).where(eq(pilotSessions.id, id)).get();
  return r && flatten(r);
}

/** Sessions of a rig that are not stopped. */
export function activeSessionsOfRig(db: Db, rigId: number): PilotSessionRow[] {
  return db.orm.select().from(pilotSessions)
    .where(and(eq(pilotSessions.rigId, rigId), inArray(pilotSessions.status, ['ready', 'running', 'paused']))).all();
}

/** Every session that was left running or paused (by a server that stopped). */
export function unfinishedSessions(db: Db): PilotSessionRow[] {
  return db.orm.select().from(pilotSessions).where(inArray(pilotSessions.status, ['running', 'paused'])).all();
}

export function insertPilotSession(db: Db, v: { studyId: number; participantId: number; rigId: number; decoderId: number; notes: string;
  createdBy: number }, now: Date): PilotSessionRow {
  return db.orm.insert(pilotSessions).values({ ...v, createdAt: now }).returning().get();
}

export function updatePilotSession(db: Db, id: number, changes: Partial<Pick<PilotSessionRow, 'status' | 'feedId' | 'startSample' |
  'stopSample' | 'startedAt' | 'stoppedAt'>>): void {
  db.orm.update(pilotSessions).set(changes).where(eq(pilotSessions.id, id)).run();
}

export function setSessionStatus(db: Db, id: number, status: SessionStatus): void {
  db.orm.update(pilotSessions).set({ status }).where(eq(pilotSessions.id, id)).run();
}

export function findDecoder(db: Db, id: number): DecoderRow | undefined {
  return db.orm.select().from(decoders).where(eq(decoders.id, id)).get();
}

/** The simulation profile of an embedded rig, or null for a rig a remote bridge serves. */
export function embeddedProfileOf(db: Db, rigId: number): string | null {
  return db.orm.select().from(embeddedRigs).where(eq(embeddedRigs.rigId, rigId)).get()?.profile ?? null;
}

export function markRigEmbedded(db: Db, rigId: number, profile: string): void {
  db.orm.insert(embeddedRigs).values({ rigId, profile }).onConflictDoNothing().run();
}

export function listTrials(db: Db, sessionId: number): TrialRow[] {
  return db.orm.select().from(trials).where(eq(trials.sessionId, sessionId)).orderBy(asc(trials.sampleIndex), asc(trials.id)).all();
}

export function findTrial(db: Db, sessionId: number, trialId: number): TrialRow | undefined {
  return db.orm.select().from(trials).where(and(eq(trials.sessionId, sessionId), eq(trials.id, trialId))).get();
}

export function updateTrial(db: Db, trialId: number, changes: { markedBad?: boolean; note?: string | null }): TrialRow | undefined {
  return db.orm.update(trials).set(changes).where(eq(trials.id, trialId)).returning().get();
}

/** Trial counts of a session from the stored rows (flags as stored). */
export function trialCounts(db: Db, sessionId: number): { trials: number; scored: number; correct: number; flagged: number;
  markedBad: number } {
  const r = db.orm.select({
    trials: sql<number>`count(*)`,
    flagged: sql<number>`coalesce(sum(${trials.flags} <> '[]'), 0)`,
    markedBad: sql<number>`coalesce(sum(${trials.markedBad}), 0)`,
    scored: sql<number>`coalesce(sum(${trials.flags} = '[]' and ${trials.markedBad} = 0 and ${trials.trueClass} is not null), 0)`,
    correct: sql<number>`coalesce(sum(${trials.flags} = '[]' and ${trials.markedBad} = 0 and ${trials.trueClass} = ${trials.predictedClass}), 0)`,
  }).from(trials).where(eq(trials.sessionId, sessionId)).get();
  return { trials: r?.trials ?? 0, scored: r?.scored ?? 0, correct: r?.correct ?? 0, flagged: r?.flagged ?? 0, markedBad: r?.markedBad ?? 0 };
}

export function listEvents(db: Db, sessionId: number): SessionEventRow[] {
  return db.orm.select().from(sessionEvents).where(eq(sessionEvents.sessionId, sessionId)).orderBy(asc(sessionEvents.id)).all();
}

/** Largest trial and event ids so far (0 when none): the live engine hands out ids after them. */
export function maxLiveIds(db: Db): { trial: number; event: number } {
  const t = db.orm.select({ m: max(trials.id) }).from(trials).get()?.m ?? 0;
  const e = db.orm.select({ m: max(sessionEvents.id) }).from(sessionEvents).get()?.m ?? 0;
  return { trial: t, event: e };
}

export function insertDisplayToken(db: Db, v: { sessionId: number; tokenHash: string; expiresAt: Date; createdBy: number }, now: Date): void {
  db.orm.insert(displayTokens).values({ ...v, createdAt: now }).run();
}

/**
 * Marks an unused, unexpired token used and returns its session id; null when the token is
 * unknown, used or expired (one use only: the update and the check are one statement).
 */
export function useDisplayToken(db: Db, tokenHash: string, now: Date): number | null {
  const row = db.orm.update(displayTokens).set({ usedAt: now })
    .where(and(eq(displayTokens.tokenHash, tokenHash), isNull(displayTokens.usedAt), sql`${displayTokens.expiresAt} > ${now.getTime()}`))
    .returning({ sessionId: displayTokens.sessionId }).get();
  return row?.sessionId ?? null;
}
