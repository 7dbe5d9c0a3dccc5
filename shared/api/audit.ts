/** The audit log (admin only): one row per state change, newest first. */
import { z } from 'zod';
import { idSchema, isoTimestampSchema } from './common';

/** One audit row. `details` never holds secrets (no passwords, tokens or rig keys). */
export const auditEntrySchema = z.object({
  id: idSchema,
  at: isoTimestampSchema,
  actorId: idSchema.nullable(),
  actorEmail: z.string().nullable(),
  /** `area.verb`, e.g. `study.create`, `user.invite`, `auth.login`. */
  action: z.string(),
  targetType: z.string(),
  targetId: z.string().nullable(),
  details: z.record(z.string(), z.unknown()),
});
export type AuditEntry = z.infer<typeof auditEntrySchema>;

/** GET /api/audit?limit&offset — limit 1..200 (default 50), offset >= 0 (default 0). */
export const auditQuerySchema = z.object({
  limit: z.coerce.number().int().min(1).max(200).default(50),
  offset: z.coerce.number().int().min(0).default(0),
});
export type AuditQuery = z.infer<typeof auditQuerySchema>;

/** GET /api/audit -> 200. */
export const auditPageSchema = z.object({
  items: z.array(auditEntrySchema),
  total: z.number().int().min(0),
});
export type AuditPage = z.infer<typeof auditPageSchema>;
