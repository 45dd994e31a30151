import { sql } from 'kysely';
import { periodBounds } from '../../../shared/billing/dates.ts';
import type { ManualCharge, ManualChargeInput, Price, PriceInput, TaxRate, TaxRateInput } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound, unprocessable } from '../../lib/http-problem.ts';
import { coopToday } from './billing-profile.service.ts';
import { priceCharge } from './charges/index.ts';
import { BILLING_LOCK } from './invoice-runs.service.ts';
import { appendToDraft } from './invoice-commands.service.ts';
import { PriceBook } from './price-book.ts';
import { isUuid } from '../../lib/uuid-params.ts';

/** The whole price list, history included; `current` marks each item's (and band's) price in effect today. */
export async function listPrices(db: Database, now: Date): Promise<{ prices: Price[]; taxRates: TaxRate[]; today: string }> {
  const { today } = await coopToday(db, now);
  const [prices, taxes] = await Promise.all([
    db.selectFrom('price').selectAll().orderBy('item').orderBy('band_max_liters').orderBy('effective_from', 'desc').execute(),
    db.selectFrom('tax_rate').selectAll().orderBy('effective_from', 'desc').execute(),
  ]);
  const book = new PriceBook(
    prices.map((p) => ({ id: p.id, item: p.item, bandMaxLiters: p.band_max_liters, unitCents: p.unit_cents, effectiveFrom: p.effective_from })),
    taxes.map((t) => ({ id: t.id, rateBp: t.rate_bp, label: t.label, effectiveFrom: t.effective_from })),
  );
  const currentTax = book.taxOn(today)?.id;
  return {
    today,
    prices: prices.map((p) => ({
      id: p.id,
      item: p.item,
      bandMaxLiters: p.band_max_liters,
      unitCents: p.unit_cents,
      effectiveFrom: p.effective_from,
      note: p.note,
      current: book.priceOn(p.item, today, p.band_max_liters)?.id === p.id,
      createdAt: p.created_at.toISOString(),
    })),
    taxRates: taxes.map((t) => ({ id: t.id, rateBp: t.rate_bp, label: t.label, effectiveFrom: t.effective_from, current: t.id === currentTax })),
  };
}

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
    const row = await trx
      .insertInto('price')
      .values({
        item: input.item,
        band_max_liters: input.bandMaxLiters,
        unit_cents: input.unitCents,
        effective_from: input.effectiveFrom,
        note: input.note,
        created_by: actorId,
      })
      .onConflict((oc) => oc.doNothing())
      .returningAll()
      .executeTakeFirst();
    if (!row) throw conflict('That item (and band) already has a price from that date; remove it first if it has not started yet.');
    await audit(trx, actorId, 'created', 'Price', row.id, { ...input });
    return {
      id: row.id,
      item: row.item,
      bandMaxLiters: row.band_max_liters,
      unitCents: row.unit_cents,
      effectiveFrom: row.effective_from,
      note: row.note,
      current: row.effective_from <= today,
      createdAt: row.created_at.toISOString(),
    };
  });
}

/** Only a price that has not started yet may be withdrawn; one that has applied is history. */
export async function removePrice(db: Database, id: string, actorId: string, now: Date): Promise<void> {
  if (!isUuid(id)) throw notFound('Price');
  await db.transaction().execute(async (trx) => {
    const { today } = await coopToday(trx, now);
    const row = await trx.selectFrom('price').selectAll().where('id', '=', id).forUpdate().executeTakeFirst();
    if (!row) throw notFound('Price');
    if (row.effective_from <= today) throw conflict('This price has already applied; it stays in the history. Add a new price from a later date instead.');
    await trx.deleteFrom('price').where('id', '=', id).execute();
    await audit(trx, actorId, 'withdrawn', 'Price', id, { item: row.item, effectiveFrom: row.effective_from, unitCents: row.unit_cents });
  });
}

export async function addTaxRate(db: Database, input: TaxRateInput, actorId: string, now: Date): Promise<TaxRate> {
  return db.transaction().execute(async (trx) => {
    const { today } = await coopToday(trx, now);
    notBackdated(input.effectiveFrom, today);
    const row = await trx
      .insertInto('tax_rate')
      .values({ rate_bp: input.rateBp, label: input.label, effective_from: input.effectiveFrom, created_by: actorId })
      .onConflict((oc) => oc.doNothing())
      .returningAll()
      .executeTakeFirst();
    if (!row) throw conflict('A tax rate already starts on that date.');
    await audit(trx, actorId, 'created', 'TaxRate', row.id, { ...input });
    return { id: row.id, rateBp: row.rate_bp, label: row.label, effectiveFrom: row.effective_from, current: row.effective_from <= today };
  });
}

