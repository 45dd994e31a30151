import type { Router } from 'express';
import { z } from 'zod';
import { subject } from '../../../shared/permissions/ability.ts';
import { manualChargeInputSchema, periodSchema } from '../../../shared/schemas/billing.ts';
import { canAll } from '../../lib/authz.ts';
import type { Deps } from '../../lib/deps.ts';
import { userOf } from '../../middleware/authenticate.ts';
import { can, idParam, signedInRouter } from './invoice-access.ts';
import { addManualCharge, listManualCharges, removeManualCharge } from './prices.service.ts';

/** Charges and credits the treasurer adds by hand to a member's period. */
export function manualChargesRoutes({ db, clock }: Deps): Router {
  const router = signedInRouter({ id: 'Charge' });
  const listQuery = z.object({ period: periodSchema.optional(), memberId: z.uuid().optional() });

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('read', 'Charge');
    const q = listQuery.parse(req.query);
    const own = canAll(req.ability, 'read', 'Charge') ? {} : { memberId: userOf(req).id };
    if (own.memberId && q.memberId && q.memberId !== own.memberId) {
      res.json({ items: [], total: 0, page: 1, pageSize: 1 });
      return;
    }
    const items = await listManualCharges(db, { ...q, ...own });
    res.json({ items, total: items.length, page: 1, pageSize: Math.max(items.length, 1) });
  });

  router.post('/', async (req, res) => {
    can(req).throwUnlessCan('create', 'Charge');
    const input = manualChargeInputSchema.parse(req.body ?? {});
    can(req).throwUnlessCan('create', subject('Charge', { memberId: input.memberId }));
    res.status(201).json({ charge: await addManualCharge(db, input, userOf(req).id, clock.now()) });
  });

  router.delete('/:id', async (req, res) => {
    can(req).throwUnlessCan('delete', 'Charge');
    const { id } = idParam.parse(req.params);
    await removeManualCharge(db, id, userOf(req).id);
    res.status(204).end();
  });

  return router;
}
