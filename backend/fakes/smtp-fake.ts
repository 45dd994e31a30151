// A local stand-in for an SMTP relay: accepts every message on loopback and keeps it in the
// PostgreSQL table dev_mail_message, where the app's Outbox screen and the tests read it.
import { simpleParser } from 'mailparser';
import pg from 'pg';
import { SMTPServer } from 'smtp-server';
import { CONNECT_TIMEOUT_MS, guardPool } from '../db/database.ts';

export interface SmtpFake {
  port: number;
  close(): Promise<void>;
}

export async function startSmtpFake({ databaseUrl, port = 0, host = '127.0.0.1' }: { databaseUrl: string; port?: number; host?: string }): Promise<SmtpFake> {
  // A lost connection fails the message it was storing (the sender retries); it must not end the process.
  const pool = guardPool(new pg.Pool({ connectionString: databaseUrl, max: 2, connectionTimeoutMillis: CONNECT_TIMEOUT_MS }));
  await pool.query(`create table if not exists dev_mail_message (
    id uuid primary key default gen_random_uuid(),
    mail_from text not null,
    mail_to text[] not null,
    subject text not null,
    text_body text not null,
    html_body text,
    raw text not null,
    received_at timestamptz not null default now()
  )`);
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('end', async () => {
        try {
          const raw = Buffer.concat(chunks).toString('utf8');
          const parsed = await simpleParser(raw);
          const to = session.envelope.rcptTo.map((r) => r.address.toLowerCase());
          const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
          await pool.query('insert into dev_mail_message (mail_from, mail_to, subject, text_body, html_body, raw) values ($1, $2, $3, $4, $5, $6)', [
            from,
            to,
            parsed.subject ?? '',
            parsed.text ?? '',
            typeof parsed.html === 'string' ? parsed.html : null,
            raw,
          ]);
          callback();
        } catch (err) {
          callback(err as Error);
        }
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => resolve());
  });
  // A sender that drops its connection is reported, not fatal.
  server.on('error', (err: Error) => console.error('SMTP fake:', err.message));
  const address = server.server.address();
  const actualPort = typeof address === 'object' && address ? address.port : port;
  return {
    port: actualPort,
    async close() {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await pool.end();
    },
  };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const databaseUrl = process.env.MAILBOX_DATABASE_URL ?? process.env.DATABASE_URL;
  if (!databaseUrl) throw new Error('DATABASE_URL is required');
  const fake = await startSmtpFake({ databaseUrl, port: Number(process.env.SMTP_PORT ?? 2525) });
  console.log(`SMTP fake listening on 127.0.0.1:${fake.port}`);
  const stop = () => fake.close().then(() => process.exit(0));
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}
