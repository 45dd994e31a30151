import type { Router } from 'express';
import { z } from 'zod';
import { subject } from '../../../shared/permissions/ability.ts';
import { paymentInputSchema } from '../../../shared/schemas/billing.ts';
import type { Deps } from '../../lib/deps.ts';
import { forbidden } from '../../lib/http-problem.ts';
import { userOf } from '../../middleware/authenticate.ts';
import { confirmCheckout, createCheckout } from './checkout.service.ts';
import { can, idParam, invoiceChange, signedInRouter, visibleInvoice } from './invoice-access.ts';
import { takePaymentByHand } from './invoice-actions.service.ts';
import { detailAsOf } from './invoice-queries.service.ts';

/** Paying an invoice: online by its member (`/:id/checkout`), or recorded by the treasurer (`/:id/payments`). */
export function paymentsRoutes(deps: Deps): Router {
  const { db, config, clock, queue } = deps;
  const router = signedInRouter({ id: 'Invoice' });

  router.post('/:id/checkout', async (req, res) => {
    const { id } = idParam.parse(req.params);
    can(req).throwUnlessCan('pay', 'Invoice');
    const row = await visibleInvoice(req, db, id);
    // Paying online is for the member the invoice is addressed to.
    if (row.member_id !== userOf(req).id) throw forbidden('Only the member it is addressed to pays an invoice online; record a payment instead.');
    can(req).throwUnlessCan('pay', subject('Invoice', { memberId: row.member_id }));
    res.status(201).json(await createCheckout(db, config, row.id, { id: userOf(req).id, email: userOf(req).email }, clock.now(), queue));
  });

  router.post('/:id/checkout/confirm', async (req, res) => {
    const { id } = idParam.parse(req.params);
    can(req).throwUnlessCan('pay', 'Invoice');
    const row = await visibleInvoice(req, db, id);
    if (row.member_id !== userOf(req).id) throw forbidden();
    const body = z.object({ sessionId: z.string().min(1).max(200) }).parse(req.body ?? {});
    const outcome = await confirmCheckout(db, config, row.id, body.sessionId, clock.now(), queue);
    res.json({ outcome, invoice: await detailAsOf(db, row.id, clock.now()) });
  });

  router.post('/:id/payments', async (req, res) => {
    const { row, input } = await invoiceChange(req, db, ['create', 'Payment'], paymentInputSchema, ['create', 'Payment']);
    const payment = await takePaymentByHand(deps, row.id, input, userOf(req).id);
    res.status(201).json({ payment, invoice: await detailAsOf(db, row.id, clock.now()) });
  });

  return router;
}
