import type { Router } from 'express';
import { subject } from '../../../shared/permissions/ability.ts';
import { invoiceListQuerySchema } from '../../../shared/schemas/billing.ts';
import { canAll } from '../../lib/authz.ts';
import type { Deps } from '../../lib/deps.ts';
import { userOf } from '../../middleware/authenticate.ts';
import { coopToday } from './billing-profile.service.ts';
import { can, idParam, signedInRouter, visibleInvoice } from './invoice-access.ts';
import { issueDraft } from './invoice-commands.service.ts';
import { sendInvoice } from './invoice-mail.service.ts';
import { invoicePdfFilename, renderInvoicePdf } from './invoice-pdf.ts';
import { coopProfile } from '../settings/settings.service.ts';
import { detailAsOf, listInvoices } from './invoice-queries.service.ts';

/** Invoices: the list, one invoice, its PDF, issuing and e-mailing it. */
export function invoicesRoutes(deps: Deps): Router {
  const { db, config, clock } = deps;
  const router = signedInRouter({ id: 'Invoice' });

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('read', 'Invoice');
    const q = invoiceListQuerySchema.parse(req.query);
    const { today } = await coopToday(db, clock.now());
    const scope = canAll(req.ability, 'read', 'Invoice') ? {} : { ownerId: userOf(req).id };
    res.json(await listInvoices(db, q, scope, today));
  });

  router.get('/:id', async (req, res) => {
    const { id } = idParam.parse(req.params);
    const row = await visibleInvoice(req, db, id);
    res.json({ invoice: await detailAsOf(db, row.id, clock.now()) });
  });

  router.get('/:id/pdf', async (req, res) => {
    const { id } = idParam.parse(req.params);
    const row = await visibleInvoice(req, db, id);
    const invoice = await detailAsOf(db, row.id, clock.now());
    const pdf = await renderInvoicePdf({ invoice, profile: await coopProfile(db), appUrl: config.publicUrl, producedAt: clock.now() });
    res
      .type('application/pdf')
      .set('Content-Disposition', `inline; filename="${invoicePdfFilename(invoice)}"`)
      .set('Cache-Control', 'private, no-store')
      .send(pdf);
  });

  router.post('/:id/issue', async (req, res) => {
    can(req).throwUnlessCan('update', 'Invoice');
    const { id } = idParam.parse(req.params);
    const row = await visibleInvoice(req, db, id);
    await issueDraft(db, row.id, clock.now(), userOf(req).id);
    res.json({ invoice: await detailAsOf(db, row.id, clock.now()) });
  });

  router.post('/:id/send', async (req, res) => {
    const { id } = idParam.parse(req.params);
    can(req).throwUnlessCan('send', 'Invoice');
    const row = await visibleInvoice(req, db, id);
    can(req).throwUnlessCan('send', subject('Invoice', { memberId: row.member_id }));
    const sent = await sendInvoice(deps, row.id, userOf(req).id);
    res.status(202).json({ queued: true, ...sent });
  });

  return router;
}