export async function removeTaxRate(db: Database, id: string, actorId: string, now: Date): Promise<void> {
  if (!isUuid(id)) throw notFound('Tax rate');
  await db.transaction().execute(async (trx) => {
    const { today } = await coopToday(trx, now);
    const row = await trx.selectFrom('tax_rate').selectAll().where('id', '=', id).forUpdate().executeTakeFirst();
    if (!row) throw notFound('Tax rate');
    if (row.effective_from <= today) throw conflict('This tax rate has already applied; it stays in the history.');
    await trx.deleteFrom('tax_rate').where('id', '=', id).execute();
    await audit(trx, actorId, 'withdrawn', 'TaxRate', id, { rateBp: row.rate_bp, effectiveFrom: row.effective_from });
  });
}

// ---- Manual charges and credits ----

function manualQuery(db: Database) {
  return db
    .selectFrom('manual_charge as m')
    .innerJoin('app_user as u', 'u.id', 'm.member_id')
    .leftJoin('invoice_line as l', 'l.id', 'm.invoice_line_id')
    .select([
      'm.id',
      'm.member_id',
      'u.name as member_name',
      'm.period',
      'm.description',
      'm.reason',
      'm.amount_cents',
      'm.taxable',
      'l.invoice_id',
      'm.created_at',
    ]);
}

function toManual(r: Awaited<ReturnType<ReturnType<typeof manualQuery>['executeTakeFirstOrThrow']>>): ManualCharge {
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
  let q = manualQuery(db).orderBy('m.created_at', 'desc').limit(200);
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
    await sql`select pg_advisory_xact_lock(${BILLING_LOCK}, hashtext(${input.period}))`.execute(trx);
    const member = await trx.selectFrom('app_user').select('id').where('id', '=', input.memberId).executeTakeFirst();
    if (!member) throw unprocessable('No such member.', [{ path: 'memberId', message: 'Pick a member' }]);
    const invoice = await trx
      .selectFrom('invoice')
      .select(['id', 'status', 'number'])
      .where('member_id', '=', input.memberId)
      .where('period', '=', input.period)
      .forUpdate()
      .executeTakeFirst();
    if (invoice && invoice.status !== 'draft') {
      throw conflict(`This member's invoice for ${input.period} (${invoice.number ?? 'void'}) is ${invoice.status}; add the charge to a later period.`);
    }
    const row = await trx
      .insertInto('manual_charge')
      .values({
        member_id: input.memberId,
        period: input.period,
        description: input.description,
        reason: input.reason,
        amount_cents: input.amountCents,
        taxable: input.taxable,
        created_by: actorId,
      })
      .returningAll()
      .executeTakeFirstOrThrow();
    if (invoice) {
      const { timeZone } = await coopToday(trx, now);
      const { first, last, next } = periodBounds(input.period);
      const book = await PriceBook.load(trx);
      const line = priceCharge(
        { period: input.period, first, last, next, timeZone, book },
        {
          memberId: input.memberId,
          item: 'manual',
          description: input.description,
          sourceType: 'manual_charge',
          sourceId: row.id,
          sourceLabel: `${input.amountCents < 0 ? 'Credit' : 'Charge'}: ${input.reason}`,
          serviceFrom: first,
          serviceTo: last,
          quantity: 1,
          unit: 'item',
          unitPriceCents: input.amountCents,
          priceId: null,
          taxable: input.taxable,
        },
      );
      await appendToDraft(trx, invoice.id, line);
    }
    await audit(trx, actorId, input.amountCents < 0 ? 'credit_added' : 'charge_added', 'Charge', row.id, { ...input, invoiceId: invoice?.id ?? null });
    return toManual(await manualQuery(trx).where('m.id', '=', row.id).executeTakeFirstOrThrow());
  });
}

export async function removeManualCharge(db: Database, id: string, actorId: string): Promise<void> {
  if (!isUuid(id)) throw notFound('Charge');
  await db.transaction().execute(async (trx) => {
    const row = await trx.selectFrom('manual_charge').selectAll().where('id', '=', id).forUpdate().executeTakeFirst();
    if (!row) throw notFound('Charge');
    if (row.invoice_line_id) throw conflict('This charge is on an invoice already; credit it on a later period instead.');
    await trx.deleteFrom('manual_charge').where('id', '=', id).execute();
    await audit(trx, actorId, 'removed', 'Charge', id, { memberId: row.member_id, period: row.period, amountCents: row.amount_cents });
  });
}
