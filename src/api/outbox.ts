import { z } from 'zod';
import { outboxMessageSchema, outboxSummarySchema, type OutboxMessage, type OutboxSummary } from '@shared/api/outbox';
import { http } from './http';

export function listOutbox(): Promise<OutboxSummary[]> {
  return http.get('/outbox', { schema: z.array(outboxSummarySchema) });
}

export function getOutboxMessage(mailId: number): Promise<OutboxMessage> {
  return http.get(`/outbox/${mailId}`, { schema: outboxMessageSchema });
}

/** Download link of one attachment of an outbox message. */
export function outboxAttachmentUrl(mailId: number, attachmentId: number): string {
  return `/api/outbox/${mailId}/attachments/${attachmentId}`;
}
