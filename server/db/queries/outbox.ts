/** SQL for the mail outbox. */
import { desc, eq } from 'drizzle-orm';
import type { Db } from '../client';
import { mailOutbox, type MailRow } from '../schema';

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
