import { sql } from 'kysely';
import type { ListQuery } from '../../../shared/schemas/pagination.ts';
import { createDb } from '../../db/database.ts';
import type { Deps } from '../../lib/deps.ts';

type Db = Deps['db'];

/** The fake's mailbox lives in the app's database, or in its own when `mailboxDatabaseUrl` names another. */
export function mailboxDatabase({ db, config }: Pick<Deps, 'db' | 'config'>): Db {
  return config.mailboxDatabaseUrl === config.DATABASE_URL ? db : createDb(config.mailboxDatabaseUrl, 2).db;
}

/** One page of the messages the SMTP fake stored, newest first unless `order` is asc. */
export async function listMailbox(mailDb: Db, q: ListQuery, to: string | undefined, order: 'asc' | 'desc') {
  const exists = await sql<{ t: string | null }>`select to_regclass('public.dev_mail_message')::text as t`.execute(mailDb);
  if (!exists.rows[0]?.t) return { items: [], total: 0, page: q.page, pageSize: q.pageSize };
  let base = mailDb.selectFrom('dev_mail_message');
  if (to) base = base.where(sql<boolean>`${to} = any(mail_to)`);
  const [{ total }, rows] = await Promise.all([
    base.select((eb) => eb.fn.countAll<number>().as('total')).executeTakeFirstOrThrow(),
    base
      .select(['id', 'mail_from', 'mail_to', 'subject', 'text_body', 'received_at'])
      .orderBy('received_at', order)
      .orderBy('id', 'desc')
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize)
      .execute(),
  ]);
  return {
    items: rows.map((r) => ({
      id: r.id,
      from: r.mail_from,
      to: r.mail_to.join(', '),
      subject: r.subject,
      text: r.text_body,
      receivedAt: r.received_at.toISOString(),
    })),
    total,
    page: q.page,
    pageSize: q.pageSize,
  };
}
