import { splitGross } from '../../../shared/billing/money.ts';
import type { RefundInput, VoidInvoiceInput } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, unprocessable } from '../../lib/http-problem.ts';
import { isUuid } from '../../lib/uuid-params.ts';
import { creditedSoFar, findCreditNote, insertCreditNote, insertCreditNoteLines } from './credit-notes.repository.ts';
import { addCredited, lineTaxRates, updateInvoice } from './invoice-commands.repository.ts';
import { lockInvoice, recordPayment, settle } from './invoice-commands.service.ts';
import { renderCreditNotePdf } from './invoice-pdf.ts';
import { coopProfile } from '../settings/settings.service.ts';
import { invoiceLines } from './invoice-queries.repository.ts';
import { detailAsOf } from './invoice-queries.service.ts';
import { takeNumber } from './numbering.ts';

async function issueCreditNote(
  trx: Database,
  inv: { id: string; member_id: string; currency: string },
  args: {
    kind: 'void' | 'refund';
    reason: string;
    today: string;
    now: Date;
    lines: { invoiceLineId: string | null; description: string; amountCents: number; taxRateBp: number; taxCents: number }[];
  },
  actorId: string,
): Promise<string> {
  const subtotal = args.lines.reduce((s, l) => s + l.amountCents, 0);
  const tax = args.lines.reduce((s, l) => s + l.taxCents, 0);
  const { number, seq, year } = await takeNumber(trx, 'credit_note', Number(args.today.slice(0, 4)));
  const note = await insertCreditNote(trx, {
    number,
    number_year: year,
    number_seq: seq,
    invoice_id: inv.id,
    member_id: inv.member_id,
    kind: args.kind,
    reason: args.reason,
    issued_on: args.today,
    currency: inv.currency,
    subtotal_cents: subtotal,
    tax_cents: tax,
    total_cents: subtotal + tax,
    created_by: actorId,
  });
  await insertCreditNoteLines(
    trx,
    args.lines.map((l, i) => ({
      credit_note_id: note.id,
      position: i + 1,
      invoice_line_id: l.invoiceLineId,
      description: l.description,
      amount_cents: l.amountCents,
      tax_rate_bp: l.taxRateBp,
      tax_cents: l.taxCents,
    })),
  );
  await addCredited(trx, inv.id, subtotal + tax, args.now);
  await audit(trx, actorId, 'credit_note_issued', 'Invoice', inv.id, { creditNote: number, kind: args.kind, totalCents: subtotal + tax });
  return note.id;
}

/**
 * Voids an invoice. It is never deleted: an issued one is replaced by a credit note for whatever
 * earlier credit notes have not already credited, line by line. A draft (never sent, no number)
 * needs no credit note. Money already paid is paid back when a refund method is given, otherwise
 * it stays as credit on the member's account.
 */
export async function voidInvoice(trx: Database, invoiceId: string, input: Required<VoidInvoiceInput>, today: string, actorId: string, now: Date) {
  const inv = await lockInvoice(trx, invoiceId);
  if (inv.status === 'void') throw conflict('This invoice is already void.');
  let creditNoteId: string | null = null;
  if (inv.status !== 'draft') {
    const remaining = inv.total_cents - inv.credited_cents;
    if (remaining > 0) {
      const lines = await invoiceLines(trx, invoiceId);
      const cnLines = lines.map((l): { invoiceLineId: string | null; description: string; amountCents: number; taxRateBp: number; taxCents: number } => ({
        invoiceLineId: l.id,
        description: `${l.description} — ${l.source_label}`,
        amountCents: l.amount_cents,
        taxRateBp: l.tax_rate_bp,
        taxCents: l.tax_cents,
      }));
      if (inv.credited_cents > 0) {
        const earlier = await creditedSoFar(trx, invoiceId);
        cnLines.push({
          invoiceLineId: null,
          description: 'Less credit notes already issued on this invoice',
          amountCents: -Number(earlier.subtotal ?? 0),
          taxRateBp: 0,
          taxCents: -Number(earlier.tax ?? 0),
        });
      }
      creditNoteId = await issueCreditNote(trx, inv, { kind: 'void', reason: input.reason, today, now, lines: cnLines }, actorId);
    }
  }
  await updateInvoice(trx, invoiceId, { status: 'void', voided_at: now, void_reason: input.reason }, now);
  await audit(trx, actorId, 'voided', 'Invoice', invoiceId, { reason: input.reason, creditNoteId });
  if (creditNoteId && input.refundMethod && inv.paid_cents > 0) {
    await recordPayment(
      trx,
      invoiceId,
      { amountCents: -inv.paid_cents, method: input.refundMethod, receivedOn: today, note: `Refund on voiding: ${input.reason}`, creditNoteId },
      actorId,
      now,
    );
  }
  return { creditNoteId };
}

