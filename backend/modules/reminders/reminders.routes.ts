import { ForbiddenError } from '@casl/ability';
import type { Request, Router } from 'express';
import { z } from 'zod';
import { subject } from '../../../shared/permissions/ability.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { signedInRouter } from '../../lib/route-handlers.ts';
import { userOf } from '../../middleware/authenticate.ts';
import { findInvoiceRow } from '../billing/invoices.service.ts';
import { findKeg, kegMemberId } from '../kegs/kegs.service.ts';
import { overdueInvoices, remindAllOverdueInvoices, remindInvoice, remindKeg } from './reminders.service.ts';

const idParam = z.object({ id: z.string() });
const can = (req: Request) => ForbiddenError.from(req.ability);

/**
 * `/api/invoices/reminders` (how many overdue invoices would be reminded; remind them all) and
 * `/api/invoices/:id/reminders`: the books remind members of overdue invoices. Mounted before the
 * invoices router, so "reminders" is never read as an invoice id.
 */
export function invoiceRemindersRoutes(deps: Deps): Router {
  const { db, clock } = deps;
  const router = signedInRouter({ id: 'Invoice' });

  router.get('/reminders', async (req, res) => {
    can(req).throwUnlessCan('remind', 'Invoice');
    const overdue = await overdueInvoices(db, clock.now());
    const quiet = overdue.filter((i) => i.quiet).length;
    res.json({ overdue: overdue.length, toRemind: overdue.length - quiet, remindedRecently: quiet });
  });

  router.post('/reminders', async (req, res) => {
    can(req).throwUnlessCan('remind', 'Invoice');
    res.status(201).json(await remindAllOverdueInvoices(deps, userOf(req).id, clock.now()));
  });

  router.post('/:id/reminders', async (req, res) => {
    const { id } = idParam.parse(req.params);
    can(req).throwUnlessCan('remind', 'Invoice');
    const row = await findInvoiceRow(db, id);
    if (!row || row.status === 'draft') throw notFound('Invoice');
    can(req).throwUnlessCan('remind', subject('Invoice', { memberId: row.member_id }));
    res.status(201).json({ reminder: await remindInvoice(deps, row.id, userOf(req).id, clock.now()) });
  });

  return router;
}

/** `/api/kegs/:id/reminders`: the rota reminds a member to bring back a keg that is overdue. */
export function kegRemindersRoutes(deps: Deps): Router {
  const { db, clock } = deps;
  const router = signedInRouter({ id: 'Keg' });

  router.post('/:id/reminders', async (req, res) => {
    const { id } = idParam.parse(req.params);
    can(req).throwUnlessCan('read', 'Keg');
    const row = await findKeg(db, id, clock.now());
    if (!row || !req.ability.can('read', subject('Keg', { memberId: kegMemberId(row) }))) throw notFound('Keg');
    can(req).throwUnlessCan('remind', subject('Keg', { memberId: kegMemberId(row) }));
    res.status(201).json({ reminder: await remindKeg(deps, row.id, userOf(req).id, clock.now()) });
  });

  return router;
}
