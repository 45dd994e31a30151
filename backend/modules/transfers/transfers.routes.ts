import { ForbiddenError } from '@casl/ability';
import { Router } from 'express';
import { z } from 'zod';
import { createTransferSchema, transferListQuerySchema } from '../../../shared/schemas/transfers.ts';
import { canAll } from '../../lib/authz.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { uuidParams } from '../../lib/uuid-params.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { listTransfers, recordTransfer, transferCandidates, transferViews } from './transfers.service.ts';

/** `/api/transfers`: beer from a fermenter into kegs, recorded on the brewer-on-duty's checklist. */
export function transfersRoutes({ db, clock }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'Transfer' });
  router.use(requireUser);

  router.post('/', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('create', 'Transfer');
    const input = createTransferSchema.parse(req.body ?? {});
    res.status(201).json(await recordTransfer(db, input, userOf(req), clock.now()));
  });

  router.get('/', async (req, res) => {
    ForbiddenError.from(req.ability).throwUnlessCan('read', 'Transfer');
    const q = transferListQuerySchema.parse(req.query);
    res.json(await listTransfers(db, q, canAll(req.ability, 'read', 'Transfer') ? undefined : userOf(req).id));
  });

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
