import type { Insertable } from 'kysely';
import type { Database } from '../../db/database.ts';
import type { ManualChargeTable, PriceTable, TaxRateTable } from '../../db/tables/billing.ts';

/** Every price, history included, by item, band and newest first. */
export function allPrices(db: Database) {
  return db.selectFrom('price').selectAll().orderBy('item').orderBy('band_max_liters').orderBy('effective_from', 'desc').execute();
}

/** Every tax rate, newest first. */
export function allTaxRates(db: Database) {
  return db.selectFrom('tax_rate').selectAll().orderBy('effective_from', 'desc').execute();
}

/** The new price, or undefined when its item (and band) already has a price from that date. */
export function insertPrice(trx: Database, values: Insertable<PriceTable>) {
  return trx
    .insertInto('price')
    .values(values)
    .onConflict((oc) => oc.doNothing())
    .returningAll()
    .executeTakeFirst();
}

/** The new tax rate, or undefined when a rate already starts on that date. */
export function insertTaxRate(trx: Database, values: Insertable<TaxRateTable>) {
  return trx
    .insertInto('tax_rate')
    .values(values)
    .onConflict((oc) => oc.doNothing())
    .returningAll()
    .executeTakeFirst();
}

/** A price or tax rate, locked for the rest of the transaction, or undefined when there is none. */
export function lockDated(trx: Database, table: 'price' | 'tax_rate', id: string) {
  return trx.selectFrom(table).selectAll().where('id', '=', id).forUpdate().executeTakeFirst();
}

/** Deletes a price, tax rate or manual charge by id. */
export async function deleteById(trx: Database, table: 'price' | 'tax_rate' | 'manual_charge', id: string): Promise<void> {
  await trx.deleteFrom(table).where('id', '=', id).execute();
}

/** Manual charges and credits with their members and the invoice each went onto (if any). */
export function manualChargesQuery(db: Database) {
  return db
    .selectFrom('manual_charge as m')
    .innerJoin('app_user as u', 'u.id', 'm.member_id')
    .leftJoin('invoice_line as l', 'l.id', 'm.invoice_line_id')
    .selectAll('m')
    .select(['u.name as member_name', 'l.invoice_id']);
}

export function insertManualCharge(trx: Database, values: Insertable<ManualChargeTable>) {
  return trx.insertInto('manual_charge').values(values).returningAll().executeTakeFirstOrThrow();
}

export function lockManualCharge(trx: Database, id: string) {
  return trx.selectFrom('manual_charge').selectAll().where('id', '=', id).forUpdate().executeTakeFirst();
}

/** The member's invoice for the period, locked, or undefined when there is none yet. */
export function lockMemberInvoice(trx: Database, memberId: string, period: string) {
  return trx
    .selectFrom('invoice')
    .select(['id', 'status', 'number'])
    .where('member_id', '=', memberId)
    .where('period', '=', period)
    .forUpdate()
    .executeTakeFirst();
}

export function findUserId(db: Database, id: string) {
  return db.selectFrom('app_user').select('id').where('id', '=', id).executeTakeFirst();
}

/** Every price, as the price book reads them. */
export function priceBookPrices(db: Database) {
  return db.selectFrom('price').select(['id', 'item', 'band_max_liters', 'unit_cents', 'effective_from']).execute();
}

/** Every tax rate, as the price book reads them. */
export function priceBookTaxRates(db: Database) {
  return db.selectFrom('tax_rate').select(['id', 'rate_bp', 'label', 'effective_from']).execute();
}
