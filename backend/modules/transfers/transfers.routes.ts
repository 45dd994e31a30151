import { ForbiddenError } from '@casl/ability';
import type { Router } from 'express';
import { z } from 'zod';
import { createTransferSchema, transferListQuerySchema } from '../../../shared/schemas/transfers.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { createHandler, listHandler, signedInRouter } from '../../lib/route-handlers.ts';
import { listTransfers, recordTransfer, transferCandidates, transferViews } from './transfers.service.ts';

/** `/api/transfers`: beer from a fermenter into kegs, recorded on the brewer-on-duty's checklist. */
export function transfersRoutes({ db, clock }: Deps): Router {
  const router = signedInRouter({ id: 'Transfer' });
  const record = createHandler(createTransferSchema, 'Transfer', (input, actor) => recordTransfer(db, input, actor, clock.now()));
  const list = listHandler(transferListQuerySchema, 'Transfer', (q, { restrictTo }) => listTransfers(db, q, restrictTo));
  router.route('/').post(record).get(list);

  /** What the transfer screen offers: batches still in a fermenter. */
  router.get('/candidates', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('create', 'Transfer');
    res.json({ items: await transferCandidates(db, clock.now()) });
  });

  router.get('/:id', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Transfer');
    const id = z.uuid().safeParse(req.params.id);
    if (!id.success) throw notFound('Transfer');
    const [transfer] = await transferViews(db, [id.data]);
    if (!transfer) throw notFound('Transfer');
    res.json({ transfer });
  });

  return router;
}
