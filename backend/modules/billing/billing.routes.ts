import { ForbiddenError } from '@casl/ability';
import { Router, type Request } from 'express';
import { z } from 'zod';
import { periodLabel } from '../../../shared/billing/dates.ts';
import { subject } from '../../../shared/permissions/ability.ts';
import {
  ageingQuerySchema,
  billingProfileSchema,
  invoiceExportQuerySchema,
  invoiceListQuerySchema,
  invoiceRunInputSchema,
  invoiceRunPreviewQuerySchema,
  manualChargeInputSchema,
  overpaymentRefundSchema,
  paymentInputSchema,
  periodSchema,
  priceInputSchema,
  refundInputSchema,
  taxRateInputSchema,
  voidInvoiceSchema,
} from '../../../shared/schemas/billing.ts';
import { audit } from '../../lib/audit.ts';
import { canAll } from '../../lib/authz.ts';
import type { Deps } from '../../lib/deps.ts';
import { badRequest, forbidden, notFound } from '../../lib/http-problem.ts';
import { isUuid, uuidParams } from '../../lib/uuid-params.ts';
import { requireUser, userOf } from '../../middleware/authenticate.ts';
import { coopToday, getBillingProfile, putBillingProfile } from './billing-profile.service.ts';
import { ledgerCsv, ledgerXlsx, periodLedger } from './exports.service.ts';
import { sendInvoice } from './invoice-mail.service.ts';
import { invoicePdfFilename, renderCreditNotePdf, renderInvoicePdf } from './invoice-pdf.ts';
import { issueRunDrafts, listRuns, previewRun, runPeriod } from './invoice-runs.service.ts';
import { findInvoiceRow, getDetail, issueInvoice, listInvoices, memberBalance, recordManualPayment, refundInvoice, voidInvoice } from './invoices.service.ts';
import { verifyWebhook } from './payment-provider.ts';
import {
  closeStaleCheckouts,
  confirmCheckout,
  createCheckout,
  handleProviderEvent,
  listOverpayments,
  markOverpaymentRefunded,
  pageOverpayments,
} from './payments.service.ts';
import { listQuerySchema } from '../../../shared/schemas/pagination.ts';
import { addManualCharge, addPrice, addTaxRate, listManualCharges, listPrices, removeManualCharge, removePrice, removeTaxRate } from './prices.service.ts';
import { queueReceipt } from './receipts.service.ts';
import { ageingReport, billingSummary } from './reports.service.ts';

const idParam = z.object({ id: z.string() });
const can = (req: Request) => ForbiddenError.from(req.ability);

/**
 * An invoice as the person asking may see it, or a 404: a member sees only their own, and not
 * while it is still a draft. Someone who may read no invoices at all (the brewer-on-duty) gets 403.
 */
async function visibleInvoice(req: Request, db: Deps['db'], id: string) {
  can(req).throwUnlessCan('read', 'Invoice');
  const row = await findInvoiceRow(db, id);
  if (!row || !req.ability.can('read', subject('Invoice', { memberId: row.member_id }))) throw notFound('Invoice');
  if (row.status === 'draft' && !canAll(req.ability, 'read', 'Invoice')) throw notFound('Invoice');
  return row;
}

function requireEveryInvoice(req: Request) {
  can(req).throwUnlessCan('read', 'Invoice');
  if (!canAll(req.ability, 'read', 'Invoice')) throw forbidden('Only the treasurer sees every member’s invoices.');
}

export function invoiceRunsRoutes(deps: Deps): Router {
  const { db, clock } = deps;
  const router = Router();
  uuidParams(router, { id: 'Invoice run' });
  router.use(requireUser);

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('read', 'InvoiceRun');
    const items = await listRuns(db, 100);
    res.json({ items, total: items.length, page: 1, pageSize: 100 });
  });

  router.get('/preview', async (req, res) => {
    can(req).throwUnlessCan('run', 'InvoiceRun');
    const q = invoiceRunPreviewQuerySchema.parse(req.query);
    res.json(await previewRun(db, q.period, { now: clock.now() }));
  });

  router.post('/', async (req, res) => {
    can(req).throwUnlessCan('run', 'InvoiceRun');
    const input = invoiceRunInputSchema.parse(req.body ?? {});
    const result = await runPeriod(db, input, userOf(req).id, { now: clock.now() });
    res.status(201).json(result);
  });

  /** E-mails every issued invoice of the run that has not been sent yet. */
  router.post('/:id/send', async (req, res) => {
    can(req).throwUnlessCan('send', 'Invoice');
    const { id } = idParam.parse(req.params);
    const run = isUuid(id) ? await db.selectFrom('invoice_run').select('id').where('id', '=', id).executeTakeFirst() : undefined;
    if (!run) throw notFound('Invoice run');
    const unsent = await db
      .selectFrom('invoice')
      .select('id')
      .where('run_id', '=', run.id)
      .where('status', 'in', ['issued', 'paid'])
      .where('sent_at', 'is', null)
      .orderBy('number_seq')
      .execute();
    for (const inv of unsent) await sendInvoice(deps, inv.id, userOf(req).id);
    res.status(202).json({ queued: unsent.length });
  });

  router.post('/:id/issue', async (req, res) => {
    can(req).throwUnlessCan('update', 'Invoice');
    const { id } = idParam.parse(req.params);
    const run = isUuid(id) ? await db.selectFrom('invoice_run').select('id').where('id', '=', id).executeTakeFirst() : undefined;
    if (!run) throw notFound('Invoice run');
    const issued = await issueRunDrafts(db, run.id, userOf(req).id, clock.now());
    res.json({ issued: issued.length });
  });

  return router;
}

