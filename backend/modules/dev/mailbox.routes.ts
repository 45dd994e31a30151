import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import { listQuerySchema } from '../../../shared/schemas/pagination.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { requireUser } from '../../middleware/authenticate.ts';
import { listMailbox, mailboxDatabase } from './mailbox.service.ts';

/** The development SMTP fake's mailbox, readable by an admin so a newcomer can follow an invitation link. */
export function mailboxRoutes({ db, config }: Deps): Router {
  const router = Router();
  const mailDb = mailboxDatabase({ db, config });
  router.use(requireUser);
  router.get('/mailbox', async (req, res) => {
    if (!config.devMailbox) throw notFound('Mailbox');
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Mailbox');
    const q = listQuerySchema.parse(req.query);
    const to = typeof req.query.to === 'string' ? req.query.to.toLowerCase() : undefined;
    res.json(await listMailbox(mailDb, q, to, req.query.order === 'asc' ? 'asc' : 'desc'));
  });
  return router;
}
