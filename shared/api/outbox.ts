/**
 * The mail outbox (admin only): every message the product sent, as received by the in-process
 * SMTP server, or as handed to the lab's real relay when one is configured.
 */
import { z } from 'zod';
import { idSchema, isoTimestampSchema } from './common';

/** GET /api/outbox -> OutboxSummary[] (newest first). */
export const outboxSummarySchema = z.object({
  id: idSchema,
  from: z.string(),
  to: z.string(),
  subject: z.string(),
  receivedAt: isoTimestampSchema,
  /** 'in-process': caught by the built-in SMTP server; 'relay': sent through AFTERCUE_SMTP_URL. */
  transport: z.enum(['in-process', 'relay']),
});
export type OutboxSummary = z.infer<typeof outboxSummarySchema>;

/** GET /api/outbox/:mailId -> 200: the full message. */
/** A file sent with a message; GET /api/outbox/:mailId/attachments/:attachmentId downloads it. */
export const outboxAttachmentSchema = z.object({
  id: idSchema,
  fileName: z.string(),
  contentType: z.string(),
  /** Bytes. */
  size: z.number().int(),
});
export type OutboxAttachment = z.infer<typeof outboxAttachmentSchema>;

export const outboxMessageSchema = outboxSummarySchema.extend({
  text: z.string(),
  html: z.string().optional(),
  attachments: z.array(outboxAttachmentSchema),
});
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;
