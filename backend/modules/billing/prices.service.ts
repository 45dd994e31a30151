import { periodBounds } from '../../../shared/billing/dates.ts';
import type { ManualCharge, ManualChargeInput, Price, PriceInput, TaxRate, TaxRateInput } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound, unprocessable } from '../../lib/http-problem.ts';
import { coopToday } from './billing-profile.service.ts';
import { priceCharge } from './charges/index.ts';
import { manualChargeDraft } from './charges/manual-charges.ts';
import { lockPeriod } from './invoice-runs.repository.ts';
import { appendToDraft } from './invoice-commands.service.ts';
import { PriceBook } from './price-book.ts';
import {
  allPrices,
  allTaxRates,
  deleteById,
  findUserId,
  insertManualCharge,
  insertPrice,
  insertTaxRate,
  lockDated,
  lockManualCharge,
  lockMemberInvoice,
  manualChargesQuery,
} from './prices.repository.ts';
import { isUuid } from '../../lib/uuid-params.ts';

/** The whole price list, history included; `current` marks each item's (and band's) price in effect today. */
export async function listPrices(db: Database, now: Date): Promise<{ prices: Price[]; taxRates: TaxRate[]; today: string }> {
  const { today } = await coopToday(db, now);
  const [prices, taxes] = await Promise.all([allPrices(db), allTaxRates(db)]);
  const book = new PriceBook(
    prices.map((p) => ({ id: p.id, item: p.item, bandMaxLiters: p.band_max_liters, unitCents: p.unit_cents, effectiveFrom: p.effective_from })),
    taxes.map((t) => ({ id: t.id, rateBp: t.rate_bp, label: t.label, effectiveFrom: t.effective_from })),
  );
  const currentTax = book.taxOn(today)?.id;
  return {
    today,
    prices: prices.map((p) => toPrice(p, book.priceOn(p.item, today, p.band_max_liters)?.id === p.id)),
    taxRates: taxes.map((t) => toTaxRate(t, t.id === currentTax)),
  };
}

type PriceRow = Awaited<ReturnType<typeof allPrices>>[number];
type TaxRateRow = Awaited<ReturnType<typeof allTaxRates>>[number];

function toPrice(p: PriceRow, current: boolean): Price {
  return {
    id: p.id,
    item: p.item,
    bandMaxLiters: p.band_max_liters,
    unitCents: p.unit_cents,
    effectiveFrom: p.effective_from,
    note: p.note,
    current,
    createdAt: p.created_at.toISOString(),
  };
}

const toTaxRate = (t: TaxRateRow, current: boolean): TaxRate => ({ id: t.id, rateBp: t.rate_bp, label: t.label, effectiveFrom: t.effective_from, current });

function notBackdated(effectiveFrom: string, today: string) {
  if (effectiveFrom < today) {
    throw unprocessable('A price change applies from its date on, never retroactively: pick today or a later date.', [
      { path: 'effectiveFrom', message: `From ${today} or later` },
    ]);
  }
}

export async function addPrice(db: Database, input: Required<PriceInput>, actorId: string, now: Date): Promise<Price> {
  return db.transaction().execute(async (trx) => {
    const { today } = await coopToday(trx, now);
    notBackdated(input.effectiveFrom, today);
    const { item, bandMaxLiters, unitCents, effectiveFrom, note } = input;
    const row = await insertPrice(trx, {
      item,
      band_max_liters: bandMaxLiters,
      unit_cents: unitCents,
      effective_from: effectiveFrom,
      note,
      created_by: actorId,
    });
    if (!row) throw conflict('That item (and band) already has a price from that date; remove it first if it has not started yet.');
    await audit(trx, actorId, 'created', 'Price', row.id, { ...input });
    return toPrice(row, row.effective_from <= today);
  });
}

export async function addTaxRate(db: Database, input: TaxRateInput, actorId: string, now: Date): Promise<TaxRate> {
  return db.transaction().execute(async (trx) => {
    const { today } = await coopToday(trx, now);
    notBackdated(input.effectiveFrom, today);
    const row = await insertTaxRate(trx, { rate_bp: input.rateBp, label: input.label, effective_from: input.effectiveFrom, created_by: actorId });
    if (!row) throw conflict('A tax rate already starts on that date.');
    await audit(trx, actorId, 'created', 'TaxRate', row.id, { ...input });
    return toTaxRate(row, row.effective_from <= today);
  });
}

