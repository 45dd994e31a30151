import { addDays } from '../../../shared/billing/dates.ts';
import type { Payment, PaymentMethod } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound, unprocessable } from '../../lib/http-problem.ts';
import { isUuid } from '../../lib/uuid-params.ts';
import { coopToday, getBillingProfile } from './billing-profile.service.ts';
import type { PricedCharge } from './charges/index.ts';
import {
  addPaid,
  insertInvoiceLines,
  insertInvoiceUnlessExists,
  insertPayment,
  lastLinePosition,
  lockInvoiceRow,
  recomputeTotals,
  settleStatus,
  updateInvoice,
} from './invoice-commands.repository.ts';
import { toPayment } from './invoice-queries.service.ts';
import { takeNumber } from './numbering.ts';

/** Locks an invoice row for the rest of the transaction. */
export async function lockInvoice(trx: Database, id: string) {
  if (!isUuid(id)) throw notFound('Invoice');
  const row = await lockInvoiceRow(trx, id);
  if (!row) throw notFound('Invoice');
  return row;
}

/** Moves an issued invoice to paid at `now` when nothing is left to pay, and back when a correction reopens it. */
export async function settle(trx: Database, invoiceId: string, now: Date) {
  await settleStatus(trx, invoiceId, now);
}

/**
 * Makes the member's invoice for the period from its priced charges, unless one exists already:
 * the unique (member, period) constraint decides, so a concurrent run waits here and then makes none.
 * Returns the new invoice's id, or null when the member already has one for the period.
 */
export async function createInvoice(
  trx: Database,
  args: { runId: string | null; memberId: string; period: string; currency: string; lines: PricedCharge[]; now: Date },
): Promise<string | null> {
  const created = await insertInvoiceUnlessExists(trx, { run_id: args.runId, member_id: args.memberId, period: args.period, currency: args.currency });
  if (!created) return null;
  await insertLines(trx, created.id, args.lines, 1);
  await recomputeTotals(trx, created.id, args.now);
  return created.id;
}

async function insertLines(trx: Database, invoiceId: string, lines: PricedCharge[], firstPosition: number) {
  await insertInvoiceLines(
    trx,
    lines.map((l, i) => ({
      invoice_id: invoiceId,
      position: firstPosition + i,
      item: l.item,
      description: l.description,
      source_type: l.sourceType,
      source_id: l.sourceId,
      source_label: l.sourceLabel,
      service_from: l.serviceFrom,
      service_to: l.serviceTo,
      quantity: l.quantity,
      unit: l.unit,
      unit_price_cents: l.unitPriceCents,
      amount_cents: l.amountCents,
      tax_rate_bp: l.taxRateBp,
      tax_cents: l.taxCents,
      price_id: l.priceId,
    })),
  );
}

/** Adds a manual charge to a member's draft invoice (the run has already made it). */
export async function appendToDraft(trx: Database, invoiceId: string, line: PricedCharge, now: Date) {
  await insertLines(trx, invoiceId, [line], (await lastLinePosition(trx, invoiceId)) + 1);
  await recomputeTotals(trx, invoiceId, now);
}

/** Issues a draft at `now`: takes the next gapless number of the issue year, dates it `today` and sets the due date. */
export async function issueInvoice(trx: Database, invoiceId: string, today: string, actorId: string | null, now: Date): Promise<void> {
  const inv = await lockInvoice(trx, invoiceId);
  if (inv.status !== 'draft') throw conflict(`This invoice is ${inv.status}, not a draft.`);
  const profile = await getBillingProfile(trx);
  const { number, seq, year } = await takeNumber(trx, 'invoice', Number(today.slice(0, 4)));
  await updateInvoice(
    trx,
    invoiceId,
    {
      status: 'issued',
      number,
      number_year: year,
      number_seq: seq,
      issued_on: today,
      due_on: addDays(today, profile.paymentTermsDays),
    },
    now,
  );
  await settle(trx, invoiceId, now);
  await audit(trx, actorId, 'issued', 'Invoice', invoiceId, { number });
}

export async function recordPayment(
  trx: Database,
  invoiceId: string,
  p: {
    amountCents: number;
    method: PaymentMethod;
    receivedOn: string;
    reference?: string;
    note?: string;
    checkoutSessionId?: string | null;
    creditNoteId?: string | null;
    /** Of amountCents, what is beyond what the invoice owes: kept on the payment, not counted as paid. */
    overpaidCents?: number;
  },
  actorId: string | null,
  now: Date,
): Promise<Payment> {
  const inv = await lockInvoice(trx, invoiceId);
  const row = await insertPayment(trx, {
    invoice_id: invoiceId,
    member_id: inv.member_id,
    method: p.method,
    amount_cents: p.amountCents,
    currency: inv.currency,
    received_on: p.receivedOn,
    reference: p.reference ?? '',
    note: p.note ?? '',
    checkout_session_id: p.checkoutSessionId ?? null,
    credit_note_id: p.creditNoteId ?? null,
    recorded_by: actorId,
    overpaid_cents: p.overpaidCents ?? 0,
  });
  await addPaid(trx, invoiceId, p.amountCents - (p.overpaidCents ?? 0), now);
  await settle(trx, invoiceId, now);
  await audit(trx, actorId, p.amountCents < 0 ? 'refunded' : 'payment_recorded', 'Invoice', invoiceId, {
    paymentId: row.id,
    amountCents: p.amountCents,
    method: p.method,
  });
  return toPayment(row);
}

/** A bank transfer or cash received by the treasurer: whole or part, never more than is due. */
export async function recordManualPayment(
  trx: Database,
  invoiceId: string,
  p: { amountCents: number; method: 'bank_transfer' | 'cash'; receivedOn: string; reference: string; note: string },
  actorId: string,
  now: Date,
): Promise<Payment> {
  const inv = await lockInvoice(trx, invoiceId);
  if (inv.status !== 'issued') throw conflict(`Only an issued invoice takes payments; this one is ${inv.status}.`);
  const due = inv.total_cents - inv.paid_cents - inv.credited_cents;
  if (p.amountCents > due) {
    throw unprocessable(`Only ${due} cents are due on this invoice.`, [{ path: 'amountCents', message: `At most ${due} cents are due` }]);
  }
  return recordPayment(trx, invoiceId, p, actorId, now);
}

/** Issues a draft on the co-op's date at `now`, in one transaction. */
export async function issueDraft(db: Database, invoiceId: string, now: Date, actorId: string): Promise<void> {
  await db.transaction().execute(async (trx) => {
    const { today } = await coopToday(trx, now);
    await issueInvoice(trx, invoiceId, today, actorId, now);
  });
}

/** Marks an invoice sent to `to` at `now`. */
export async function markSent(trx: Database, invoiceId: string, actorId: string, to: string, now: Date) {
  await updateInvoice(trx, invoiceId, { sent_at: now }, now);
  await audit(trx, actorId, 'sent', 'Invoice', invoiceId, { to });
}
