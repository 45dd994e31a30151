import type { Router } from 'express';
import { subject } from '../../../shared/permissions/ability.ts';
import { refundInputSchema, voidInvoiceSchema } from '../../../shared/schemas/billing.ts';
import type { Deps } from '../../lib/deps.ts';
import { notFound } from '../../lib/http-problem.ts';
import { userOf } from '../../middleware/authenticate.ts';
import { creditNoteOwner, creditNotePdf } from './credit-notes.service.ts';
import { can, idParam, invoiceChange, signedInRouter } from './invoice-access.ts';
import { refundInvoiceNow, voidInvoiceNow } from './invoice-actions.service.ts';
import { detailAsOf } from './invoice-queries.service.ts';

/** Crediting an invoice: voiding it whole (`/:id/void`) or crediting part of it (`/:id/refunds`). */
export function invoiceCreditsRoutes(deps: Deps): Router {
  const { db, clock } = deps;
  const router = signedInRouter({ id: 'Invoice' });

  router.post('/:id/void', async (req, res) => {
    const { row, input } = await invoiceChange(req, db, ['create', 'CreditNote'], voidInvoiceSchema, ['update', 'Invoice']);
    const result = await voidInvoiceNow(deps, row.id, input, userOf(req).id);
    res.json({ ...result, invoice: await detailAsOf(db, row.id, clock.now()) });
  });

  router.post('/:id/refunds', async (req, res) => {
    const { row, input } = await invoiceChange(req, db, ['create', 'CreditNote'], refundInputSchema, ['create', 'CreditNote']);
    const result = await refundInvoiceNow(deps, row.id, input, userOf(req).id);
    res.status(201).json({ ...result, invoice: await detailAsOf(db, row.id, clock.now()) });
  });

  return router;
}

/** A credit note as a document: `GET /api/credit-notes/:id/pdf` (the member it credits, and the treasurer). */
export function creditNotesRoutes({ db, clock }: Deps): Router {
  const router = signedInRouter({ id: 'Credit note' });
  router.get('/:id/pdf', async (req, res) => {
    can(req).throwUnlessCan('read', 'CreditNote');
    const { id } = idParam.parse(req.params);
    const note = await creditNoteOwner(db, id);
    if (!note || !req.ability.can('read', subject('CreditNote', { memberId: note.memberId }))) throw notFound('Credit note');
    const pdf = await creditNotePdf(db, note, clock.now());
    res
      .type('application/pdf')
      .set('Content-Disposition', `inline; filename="credit-note-${note.number}.pdf"`)
      .set('Cache-Control', 'private, no-store')
      .send(pdf);
  });
  return router;
}
