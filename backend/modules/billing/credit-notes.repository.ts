import type { Database } from '../../db/database.ts';

/** A credit note's id, invoice, member and number, or undefined when there is no such note. */
export function findCreditNote(db: Database, id: string) {
  return db.selectFrom('credit_note').select(['id', 'invoice_id', 'member_id', 'number']).where('id', '=', id).executeTakeFirst();
}
