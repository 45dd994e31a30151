import { sql } from 'kysely';
import type { ListQuery } from '../../../shared/schemas/pagination.ts';
import type { Deps } from '../../lib/deps.ts';
import { orderByAllowed, paginate } from '../../lib/paginate.ts';

type Db = Deps['db'];

/** Whether the fake's table exists in this database (the mailbox may live in a database not yet migrated). */
export async function mailboxTableExists(mailDb: Db): Promise<boolean> {
  const exists = await sql<{ t: string | null }>`select to_regclass('public.dev_mail_message')::text as t`.execute(mailDb);
  return Boolean(exists.rows[0]?.t);
}

/** One page of stored messages, to one address or all, by time received and newest id first. */
export async function mailboxPage(mailDb: Db, q: ListQuery, to: string | undefined, order: 'asc' | 'desc') {
  let base = mailDb.selectFrom('dev_mail_message');
  if (to) base = base.where(sql<boolean>`${to} = any(mail_to)`);
  return paginate(
    base,
    (qb) =>
      orderByAllowed(
        qb.select(['id', 'mail_from', 'mail_to', 'subject', 'text_body', 'received_at']),
        { receivedAt: 'received_at' },
        { sort: 'receivedAt', order },
        'id',
        'desc',
      ),
    q,
  );
}
