import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import { sql } from 'kysely';
import { listQuerySchema } from '../../../shared/schemas/pagination.ts';
import { createDb } from '../../db/database.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { requireUser } from '../../middleware/authenticate.ts';

/** The development SMTP fake's mailbox, readable by an admin so a newcomer can follow an invitation link. */
export function mailboxRoutes({ db, config }: Deps): Router {
  const router = Router();
  const mailDb = config.mailboxDatabaseUrl === config.DATABASE_URL ? db : createDb(config.mailboxDatabaseUrl, 2).db;
  router.use(requireUser);
  router.get('/mailbox', async (req, res) => {
    if (!config.devMailbox) throw notFound('Mailbox');
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Mailbox');
    const q = listQuerySchema.parse(req.query);
    const exists = await sql<{ t: string | null }>`select to_regclass('public.dev_mail_message')::text as t`.execute(mailDb);
    if (!exists.rows[0]?.t) return res.json({ items: [], total: 0, page: q.page, pageSize: q.pageSize });
    const to = typeof req.query.to === 'string' ? req.query.to.toLowerCase() : undefined;
    let base = mailDb.selectFrom('dev_mail_message');
    if (to) base = base.where(sql<boolean>`${to} = any(mail_to)`);
    const [{ total }, rows] = await Promise.all([
      base.select((eb) => eb.fn.countAll<number>().as('total')).executeTakeFirstOrThrow(),
      base
        .select(['id', 'mail_from', 'mail_to', 'subject', 'text_body', 'received_at'])
        .orderBy('received_at', req.query.order === 'asc' ? 'asc' : 'desc')
        .orderBy('id', 'desc')
        .limit(q.pageSize)
        .offset((q.page - 1) * q.pageSize)
        .execute(),
    ]);
    res.json({
      items: rows.map((r) => ({ id: r.id, from: r.mail_from, to: r.mail_to.join(', '), subject: r.subject, text: r.text_body, receivedAt: r.received_at.toISOString() })),
      total,
      page: q.page,
      pageSize: q.pageSize,
    });
  });
  return router;
}
