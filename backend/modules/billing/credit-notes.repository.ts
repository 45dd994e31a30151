import type { Insertable } from 'kysely';
import type { Database } from '../../db/database.ts';
import type { CreditNoteLineTable, CreditNoteTable } from '../../db/tables/billing.ts';

/** A credit note's id, invoice, member and number, or undefined when there is no such note. */
export function findCreditNote(db: Database, id: string) {
  return db.selectFrom('credit_note').select(['id', 'invoice_id', 'member_id', 'number']).where('id', '=', id).executeTakeFirst();
}

/** Records a credit note and returns its id. */
export function insertCreditNote(trx: Database, values: Insertable<CreditNoteTable>) {
  return trx.insertInto('credit_note').values(values).returning('id').executeTakeFirstOrThrow();
}

/** Records a credit note's lines. */
export async function insertCreditNoteLines(trx: Database, rows: Insertable<CreditNoteLineTable>[]): Promise<void> {
  await trx.insertInto('credit_note_line').values(rows).execute();
}

/** What the credit notes on an invoice have credited so far, net and tax (null when there are none). */
export function creditedSoFar(db: Database, invoiceId: string) {
  return db
    .selectFrom('credit_note')
    .select((eb) => [eb.fn.sum<number>('subtotal_cents').as('subtotal'), eb.fn.sum<number>('tax_cents').as('tax')])
    .where('invoice_id', '=', invoiceId)
    .executeTakeFirstOrThrow();
}
