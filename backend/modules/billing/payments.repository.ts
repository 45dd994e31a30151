import type { Database } from '../../db/database.ts';

/** A payment's id and member, or undefined when there is no such payment. */
export function findPaymentOwner(db: Database, paymentId: string) {
  return db.selectFrom('payment').select(['id', 'member_id']).where('id', '=', paymentId).executeTakeFirst();
}