/** What withdrawing each dated kind of entry names, refuses with and audits. */
const datedKinds = {
  price: {
    subject: 'Price',
    missing: 'Price',
    applied: 'This price has already applied; it stays in the history. Add a new price from a later date instead.',
    detail: (row: PriceRow) => ({ item: row.item, effectiveFrom: row.effective_from, unitCents: row.unit_cents }),
  },
  tax_rate: {
    subject: 'TaxRate',
    missing: 'Tax rate',
    applied: 'This tax rate has already applied; it stays in the history.',
    detail: (row: TaxRateRow) => ({ rateBp: row.rate_bp, effectiveFrom: row.effective_from }),
  },
} as const;

/** Only a price or tax rate that has not started yet may be withdrawn; one that has applied is history. */
async function withdrawDated(db: Database, table: keyof typeof datedKinds, id: string, actorId: string, now: Date): Promise<void> {
  const kind = datedKinds[table];
  if (!isUuid(id)) throw notFound(kind.missing);
  await db.transaction().execute(async (trx) => {
    const { today } = await coopToday(trx, now);
    const row = await lockDated(trx, table, id);
    if (!row) throw notFound(kind.missing);
    if (row.effective_from <= today) throw conflict(kind.applied);
    await deleteById(trx, table, id);
    await audit(trx, actorId, 'withdrawn', kind.subject, id, (kind.detail as (r: typeof row) => Record<string, unknown>)(row));
  });
}

export const removePrice = (db: Database, id: string, actorId: string, now: Date) => withdrawDated(db, 'price', id, actorId, now);

export const removeTaxRate = (db: Database, id: string, actorId: string, now: Date) => withdrawDated(db, 'tax_rate', id, actorId, now);

// ---- Manual charges and credits ----

function toManual(r: Awaited<ReturnType<ReturnType<typeof manualChargesQuery>['executeTakeFirstOrThrow']>>): ManualCharge {
  return {
    id: r.id,
    memberId: r.member_id,
    memberName: r.member_name,
    period: r.period,
    description: r.description,
    reason: r.reason,
    amountCents: r.amount_cents,
    taxable: r.taxable,
    invoiceId: r.invoice_id,
    createdAt: r.created_at.toISOString(),
  };
}

export async function listManualCharges(db: Database, filter: { period?: string; memberId?: string }): Promise<ManualCharge[]> {
  let q = manualChargesQuery(db).orderBy('m.created_at', 'desc').limit(200);
  if (filter.period) q = q.where('m.period', '=', filter.period);
  if (filter.memberId) q = q.where('m.member_id', '=', filter.memberId);
  return (await q.execute()).map(toManual);
}

/**
 * Adds a charge or credit for a member and period. If the member's invoice for that period is
 * still a draft it goes straight onto it; once issued, that period is closed for them (pick the
 * next one), so an issued invoice never changes.
 */
export async function addManualCharge(db: Database, input: Required<ManualChargeInput>, actorId: string, now: Date): Promise<ManualCharge> {
  return db.transaction().execute(async (trx) => {
    await lockPeriod(trx, input.period, 'alone');
    const member = await findUserId(trx, input.memberId);
    if (!member) throw unprocessable('No such member.', [{ path: 'memberId', message: 'Pick a member' }]);
    const invoice = await lockMemberInvoice(trx, input.memberId, input.period);
    if (invoice && invoice.status !== 'draft') {
      throw conflict(`This member's invoice for ${input.period} (${invoice.number ?? 'void'}) is ${invoice.status}; add the charge to a later period.`);
    }
    const { memberId, period, description, reason, amountCents, taxable } = input;
    const row = await insertManualCharge(trx, { member_id: memberId, period, description, reason, amount_cents: amountCents, taxable, created_by: actorId });
    if (invoice) {
      const { timeZone } = await coopToday(trx, now);
      const { first, last, next } = periodBounds(input.period);
      const book = await PriceBook.load(trx);
      await appendToDraft(trx, invoice.id, priceCharge({ period, first, last, next, timeZone, book }, manualChargeDraft({ first, last }, row)), now);
    }
    await audit(trx, actorId, input.amountCents < 0 ? 'credit_added' : 'charge_added', 'Charge', row.id, { ...input, invoiceId: invoice?.id ?? null });
    return toManual(await manualChargesQuery(trx).where('m.id', '=', row.id).executeTakeFirstOrThrow());
  });
}

export async function removeManualCharge(db: Database, id: string, actorId: string): Promise<void> {
  if (!isUuid(id)) throw notFound('Charge');
  await db.transaction().execute(async (trx) => {
    const row = await lockManualCharge(trx, id);
    if (!row) throw notFound('Charge');
    if (row.invoice_line_id) throw conflict('This charge is on an invoice already; credit it on a later period instead.');
    await deleteById(trx, 'manual_charge', id);
    await audit(trx, actorId, 'removed', 'Charge', id, { memberId: row.member_id, period: row.period, amountCents: row.amount_cents });
  });
}