export function invoicesRoutes(deps: Deps): Router {
  const { db, config, clock, queue } = deps;
  const router = Router();
  uuidParams(router, { id: 'Invoice' });
  router.use(requireUser);

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('read', 'Invoice');
    const q = invoiceListQuerySchema.parse(req.query);
    const { today } = await coopToday(db, clock.now());
    const scope = canAll(req.ability, 'read', 'Invoice') ? {} : { ownerId: userOf(req).id };
    res.json(await listInvoices(db, q, scope, today));
  });

  // Before /:id, so "export" is not taken for an id.
  router.get('/export', async (req, res) => {
    can(req).throwUnlessCan('export', 'Invoice');
    const q = invoiceExportQuerySchema.parse(req.query);
    const sheets = await periodLedger(db, q.period);
    await audit(db, userOf(req).id, 'exported', 'Invoice', null, { period: q.period, format: q.format });
    const name = `cellarwright-ledger-${q.period}`;
    if (q.format === 'xlsx') {
      const body = await ledgerXlsx(sheets, `Ledger ${periodLabel(q.period)}`);
      res.type('application/vnd.openxmlformats-officedocument.spreadsheetml.sheet').attachment(`${name}.xlsx`).send(body);
      return;
    }
    res.type('text/csv; charset=utf-8').attachment(`${name}.csv`).send(ledgerCsv(sheets));
  });

  router.get('/:id', async (req, res) => {
    const { id } = idParam.parse(req.params);
    const row = await visibleInvoice(req, db, id);
    const { today } = await coopToday(db, clock.now());
    res.json({ invoice: await getDetail(db, row.id, today) });
  });

  router.get('/:id/pdf', async (req, res) => {
    const { id } = idParam.parse(req.params);
    const row = await visibleInvoice(req, db, id);
    const { today } = await coopToday(db, clock.now());
    const invoice = await getDetail(db, row.id, today);
    const pdf = await renderInvoicePdf({ invoice, profile: await getBillingProfile(db), appUrl: config.publicUrl });
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
    await db.transaction().execute(async (trx) => {
      const { today } = await coopToday(trx, clock.now());
      await issueInvoice(trx, row.id, today, userOf(req).id);
    });
    const { today } = await coopToday(db, clock.now());
    res.json({ invoice: await getDetail(db, row.id, today) });
  });

  router.post('/:id/send', async (req, res) => {
    const { id } = idParam.parse(req.params);
    can(req).throwUnlessCan('send', 'Invoice');
    const row = await visibleInvoice(req, db, id);
    can(req).throwUnlessCan('send', subject('Invoice', { memberId: row.member_id }));
    const sent = await sendInvoice(deps, row.id, userOf(req).id);
    res.status(202).json({ queued: true, ...sent });
  });

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
    const { today } = await coopToday(db, clock.now());
    res.json({ outcome, invoice: await getDetail(db, row.id, today) });
  });

  router.post('/:id/payments', async (req, res) => {
    const { id } = idParam.parse(req.params);
    can(req).throwUnlessCan('create', 'Payment');
    const input = paymentInputSchema.parse(req.body ?? {});
    const row = await visibleInvoice(req, db, id);
    can(req).throwUnlessCan('create', subject('Payment', { memberId: row.member_id }));
    const payment = await db.transaction().execute(async (trx) => {
      const recorded = await recordManualPayment(trx, row.id, input, userOf(req).id);
      await queueReceipt(trx, queue, recorded.id);
      return recorded;
    });
    await closeStaleCheckouts(db, config, row.id, clock.now(), queue);
    const { today } = await coopToday(db, clock.now());
    res.status(201).json({ payment, invoice: await getDetail(db, row.id, today) });
  });

  router.post('/:id/void', async (req, res) => {
    const { id } = idParam.parse(req.params);
    can(req).throwUnlessCan('create', 'CreditNote');
    const input = voidInvoiceSchema.parse(req.body ?? {});
    const row = await visibleInvoice(req, db, id);
    can(req).throwUnlessCan('update', subject('Invoice', { memberId: row.member_id }));
    const result = await db.transaction().execute(async (trx) => {
      const { today } = await coopToday(trx, clock.now());
      return voidInvoice(trx, row.id, input, today, userOf(req).id);
    });
    await closeStaleCheckouts(db, config, row.id, clock.now(), queue);
    const { today } = await coopToday(db, clock.now());
    res.json({ ...result, invoice: await getDetail(db, row.id, today) });
  });

  router.post('/:id/refunds', async (req, res) => {
    const { id } = idParam.parse(req.params);
    can(req).throwUnlessCan('create', 'CreditNote');
    const input = refundInputSchema.parse(req.body ?? {});
    const row = await visibleInvoice(req, db, id);
    can(req).throwUnlessCan('create', subject('CreditNote', { memberId: row.member_id }));
    const result = await db.transaction().execute(async (trx) => {
      const { today } = await coopToday(trx, clock.now());
      return refundInvoice(trx, row.id, input, today, userOf(req).id);
    });
    await closeStaleCheckouts(db, config, row.id, clock.now(), queue);
    const { today } = await coopToday(db, clock.now());
    res.status(201).json({ ...result, invoice: await getDetail(db, row.id, today) });
  });

  return router;
}

