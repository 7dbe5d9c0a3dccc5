/** SQL for the mail outbox. */
import { and, asc, desc, eq } from 'drizzle-orm';
import type { Db } from '../client';
import { mailAttachments, mailOutbox, type MailAttachmentRow, type MailRow } from '../schema';

export type NewMail = Omit<MailRow, 'id'>;

export function insertMail(db: Db, mail: NewMail): number {
  return db.orm.insert(mailOutbox).values(mail).returning({ id: mailOutbox.id }).get().id;
}

/** Newest first; without bodies. */
export function listMail(db: Db, limit: number): Omit<MailRow, 'textBody' | 'htmlBody'>[] {
  return db.orm.select({
    id: mailOutbox.id, messageId: mailOutbox.messageId, fromAddress: mailOutbox.fromAddress,
    toAddress: mailOutbox.toAddress, subject: mailOutbox.subject, transport: mailOutbox.transport,
    receivedAt: mailOutbox.receivedAt,
  }).from(mailOutbox).orderBy(desc(mailOutbox.receivedAt), desc(mailOutbox.id)).limit(limit).all();
}

export function findMail(db: Db, id: number): MailRow | undefined {
  return db.orm.select().from(mailOutbox).where(eq(mailOutbox.id, id)).get();
}

export type NewMailAttachment = Omit<MailAttachmentRow, 'id'>;

export function insertMailAttachment(db: Db, a: NewMailAttachment): number {
  return db.orm.insert(mailAttachments).values(a).returning({ id: mailAttachments.id }).get().id;
}

/** A message's attachments without their content, in the order received. */
export function listMailAttachments(db: Db, mailId: number): Omit<MailAttachmentRow, 'content'>[] {
  return db.orm.select({ id: mailAttachments.id, mailId: mailAttachments.mailId, fileName: mailAttachments.fileName,
    contentType: mailAttachments.contentType, size: mailAttachments.size })
    .from(mailAttachments).where(eq(mailAttachments.mailId, mailId)).orderBy(asc(mailAttachments.id)).all();
}

export function findMailAttachment(db: Db, mailId: number, id: number): MailAttachmentRow | undefined {
  return db.orm.select().from(mailAttachments).where(and(eq(mailAttachments.mailId, mailId), eq(mailAttachments.id, id))).get();
}
