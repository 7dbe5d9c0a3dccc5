/** An express-session Store over the login_sessions table (one JSON row per session). */
import session from 'express-session';
import type { Db } from '../db/client';
import {
  clearSessions, countSessions, deleteExpiredSessions, deleteSession, getSession, touchSession, upsertSession,
} from '../db/queries/sessions';

type Callback = (err?: unknown) => void;

export class SqliteSessionStore extends session.Store {
  constructor(private readonly db: Db, private readonly defaultMaxAgeMs: number) {
    super();
  }

  private expiresOf(sess: session.SessionData): number {
    const exp = sess.cookie?.expires;
    return exp ? new Date(exp).getTime() : Date.now() + this.defaultMaxAgeMs;
  }

  override get(sid: string, cb: (err: unknown, session?: session.SessionData | null) => void): void {
    try {
      const raw = getSession(this.db, sid, Date.now());
      cb(null, raw ? JSON.parse(raw) as session.SessionData : null);
    } catch (err) { cb(err); }
  }

  override set(sid: string, sess: session.SessionData, cb?: Callback): void {
    try { upsertSession(this.db, sid, JSON.stringify(sess), this.expiresOf(sess)); cb?.(); } catch (err) { cb?.(err); }
  }

  override touch(sid: string, sess: session.SessionData, cb?: Callback): void {
    try { touchSession(this.db, sid, this.expiresOf(sess)); cb?.(); } catch (err) { cb?.(err); }
  }

  override destroy(sid: string, cb?: Callback): void {
    try { deleteSession(this.db, sid); cb?.(); } catch (err) { cb?.(err); }
  }

  override clear(cb?: Callback): void {
    try { clearSessions(this.db); cb?.(); } catch (err) { cb?.(err); }
  }

  override length(cb: (err: unknown, length?: number) => void): void {
    try { cb(null, countSessions(this.db, Date.now())); } catch (err) { cb(err); }
  }

  /** Deletes expired rows; returns how many. */
  prune(): number {
    return deleteExpiredSessions(this.db, Date.now());
  }
}
