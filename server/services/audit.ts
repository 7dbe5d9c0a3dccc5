/** The audit trail: every state change writes one row; admins read it newest first. */
import type { AuditPage, AuditQuery } from '../../shared/api';
import type { Db } from '../db/client';
import { insertAudit, listAudit } from '../db/queries/audit';
import type { Actor, AppContext } from '../context';

export interface AuditEvent {
  action: string;
  targetType: string;
  targetId?: number | string | null;
  /** Never secrets: no passwords, tokens, hashes or rig keys. */
  details?: Record<string, unknown>;
}

/** Writes one audit row. `actor` null for the system or an anonymous caller (then `actorEmail` may name who tried). */
export function writeAudit(db: Db, actor: Actor | null, event: AuditEvent, at: Date, actorEmail?: string): void {
  insertAudit(db, {
    actorId: actor?.id ?? null,
    actorEmail: actor?.email ?? actorEmail ?? null,
    action: event.action,
    targetType: event.targetType,
    targetId: event.targetId == null ? null : String(event.targetId),
    details: event.details ?? {},
  }, at);
}

export function auditService(ctx: AppContext) {
  return {
    list(q: AuditQuery): AuditPage {
      const { items, total } = listAudit(ctx.db, q.limit, q.offset);
      return {
        total,
        items: items.map((r) => ({
          id: r.id, at: r.at.toISOString(), actorId: r.actorId, actorEmail: r.actorEmail, action: r.action,
          targetType: r.targetType, targetId: r.targetId, details: r.details,
        })),
      };
    },
  };
}
export type AuditService = ReturnType<typeof auditService>;
