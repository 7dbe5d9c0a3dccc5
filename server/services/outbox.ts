/** The mail outbox as admins read it. */
import type { OutboxMessage, OutboxSummary } from '../../shared/api';
import { findMail, listMail } from '../db/queries/outbox';
import type { AppContext } from '../context';
import { notFound } from '../errors';

const LIST_LIMIT = 500;

export function outboxService(ctx: AppContext) {
  return {
    /** The newest 500 messages, newest first. */
    list(): OutboxSummary[] {
      return listMail(ctx.db, LIST_LIMIT).map((m) => ({
        id: m.id, from: m.fromAddress, to: m.toAddress, subject: m.subject, receivedAt: m.receivedAt.toISOString(),
        transport: m.transport,
      }));
    },
    get(id: number): OutboxMessage {
      const m = findMail(ctx.db, id);
      if (!m) throw notFound('Message');
      return {
        id: m.id, from: m.fromAddress, to: m.toAddress, subject: m.subject, receivedAt: m.receivedAt.toISOString(),
        transport: m.transport, text: m.textBody, ...(m.htmlBody !== null ? { html: m.htmlBody } : {}),
      };
    },
  };
}
export type OutboxService = ReturnType<typeof outboxService>;
