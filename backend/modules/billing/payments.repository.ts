import type { Database } from '../../db/database.ts';

/** A payment's id and member, or undefined when there is no such payment. */
export function findPaymentOwner(db: Database, paymentId: string) {
  return db.selectFrom('payment').select(['id', 'member_id']).where('id', '=', paymentId).executeTakeFirst();
}

/** Payments (`p`) with the invoices they pay (`i`) and the members who paid (`u`). */
export function paymentsWithInvoices(db: Database) {
  return db.selectFrom('payment as p').innerJoin('invoice as i', 'i.id', 'p.invoice_id').innerJoin('app_user as u', 'u.id', 'p.member_id');
}

/** A payment with what its receipt says: the invoice it pays and the member who paid. */
export function paymentForReceipt(db: Database, paymentId: string) {
  return paymentsWithInvoices(db)
    .selectAll('p')
    .select(['i.number', 'i.period', 'i.total_cents', 'i.paid_cents', 'i.credited_cents', 'u.name', 'u.email'])
    .where('p.id', '=', paymentId)
    .executeTakeFirstOrThrow();
}

/** Online payments that brought more than their invoice owed, with their invoices and members; `open` keeps those not yet refunded. */
export function overpaymentsQuery(db: Database, q: { open?: boolean; memberId?: string; paymentId?: string }) {
  let query = db
    .selectFrom('payment')
    .innerJoin('invoice', 'invoice.id', 'payment.invoice_id')
    .innerJoin('app_user', 'app_user.id', 'payment.member_id')
    .where('payment.overpaid_cents', '>', 0);
  if (q.open) query = query.where('payment.overpayment_refunded_on', 'is', null);
  if (q.memberId) query = query.where('payment.member_id', '=', q.memberId);
  if (q.paymentId) query = query.where('payment.id', '=', q.paymentId);
  return query;
}

/** Newest first, named as the API names them. */
export function overpaymentRows(qb: ReturnType<typeof overpaymentsQuery>) {
  return qb
    .select([
      'payment.id as paymentId',
      'payment.invoice_id as invoiceId',
      'invoice.number as invoiceNumber',
      'payment.member_id as memberId',
      'app_user.name as memberName',
      'payment.currency',
      'payment.received_on as receivedOn',
      'payment.amount_cents as amountCents',
      'payment.overpaid_cents as overpaidCents',
      'payment.reference',
      'payment.overpayment_refunded_on as refundedOn',
      'payment.overpayment_refund_reference as refundReference',
    ])
    .orderBy('payment.received_on', 'desc')
    .orderBy('payment.created_at', 'desc')
    .orderBy('payment.id');
}

/** A payment's overpayment and whether it was refunded, locked for the rest of the transaction. */
export function lockPayment(trx: Database, paymentId: string) {
  return trx
    .selectFrom('payment')
    .select(['id', 'invoice_id', 'overpaid_cents', 'overpayment_refunded_on'])
    .where('id', '=', paymentId)
    .forUpdate()
    .executeTakeFirst();
}

/** Marks the payment's overpayment paid back on that day, with the transfer's reference and who did it. */
export async function markRefunded(trx: Database, paymentId: string, refund: { refundedOn: string; reference: string; actorId: string }): Promise<void> {
  await trx
    .updateTable('payment')
    .set({ overpayment_refunded_on: refund.refundedOn, overpayment_refund_reference: refund.reference, overpayment_refunded_by: refund.actorId })
    .where('id', '=', paymentId)
    .execute();
}

/** A recorded checkout session, locked for the rest of the transaction, or undefined when it is not one of ours. */
export function lockSession(trx: Database, sessionId: string) {
  return trx.selectFrom('checkout_session').selectAll().where('id', '=', sessionId).forUpdate().executeTakeFirst();
}

/** A checkout session's invoice and state, or undefined when it is not one of ours. */
export function sessionState(db: Database, sessionId: string) {
  return db.selectFrom('checkout_session').select(['invoice_id', 'status']).where('id', '=', sessionId).executeTakeFirst();
}

/** The payment booked for a checkout session, or undefined when there is none yet. */
export function paymentOfSession(db: Database, sessionId: string) {
  return db.selectFrom('payment').select('id').where('checkout_session_id', '=', sessionId).executeTakeFirst();
}

/** Marks a checkout session paid, whatever state it was in here. */
export async function completeSession(trx: Database, sessionId: string, now: Date): Promise<void> {
  await trx.updateTable('checkout_session').set({ status: 'complete', completed_at: now }).where('id', '=', sessionId).execute();
}

/** Takes a provider event's id; undefined when it was taken before (a replay or a concurrent duplicate, which waits here). */
export function takeProviderEvent(trx: Database, event: { id: string; type: string }) {
  return trx
    .insertInto('payment_event')
    .values({ event_id: event.id, type: event.type, outcome: 'processing' })
    .onConflict((oc) => oc.column('event_id').doNothing())
    .returning('event_id')
    .executeTakeFirst();
}

/** Writes down what handling a provider event came to. */
export async function setEventOutcome(trx: Database, eventId: string, result: { outcome: string; invoiceId: string | null }): Promise<void> {
  await trx.updateTable('payment_event').set({ outcome: result.outcome, invoice_id: result.invoiceId }).where('event_id', '=', eventId).execute();
}
