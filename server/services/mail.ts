/**
 * Outgoing mail. By default an in-process SMTP server (smtp-server, 127.0.0.1, random port,
 * authOptional) stands in for the lab's relay: nodemailer sends to it over real SMTP, and what it
 * receives is parsed (mailparser) and stored in the mail outbox. With AFTERCUE_SMTP_URL set,
 * nodemailer sends to that relay instead and the message is recorded in the outbox as sent.
 */
import type { AddressInfo } from 'node:net';
import { simpleParser, type AddressObject } from 'mailparser';
import nodemailer, { type Transporter } from 'nodemailer';
import { SMTPServer } from 'smtp-server';
import type { Db } from '../db/client';
import { insertMail, insertMailAttachment } from '../db/queries/outbox';
import type { Logger } from '../log';

/** A file sent with a message. */
export interface MailAttachment {
  fileName: string;
  contentType: string;
  content: Buffer;
}

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html?: string;
  /** Files attached (the outbox keeps them). */
  attachments?: MailAttachment[];
}

export interface MailService {
  /** Sends one message; resolves once the outbox holds it (in-process) or the relay accepted it. */
  sendMail(msg: MailMessage): Promise<{ messageId: string }>;
  /** Port of the in-process SMTP server; null when a real relay is used. */
  readonly smtpPort: number | null;
  stop(): Promise<void>;
}

const MAX_MESSAGE_BYTES = 5 * 1024 * 1024;

function addressText(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return '';
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ');
}

function startSmtpServer(db: Db, log: Logger): Promise<SMTPServer> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    size: MAX_MESSAGE_BYTES,
    onData(stream, _session, callback) {
      simpleParser(stream).then((parsed) => {
        db.transaction(() => {
          const mailId = insertMail(db, {
            messageId: parsed.messageId ?? null,
            fromAddress: addressText(parsed.from),
            toAddress: addressText(parsed.to),
            subject: parsed.subject ?? '',
            textBody: parsed.text ?? '',
            htmlBody: typeof parsed.html === 'string' ? parsed.html : null,
            transport: 'in-process',
            receivedAt: new Date(),
          });
          for (const a of parsed.attachments) {
            insertMailAttachment(db, { mailId, fileName: a.filename ?? 'attachment', contentType: a.contentType, size: a.content.length,
              content: a.content });
          }
        });
        callback();
      }, (err: Error) => { log.error('in-process SMTP server could not store a message', err); callback(err); });
    },
  });
  server.on('error', (err) => log.error('in-process SMTP server error', err));
  return new Promise((resolveStart, reject) => {
    server.server.once('error', reject);
    server.listen(0, '127.0.0.1', () => { server.server.off('error', reject); resolveStart(server); });
  });
}

/** Starts the mail service: the in-process SMTP server, or a transport to `smtpUrl`. */
export async function createMailService(opts: { db: Db; log: Logger; from: string; smtpUrl: string | null }): Promise<MailService> {
  const { db, log, from, smtpUrl } = opts;
  const smtp = smtpUrl ? null : await startSmtpServer(db, log);
  const smtpPort = smtp ? (smtp.server.address() as AddressInfo).port : null;
  const transport: Transporter = smtpUrl
    ? nodemailer.createTransport(smtpUrl)
    : nodemailer.createTransport({ host: '127.0.0.1', port: smtpPort!, secure: false, ignoreTLS: true });

  async function sendMail(msg: MailMessage): Promise<{ messageId: string }> {
    const attachments = (msg.attachments ?? []).map((a) => ({ filename: a.fileName, contentType: a.contentType, content: a.content }));
    const info = await transport.sendMail({ from, to: msg.to, subject: msg.subject, text: msg.text, html: msg.html, attachments });
    if (smtpUrl) {
      db.transaction(() => {
        const mailId = insertMail(db, {
          messageId: info.messageId, fromAddress: from, toAddress: msg.to, subject: msg.subject, textBody: msg.text,
          htmlBody: msg.html ?? null, transport: 'relay', receivedAt: new Date(),
        });
        for (const a of msg.attachments ?? []) {
          insertMailAttachment(db, { mailId, fileName: a.fileName, contentType: a.contentType, size: a.content.length, content: a.content });
        }
      });
    }
    return { messageId: info.messageId };
  }

  async function stop(): Promise<void> {
    transport.close();
    if (smtp) await new Promise<void>((done) => smtp.close(() => done()));
  }

  return { sendMail, smtpPort, stop };
}