export function pricesRoutes({ db, clock }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'Price' });
  router.use(requireUser);

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('read', 'PriceList');
    const { prices, taxRates, today } = await listPrices(db, clock.now());
    const profile = await getBillingProfile(db);
    res.json({ items: prices, total: prices.length, page: 1, pageSize: Math.max(prices.length, 1), taxRates, currency: profile.currency, today });
  });

  router.post('/', async (req, res) => {
    can(req).throwUnlessCan('create', 'PriceList');
    const input = priceInputSchema.parse(req.body ?? {});
    res.status(201).json({ price: await addPrice(db, input, userOf(req).id, clock.now()) });
  });

  router.delete('/:id', async (req, res) => {
    can(req).throwUnlessCan('delete', 'PriceList');
    const { id } = idParam.parse(req.params);
    await removePrice(db, id, userOf(req).id, clock.now());
    res.status(204).end();
  });

  return router;
}

export function taxRatesRoutes({ db, clock }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'Tax rate' });
  router.use(requireUser);

  router.get('/', async (req, res) => {
    can(req).throwUnlessCan('read', 'PriceList');
    const { taxRates } = await listPrices(db, clock.now());
    res.json({ items: taxRates, total: taxRates.length, page: 1, pageSize: Math.max(taxRates.length, 1) });
  });

  router.post('/', async (req, res) => {
    can(req).throwUnlessCan('create', 'PriceList');
    const input = taxRateInputSchema.parse(req.body ?? {});
    res.status(201).json({ taxRate: await addTaxRate(db, input, userOf(req).id, clock.now()) });
  });

  router.delete('/:id', async (req, res) => {
    can(req).throwUnlessCan('delete', 'PriceList');
    const { id } = idParam.parse(req.params);
    await removeTaxRate(db, id, userOf(req).id, clock.now());
    res.status(204).end();
  });

  return router;
}

export function manualChargesRoutes({ db, clock }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'Charge' });
  router.use(requireUser);
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

