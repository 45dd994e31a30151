import nodemailer from 'nodemailer';
import { CompiledQuery, type Kysely } from 'kysely';
import type { DB } from '../db/schema.ts';
import type PgBoss from 'pg-boss';
import type { Config } from '../config/env.ts';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
  attachments?: { filename: string; contentType: string; contentBase64: string }[];
}

export function createTransport(config: Config) {
  return nodemailer.createTransport({
    host: config.SMTP_HOST,
    port: config.SMTP_PORT,
    secure: config.SMTP_SECURE,
    ignoreTLS: !config.SMTP_SECURE && !config.isProduction,
    auth: config.SMTP_USER ? { user: config.SMTP_USER, pass: config.SMTP_PASS ?? '' } : undefined,
  });
}

/** Queue an e-mail: sending never blocks or fails the work that asked for it; failures are retried. */
export async function enqueueMail(queue: PgBoss, mail: OutgoingMail): Promise<void> {
  await queue.send('email.send', mail, { retryLimit: 10, retryDelay: 5, retryBackoff: true });
}

export async function deliverMail(config: Config, transport: ReturnType<typeof createTransport>, mail: OutgoingMail) {
  await transport.sendMail({
    from: config.MAIL_FROM,
    to: mail.to,
    subject: mail.subject,
    text: mail.text,
    html: mail.html,
    attachments: mail.attachments?.map((a) => ({ filename: a.filename, contentType: a.contentType, content: Buffer.from(a.contentBase64, 'base64') })),
  });
}

/**
 * Queue an e-mail as part of a database transaction: the job is written on the transaction's own
 * connection, so it exists exactly when the change that asked for it commits (a rolled-back or
 * replayed change queues nothing).
 */
export async function enqueueMailIn(trx: Kysely<DB>, queue: PgBoss, mail: OutgoingMail): Promise<void> {
  const db = {
    executeSql: async (text: string, values: unknown[] = []) => {
      const result = await trx.executeQuery(CompiledQuery.raw(text, values));
      return { rows: result.rows };
    },
  };
  await queue.send('email.send', mail, { retryLimit: 10, retryDelay: 5, retryBackoff: true, db });
}
