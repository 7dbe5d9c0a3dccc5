/** /api/audit and /api/outbox (admin): the audit log and the mail outbox. */
import { Router } from 'express';
import { auditQuerySchema } from '../../shared/api';
import { requirePermission } from '../http/guards';
import { parseId, parseQuery } from '../http/parse';
import type { AuditService } from '../services/audit';
import type { OutboxService } from '../services/outbox';

export function auditRouter(svc: AuditService): Router {
  const r = Router();
  r.get('/', requirePermission('audit:read'), (req, res) => {
    res.json(svc.list(parseQuery(auditQuerySchema, req.query)));
  });
  return r;
}

export function outboxRouter(svc: OutboxService): Router {
  const r = Router();
  r.get('/', requirePermission('outbox:read'), (_req, res) => {
    res.json(svc.list());
  });
  r.get('/:mailId', requirePermission('outbox:read'), (req, res) => {
    res.json(svc.get(parseId(req.params.mailId, 'Message')));
  });
  r.get('/:mailId/attachments/:attachmentId', requirePermission('outbox:read'), (req, res) => {
    const a = svc.attachment(parseId(req.params.mailId, 'Message'), parseId(req.params.attachmentId, 'Attachment'));
    res.setHeader('Content-Disposition', `attachment; filename="${a.fileName.replace(/["\\\r\n]/g, '_')}"`);
    res.type(a.contentType).send(a.content);
  });
  return r;
}