export function billingRoutes({ db, clock }: Deps): Router {
  const router = Router();
  router.use(requireUser);
  uuidParams(router, { id: 'Overpayment' });

  router.get('/summary', async (req, res) => {
    requireEveryInvoice(req);
    res.json(await billingSummary(db, clock.now()));
  });

  router.get('/ageing', async (req, res) => {
    requireEveryInvoice(req);
    const q = ageingQuerySchema.parse(req.query);
    res.json(await ageingReport(db, clock.now(), q.asOf));
  });

  /** Online payments beyond what was due, for the treasurer to refund, a page at a time: `?open=true` for those still owed. */
  router.get('/overpayments', async (req, res) => {
    requireEveryInvoice(req);
    const q = listQuerySchema
      .pick({ page: true, pageSize: true })
      .extend({ open: z.enum(['true', 'false']).optional(), memberId: z.uuid().optional() })
      .parse(req.query);
    res.json(await pageOverpayments(db, { open: q.open === 'true', memberId: q.memberId, page: q.page, pageSize: q.pageSize }));
  });

  router.post('/overpayments/:id/refunded', async (req, res) => {
    const { id } = idParam.parse(req.params);
    can(req).throwUnlessCan('create', 'Payment');
    const input = overpaymentRefundSchema.parse(req.body ?? {});
    const row = await db.selectFrom('payment').select(['id', 'member_id']).where('id', '=', id).executeTakeFirst();
    if (!row) throw notFound('Overpayment');
    can(req).throwUnlessCan('create', subject('Payment', { memberId: row.member_id }));
    await db.transaction().execute((trx) => markOverpaymentRefunded(trx, row.id, input as Required<typeof input>, userOf(req).id));
    const [item] = await listOverpayments(db, { paymentId: row.id });
    res.json({ overpayment: item });
  });

  /** A member's own balance; the treasurer may ask for anyone's with ?memberId=. */
  router.get('/balance', async (req, res) => {
    can(req).throwUnlessCan('read', 'Invoice');
    const q = z.object({ memberId: z.uuid().optional() }).parse(req.query);
    const memberId = q.memberId ?? userOf(req).id;
    if (!req.ability.can('read', subject('Invoice', { memberId }))) throw notFound('Member');
    const [{ today }, profile] = await Promise.all([coopToday(db, clock.now()), getBillingProfile(db)]);
    res.json(await memberBalance(db, memberId, today, profile.currency));
  });

  router.get('/profile', async (req, res) => {
    can(req).throwUnlessCan('read', 'PriceList');
    res.json({ profile: await getBillingProfile(db) });
  });

  router.put('/profile', async (req, res) => {
    can(req).throwUnlessCan('update', 'PriceList');
    const input = billingProfileSchema.parse(req.body ?? {});
    const profile = await db.transaction().execute((trx) => putBillingProfile(trx, input, userOf(req).id));
    res.json({ profile });
  });

  return router;
}

/** A credit note as a document: `GET /api/credit-notes/:id/pdf` (the member it credits, and the treasurer). */
export function creditNotesRoutes({ db, clock }: Deps): Router {
  const router = Router();
  uuidParams(router, { id: 'Credit note' });
  router.use(requireUser);
  router.get('/:id/pdf', async (req, res) => {
    can(req).throwUnlessCan('read', 'CreditNote');
    const { id } = idParam.parse(req.params);
    const row = isUuid(id)
      ? await db.selectFrom('credit_note').select(['id', 'invoice_id', 'member_id', 'number']).where('id', '=', id).executeTakeFirst()
      : undefined;
    if (!row || !req.ability.can('read', subject('CreditNote', { memberId: row.member_id }))) throw notFound('Credit note');
    const { today } = await coopToday(db, clock.now());
    const invoice = await getDetail(db, row.invoice_id, today);
    const note = invoice.creditNotes.find((n) => n.id === row.id)!;
    const payback = invoice.payments.find((p) => p.creditNoteId === row.id);
    const pdf = await renderCreditNotePdf({
      note,
      invoice,
      profile: await getBillingProfile(db),
      refund: payback ? { amountCents: -payback.amountCents, method: payback.method === 'cash' ? 'cash' : 'bank_transfer', on: payback.receivedOn } : null,
    });
    res
      .type('application/pdf')
      .set('Content-Disposition', `inline; filename="credit-note-${row.number}.pdf"`)
      .set('Cache-Control', 'private, no-store')
      .send(pdf);
  });
  return router;
}

/** The payment provider's webhook: no session, no CSRF token; the signature over the raw body is the check. */
export function paymentWebhookRoutes({ db, config, clock, queue }: Deps): Router {
  const router = Router();
  router.post('/payments', async (req, res) => {
    const signature = req.get('stripe-signature');
    if (!signature) throw badRequest('The Stripe-Signature header is missing.');
    if (!Buffer.isBuffer(req.body) || req.body.length === 0) throw badRequest('The webhook body is empty.');
    let event;
    try {
      event = verifyWebhook(config, req.body, signature);
    } catch (err) {
      req.log?.warn({ err: (err as Error).message }, 'payment webhook with a bad signature');
      throw badRequest('The signature does not match the body: the event is rejected.');
    }
    const result = await handleProviderEvent(db, event, clock.now(), queue);
    res.json({ received: true, ...result });
  });
  return router;
}
