import type { ListQuery } from '../../../shared/schemas/pagination.ts';
import { createDb } from '../../db/database.ts';
import type { Deps } from '../../lib/deps.ts';
import { pageOf } from '../../lib/paginate.ts';
import { mailboxPage, mailboxTableExists } from './mailbox.repository.ts';

type Db = Deps['db'];

/** The fake's mailbox lives in the app's database, or in its own when `mailboxDatabaseUrl` names another. */
export function mailboxDatabase({ db, config }: Pick<Deps, 'db' | 'config'>): Db {
  return config.mailboxDatabaseUrl === config.DATABASE_URL ? db : createDb(config.mailboxDatabaseUrl, 2).db;
}

/** One page of the messages the SMTP fake stored, newest first unless `order` is asc. */
export async function listMailbox(mailDb: Db, q: ListQuery, to: string | undefined, order: 'asc' | 'desc') {
  if (!(await mailboxTableExists(mailDb))) return { items: [], total: 0, page: q.page, pageSize: q.pageSize };
  return pageOf(
    await mailboxPage(mailDb, q, to, order),
    (r) => ({
      id: r.id,
      from: r.mail_from,
      to: r.mail_to.join(', '),
      subject: r.subject,
      text: r.text_body,
      receivedAt: r.received_at.toISOString(),
    }),
    q,
  );
}
