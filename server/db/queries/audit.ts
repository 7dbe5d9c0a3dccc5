/** SQL for the audit log. */
import { desc, sql } from 'drizzle-orm';
import type { Db } from '../client';
import { auditLog, type AuditRow } from '../schema';

export interface NewAuditRow {
  actorId: number | null;
  actorEmail: string | null;
  action: string;
  targetType: string;
  targetId: string | null;
  details: Record<string, unknown>;
}

export function insertAudit(db: Db, row: NewAuditRow, at: Date): void {
  db.orm.insert(auditLog).values({ ...row, at }).run();
}

export function listAudit(db: Db, limit: number, offset: number): { items: AuditRow[]; total: number } {
  const items = db.orm.select().from(auditLog).orderBy(desc(auditLog.at), desc(auditLog.id)).limit(limit).offset(offset).all();
  const total = db.orm.select({ n: sql<number>`count(*)` }).from(auditLog).get()?.n ?? 0;
  return { items, total };
}
