import type { Router } from 'express';
import { z } from 'zod';
import { subject } from '../../../shared/permissions/ability.ts';
import { overpaymentRefundSchema } from '../../../shared/schemas/billing.ts';
import { listQuerySchema } from '../../../shared/schemas/pagination.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { userOf } from '../../middleware/authenticate.ts';
import { can, idParam, requireEveryInvoice, signedInRouter } from './invoice-access.ts';
import { pageOverpayments, paymentOwner, refundOverpayment } from './overpayments.service.ts';

/** Online payments beyond what was due, for the treasurer to refund: `/api/billing/overpayments`. */
export function overpaymentsRoutes({ db }: Deps): Router {
  const router = signedInRouter({ id: 'Overpayment' });

  /** A page at a time: `?open=true` for those still owed. */
  router.get('/', async (req, res) => {
    requireEveryInvoice(req);
    const q = listQuerySchema
      .pick({ page: true, pageSize: true })
      .extend({ open: z.enum(['true', 'false']).optional(), memberId: z.uuid().optional() })
      .parse(req.query);
    res.json(await pageOverpayments(db, { open: q.open === 'true', memberId: q.memberId, page: q.page, pageSize: q.pageSize }));
  });

  router.post('/:id/refunded', async (req, res) => {
    const { id } = idParam.parse(req.params);
    can(req).throwUnlessCan('create', 'Payment');
    const input = overpaymentRefundSchema.parse(req.body ?? {});
    const payment = await paymentOwner(db, id);
    if (!payment) throw notFound('Overpayment');
    can(req).throwUnlessCan('create', subject('Payment', { memberId: payment.memberId }));
    res.json({ overpayment: await refundOverpayment(db, payment.id, input, userOf(req).id) });
  });

  return router;
}
