import type { Selectable } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import type { InvoiceLineTable, InvoiceTable, PriceTable, TaxRateTable } from '../../backend/db/tables/billing.ts';
import { coopTimeZone, getBillingProfile } from '../../backend/modules/billing/billing-profile.service.ts';
import { deriveCharges } from '../../backend/modules/billing/charges/index.ts';
import { createInvoice as makeInvoice, issueInvoice, recordManualPayment } from '../../backend/modules/billing/invoices.service.ts';
import { PriceBook } from '../../backend/modules/billing/price-book.ts';
import { periodBounds, periodLabel } from '../../shared/billing/dates.ts';
import type { PriceItem } from '../../shared/schemas/billing.ts';
import { type At, inTransaction, LONG_AGO, noonOf, toDate } from './common.ts';

export type PriceRow = Selectable<PriceTable>;
export type TaxRateRow = Selectable<TaxRateTable>;
export type InvoiceRow = Selectable<InvoiceTable>;
export type InvoiceLineRow = Selectable<InvoiceLineTable>;

export interface PriceOverrides {
  item: PriceItem;
  /** Fermenter-days only: the capacity band (litres) the price covers. */
  bandMaxLiters?: number | null;
  unitCents: number;
  /** 'YYYY-MM-DD'. */
  effectiveFrom: string;
  note?: string;
  createdBy?: string | null;
  createdAt?: At;
}

/** One dated price-list entry. */
export function createPrice(db: Database, o: PriceOverrides): Promise<PriceRow> {
  return db
    .insertInto('price')
    .values({
      item: o.item,
      band_max_liters: o.bandMaxLiters ?? null,
      unit_cents: o.unitCents,
      effective_from: o.effectiveFrom,
      note: o.note ?? '',
      created_by: o.createdBy ?? null,
      created_at: toDate(o.createdAt ?? LONG_AGO, 'createdAt'),
    })
    .returningAll()
    .executeTakeFirstOrThrow();
}

/** A tax rate (basis points: 800 is 8 %) from a date. */
export function createTaxRate(
  db: Database,
  o: { rateBp: number; effectiveFrom: string; label?: string; createdBy?: string | null; createdAt?: At },
): Promise<TaxRateRow> {
  return db
    .insertInto('tax_rate')
    .values({
      rate_bp: o.rateBp,
      label: o.label ?? 'VAT',
      effective_from: o.effectiveFrom,
      created_by: o.createdBy ?? null,
      created_at: toDate(o.createdAt ?? LONG_AGO, 'createdAt'),
    })
    .returningAll()
    .executeTakeFirstOrThrow();
}

export interface InvoiceOverrides {
  memberId: string;
  /** 'YYYY-MM'; it must have ended by `today`. */
  period: string;
  /** The co-op's date the invoice is made (and issued) on, 'YYYY-MM-DD'. */
  today: string;
  /** Default true: issued (numbered, dated `today`, due after the payment terms); false leaves a draft. */
  issue?: boolean;
  /** Who ran it (the audit row's actor). */
  actorId?: string | null;
  /** When it was made (and issued): the invoice's stamps. Default noon UTC on `today`. */
  at?: At;
}

export interface InvoiceWithLines extends InvoiceRow {
  lines: InvoiceLineRow[];
}

/**
 * The member's invoice for a period, made as an invoice run makes it: the real charge sources
 * (bookings, keg holds and fills, cleaning, finings, dues, manual charges) derived for this member
 * only, priced from the price list, then (unless `issue: false`) issued on `today`.
 * Throws when the period has not ended by `today`, a price is missing, or there is nothing to bill.
 */
export async function createInvoice(db: Database, o: InvoiceOverrides): Promise<InvoiceWithLines> {
  return inTransaction(db, async (trx) => {
    const { first, last, next } = periodBounds(o.period);
    if (next > o.today) throw new Error(`createInvoice: ${periodLabel(o.period)} has not ended by ${o.today}`);
    const ctx = { period: o.period, first, last, next, timeZone: await coopTimeZone(trx), book: await PriceBook.load(trx), memberIds: [o.memberId] };
    const { byMember, problems } = await deriveCharges(trx, ctx);
    if (problems.length) throw new Error(`createInvoice: ${problems.join(' ')}`);
    const lines = byMember.get(o.memberId) ?? [];
    if (lines.length === 0) throw new Error(`createInvoice: nothing to bill for ${o.period}`);
    const profile = await getBillingProfile(trx);
    const at = toDate(o.at ?? noonOf(o.today), 'at');
    const id = await makeInvoice(trx, { runId: null, memberId: o.memberId, period: o.period, currency: profile.currency, lines, now: at });
    if (!id) throw new Error(`createInvoice: the member already has an invoice for ${o.period}`);
    if (o.issue !== false) await issueInvoice(trx, id, o.today, o.actorId ?? null, at);
    const invoice = await trx.selectFrom('invoice').selectAll().where('id', '=', id).executeTakeFirstOrThrow();
    const rows = await trx.selectFrom('invoice_line').selectAll().where('invoice_id', '=', id).orderBy('position').execute();
    return { ...invoice, lines: rows };
  });
}

/** A charge (positive) or credit (negative) entered by hand for a member's period, not yet invoiced. */
export function createManualCharge(
  db: Database,
  o: {
    memberId: string;
    period: string;
    amountCents: number;
    description?: string;
    reason?: string;
    taxable?: boolean;
    createdBy?: string | null;
    createdAt?: At;
  },
) {
  return db
    .insertInto('manual_charge')
    .values({
      member_id: o.memberId,
      period: o.period,
      description: o.description ?? (o.amountCents > 0 ? 'Part supplied' : 'Goodwill credit'),
      reason: o.reason ?? 'Entered by the treasurer',
      amount_cents: o.amountCents,
      taxable: o.taxable ?? true,
      created_by: o.createdBy ?? null,
      created_at: toDate(o.createdAt ?? LONG_AGO, 'createdAt'),
    })
    .returningAll()
    .executeTakeFirstOrThrow();
}

/**
 * A payment the treasurer received by hand on an issued invoice (whole or part, never more than is due),
 * recorded as `POST /api/invoices/:id/payments` records it.
 */
export function createInvoicePayment(
  db: Database,
  o: {
    invoiceId: string;
    amountCents: number;
    receivedOn: string;
    method?: 'bank_transfer' | 'cash';
    reference?: string;
    note?: string;
    actorId: string;
    at?: At;
  },
) {
  return inTransaction(db, (trx) =>
    recordManualPayment(
      trx,
      o.invoiceId,
      { amountCents: o.amountCents, method: o.method ?? 'bank_transfer', receivedOn: o.receivedOn, reference: o.reference ?? '', note: o.note ?? '' },
      o.actorId,
      toDate(o.at ?? noonOf(o.receivedOn), 'at'),
    ),
  );
}