/**
 * A refund or partial credit: a credit note for an amount including tax, split into net and tax at
 * the invoice's rate (net rounded half-up, tax the rest). With a refund method the money is also
 * paid back, which needs that much to have been paid.
 */
export async function refundInvoice(trx: Database, invoiceId: string, input: Required<RefundInput>, today: string, actorId: string, now: Date) {
  const inv = await lockInvoice(trx, invoiceId);
  if (inv.status !== 'issued' && inv.status !== 'paid') throw conflict(`Only an issued or paid invoice can be credited; this one is ${inv.status}.`);
  const creditable = inv.total_cents - inv.credited_cents;
  if (input.amountCents > creditable) {
    throw unprocessable(`At most ${creditable} cents can still be credited.`, [{ path: 'amountCents', message: `At most ${creditable} cents` }]);
  }
  if (input.refundMethod && input.amountCents > inv.paid_cents) {
    throw unprocessable(`Only ${inv.paid_cents} cents have been paid, so no more can be paid back.`, [
      { path: 'amountCents', message: `At most ${inv.paid_cents} cents were paid` },
    ]);
  }
  const rates = await lineTaxRates(trx, invoiceId);
  const taxedRates = [...new Set(rates.map((r) => r.tax_rate_bp))];
  if (taxedRates.length > 1) {
    throw unprocessable('This invoice has lines at several tax rates; void it and bill again instead of a partial credit.');
  }
  const rateBp = taxedRates[0] ?? 0;
  const { netCents, taxCents } = splitGross(input.amountCents, rateBp);
  const creditNoteId = await issueCreditNote(
    trx,
    inv,
    {
      kind: 'refund',
      reason: input.reason,
      today,
      now,
      lines: [{ invoiceLineId: null, description: `Credit: ${input.reason}`, amountCents: netCents, taxRateBp: rateBp, taxCents }],
    },
    actorId,
  );
  if (input.refundMethod) {
    await recordPayment(
      trx,
      invoiceId,
      { amountCents: -input.amountCents, method: input.refundMethod, receivedOn: today, note: `Refund: ${input.reason}`, creditNoteId },
      actorId,
      now,
    );
  }
  await settle(trx, invoiceId, now);
  return { creditNoteId };
}

/** A credit note's invoice, member and number, for the permission check; undefined when there is none. */
export async function creditNoteOwner(db: Database, id: string) {
  const row = isUuid(id) ? await findCreditNote(db, id) : undefined;
  return row && { id: row.id, invoiceId: row.invoice_id, memberId: row.member_id, number: row.number };
}

/** The credit note as a PDF, with the money paid back on it, if any. */
export async function creditNotePdf(db: Database, note: { id: string; invoiceId: string }, now: Date): Promise<Buffer> {
  const invoice = await detailAsOf(db, note.invoiceId, now);
  const credit = invoice.creditNotes.find((n) => n.id === note.id)!;
  const payback = invoice.payments.find((p) => p.creditNoteId === note.id);
  return renderCreditNotePdf({
    note: credit,
    invoice,
    profile: await coopProfile(db),
    producedAt: now,
    refund: payback ? { amountCents: -payback.amountCents, method: payback.method === 'cash' ? 'cash' : 'bank_transfer', on: payback.receivedOn } : null,
  });
}
