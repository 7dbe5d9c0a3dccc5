/** SQL for express-session rows (login_sessions). */
import { eq, lt, sql } from 'drizzle-orm';
import type { Db } from '../client';
import { loginSessions } from '../schema';

export function getSession(db: Db, sid: string, nowMs: number): string | undefined {
  const row = db.orm.select().from(loginSessions).where(eq(loginSessions.sid, sid)).get();
  return row && row.expires > nowMs ? row.sess : undefined;
}

export function upsertSession(db: Db, sid: string, sess: string, expires: number): void {
  db.orm.insert(loginSessions).values({ sid, sess, expires })
    .onConflictDoUpdate({ target: loginSessions.sid, set: { sess, expires } }).run();
}

export function touchSession(db: Db, sid: string, expires: number): void {
  db.orm.update(loginSessions).set({ expires }).where(eq(loginSessions.sid, sid)).run();
}

export function deleteSession(db: Db, sid: string): void {
  db.orm.delete(loginSessions).where(eq(loginSessions.sid, sid)).run();
}

export function deleteExpiredSessions(db: Db, nowMs: number): number {
  return db.orm.delete(loginSessions).where(lt(loginSessions.expires, nowMs)).run().changes;
}

/** Signs a user out everywhere: removes every session whose passport user is `userId`. */
export function deleteSessionsOfUser(db: Db, userId: number): number {
  return db.orm.delete(loginSessions)
    .where(sql`json_extract(${loginSessions.sess}, '$.passport.user') = ${userId}`).run().changes;
}

export function clearSessions(db: Db): void {
  db.orm.delete(loginSessions).run();
}

export function countSessions(db: Db, nowMs: number): number {
  return db.orm.select({ n: sql<number>`count(*)` }).from(loginSessions)
    .where(sql`${loginSessions.expires} > ${nowMs}`).get()?.n ?? 0;
}
