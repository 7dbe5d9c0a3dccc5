import { auditPageSchema, type AuditPage } from '@shared/api/audit';
import { http } from './http';

/** One page of the audit log, newest first. limit 1..200. */
export function listAudit(page: { limit: number; offset: number }): Promise<AuditPage> {
  return http.get('/audit', { query: page, schema: auditPageSchema });
}
