import type { Insertable } from 'kysely';
import type { Database } from '../../db/database.ts';
import type { CheckoutSessionTable } from '../../db/tables/billing.ts';

/** What paying an invoice online needs of it: its state, currency, amounts and period. */
export function invoiceForCheckout(db: Database, invoiceId: string) {
  return db
    .selectFrom('invoice')
    .select(['id', 'number', 'status', 'currency', 'total_cents', 'paid_cents', 'credited_cents', 'period'])
    .where('id', '=', invoiceId)
    .executeTakeFirst();
}

/** The invoice's open checkout sessions (the database allows one at most). */
export function openSessions(db: Database, invoiceId: string) {
  return db
    .selectFrom('checkout_session')
    .select(['id', 'amount_cents', 'currency', 'url'])
    .where('invoice_id', '=', invoiceId)
    .where('status', '=', 'open')
    .execute();
}

/** Records a session the provider made; one already recorded under its id is left as it is. */
export async function insertSession(trx: Database, row: Insertable<CheckoutSessionTable>, { unlessKnown = false } = {}): Promise<void> {
  let q = trx.insertInto('checkout_session').values(row);
  if (unlessKnown) q = q.onConflict((oc) => oc.column('id').doNothing());
  await q.execute();
}

/** Closes a session still open here as the provider reports it; the invoice it was for, or undefined when it was not open. */
export function closeOpenSession(trx: Database, sessionId: string, status: 'complete' | 'expired', now: Date) {
  return trx
    .updateTable('checkout_session')
    .set({ status, ...(status === 'complete' ? { completed_at: now } : {}) })
    .where('id', '=', sessionId)
    .where('status', '=', 'open')
    .returning('invoice_id')
    .executeTakeFirst();
}

/** A session's id and invoice, or undefined when it is not one of ours. */
export function findSession(db: Database, sessionId: string) {
  return db.selectFrom('checkout_session').select(['id', 'invoice_id']).where('id', '=', sessionId).executeTakeFirst();
}
