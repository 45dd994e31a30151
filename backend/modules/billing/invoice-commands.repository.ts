import { sql, type Insertable, type UpdateObject } from 'kysely';
import type { Database } from '../../db/database.ts';
import type { DB } from '../../db/schema.ts';
import type { InvoiceLineTable, InvoiceTable, PaymentTable } from '../../db/tables/billing.ts';

/** An invoice row, locked for the rest of the transaction, or undefined when there is none. */
export function lockInvoiceRow(trx: Database, id: string) {
  return trx.selectFrom('invoice').selectAll().where('id', '=', id).forUpdate().executeTakeFirst();
}

/** Sets an invoice's subtotal, tax and total from its lines, stamped `at`. */
export async function recomputeTotals(trx: Database, invoiceId: string, at: Date): Promise<void> {
  await sql`update invoice set
      subtotal_cents = t.subtotal, tax_cents = t.tax, total_cents = t.subtotal + t.tax, updated_at = ${at}
    from (select coalesce(sum(amount_cents), 0)::int as subtotal, coalesce(sum(tax_cents), 0)::int as tax
          from invoice_line where invoice_id = ${invoiceId}) t
    where invoice.id = ${invoiceId}`.execute(trx);
}

/** Moves an issued invoice to paid (`paid_at` = `at`) when nothing is left to pay, and a paid one back to issued when something is. */
export async function settleStatus(trx: Database, invoiceId: string, at: Date): Promise<void> {
  await sql`update invoice set
      status = case when status = 'issued' and total_cents - paid_cents - credited_cents <= 0 then 'paid'
                    when status = 'paid' and total_cents - paid_cents - credited_cents > 0 then 'issued'
                    else status end,
      paid_at = case when status = 'issued' and total_cents - paid_cents - credited_cents <= 0 then ${at}::timestamptz
                     when status = 'paid' and total_cents - paid_cents - credited_cents > 0 then null
                     else paid_at end,
      updated_at = ${at}
    where id = ${invoiceId}`.execute(trx);
}

/** The new invoice's id, or undefined when the member already has one for the period. */
export function insertInvoiceUnlessExists(trx: Database, values: Insertable<InvoiceTable>) {
  return trx
    .insertInto('invoice')
    .values(values)
    .onConflict((oc) => oc.columns(['member_id', 'period']).doNothing())
    .returning('id')
    .executeTakeFirst();
}

/** Inserts invoice lines and links each manual charge among their sources to its line. */
export async function insertInvoiceLines(trx: Database, rows: Insertable<InvoiceLineTable>[]): Promise<void> {
  if (rows.length === 0) return;
  const inserted = await trx.insertInto('invoice_line').values(rows).returning(['id', 'source_type', 'source_id']).execute();
  for (const line of inserted) {
    if (line.source_type === 'manual_charge') {
      await trx.updateTable('manual_charge').set({ invoice_line_id: line.id }).where('id', '=', line.source_id).execute();
    }
  }
}

/** The highest line position on an invoice, 0 when it has no lines. */
export async function lastLinePosition(db: Database, invoiceId: string): Promise<number> {
  const max = await db
    .selectFrom('invoice_line')
    .select((eb) => eb.fn.max('position').as('max'))
    .where('invoice_id', '=', invoiceId)
    .executeTakeFirst();
  return Number(max?.max ?? 0);
}

/** Changes an invoice's columns, stamping updated_at with `at`. */
export async function updateInvoice(trx: Database, invoiceId: string, values: UpdateObject<DB, 'invoice'>, at: Date): Promise<void> {
  await trx
    .updateTable('invoice')
    .set({ ...values, updated_at: at })
    .where('id', '=', invoiceId)
    .execute();
}

/** Adds to what an invoice counts as paid (a refund adds a negative amount). */
export function addPaid(trx: Database, invoiceId: string, cents: number, at: Date) {
  return updateInvoice(trx, invoiceId, { paid_cents: sql`paid_cents + ${cents}` }, at);
}

/** Adds to what credit notes have credited on an invoice. */
export function addCredited(trx: Database, invoiceId: string, cents: number, at: Date) {
  return updateInvoice(trx, invoiceId, { credited_cents: sql`credited_cents + ${cents}` }, at);
}

/** Records a payment (or a refund) and returns its row. */
export function insertPayment(trx: Database, values: Insertable<PaymentTable>) {
  return trx.insertInto('payment').values(values).returningAll().executeTakeFirstOrThrow();
}

/** An invoice's lines' distinct tax rates. */
export function lineTaxRates(db: Database, invoiceId: string) {
  return db.selectFrom('invoice_line').select('tax_rate_bp').distinct().where('invoice_id', '=', invoiceId).execute();
}

/** An invoice's state, locked for the rest of the transaction; throws when there is no such invoice. */
export function lockInvoiceStatus(trx: Database, invoiceId: string) {
  return trx.selectFrom('invoice').select('status').where('id', '=', invoiceId).forUpdate().executeTakeFirstOrThrow();
}

/**
 * Creates or increments a series' counter for a year in one statement and returns its new value;
 * the counter row stays locked until the calling transaction ends.
 */
export async function bumpCounter(trx: Database, series: 'invoice' | 'credit_note', year: number): Promise<number> {
  const row = await trx
    .insertInto('document_number_counter')
    .values({ series, year, last_value: 1 })
    .onConflict((oc) => oc.columns(['series', 'year']).doUpdateSet({ last_value: sql`document_number_counter.last_value + 1` }))
    .returning('last_value')
    .executeTakeFirstOrThrow();
  return row.last_value;
}
