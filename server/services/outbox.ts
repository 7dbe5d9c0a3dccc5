/** The mail outbox as admins read it. */
import type { OutboxMessage, OutboxSummary } from '../../shared/api';
import { findMail, findMailAttachment, listMail, listMailAttachments } from '../db/queries/outbox';
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
        attachments: listMailAttachments(ctx.db, m.id).map((a) => ({ id: a.id, fileName: a.fileName, contentType: a.contentType, size: a.size })),
      };
    },
    /** One attachment's file (404 when the message or attachment is unknown). */
    attachment(mailId: number, attachmentId: number): { fileName: string; contentType: string; content: Buffer } {
      const a = findMailAttachment(ctx.db, mailId, attachmentId);
      if (!a) throw notFound('Attachment');
      return { fileName: a.fileName, contentType: a.contentType, content: a.content };
    },
  };
}
export type OutboxService = ReturnType<typeof outboxService>;
