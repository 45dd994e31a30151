import type { Overpayment } from '../../../shared/schemas/billing.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound } from '../../lib/http-problem.ts';
import { paginate } from '../../lib/paginate.ts';
import { findPaymentOwner } from './payments.repository.ts';

/** Online payments that brought more than their invoice owed, with their invoices and members; `open` keeps those not yet refunded. */
function overpaymentsQuery(db: Database, q: { open?: boolean; memberId?: string; paymentId?: string }) {
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
function overpaymentRows(qb: ReturnType<typeof overpaymentsQuery>) {
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

const toOverpayment = (r: Overpayment): Overpayment => ({ ...r, currency: r.currency.trim() });

/** One page of overpayments, newest first, with how many there are in all. */
export async function pageOverpayments(db: Database, q: { open?: boolean; memberId?: string; page: number; pageSize: number }): Promise<Page<Overpayment>> {
  const { rows, total } = await paginate(overpaymentsQuery(db, q), overpaymentRows, q);
  return { items: rows.map(toOverpayment), total, page: q.page, pageSize: q.pageSize };
}

/** One overpayment as the list shows it, or undefined when the payment brought nothing beyond what was due. */
export async function findOverpayment(db: Database, paymentId: string): Promise<Overpayment | undefined> {
  const row = await overpaymentRows(overpaymentsQuery(db, { paymentId })).executeTakeFirst();
  return row && toOverpayment(row);
}

/** Whose payment it is, for the permission check, or undefined when there is none. */
export async function paymentOwner(db: Database, paymentId: string): Promise<{ id: string; memberId: string } | undefined> {
  const row = await findPaymentOwner(db, paymentId);
  return row && { id: row.id, memberId: row.member_id };
}

/** Marks an overpayment refunded, in one transaction, and returns it as the list shows it. */
export async function refundOverpayment(
  db: Database,
  paymentId: string,
  input: { refundedOn: string; reference: string },
  actorId: string,
): Promise<Overpayment | undefined> {
  await db.transaction().execute((trx) => markOverpaymentRefunded(trx, paymentId, input, actorId));
  return findOverpayment(db, paymentId);
}

/** The treasurer paid an overpayment back (outside the app, e.g. by bank transfer): it is no longer owed. */
export async function markOverpaymentRefunded(
  trx: Database,
  paymentId: string,
  input: { refundedOn: string; reference: string },
  actorId: string,
): Promise<void> {
  const row = await trx
    .selectFrom('payment')
    .select(['id', 'invoice_id', 'overpaid_cents', 'overpayment_refunded_on'])
    .where('id', '=', paymentId)
    .forUpdate()
    .executeTakeFirst();
  if (!row || row.overpaid_cents <= 0) throw notFound('Overpayment');
  if (row.overpayment_refunded_on) throw conflict(`This overpayment was already refunded on ${row.overpayment_refunded_on}.`);
  await trx
    .updateTable('payment')
    .set({ overpayment_refunded_on: input.refundedOn, overpayment_refund_reference: input.reference, overpayment_refunded_by: actorId })
    .where('id', '=', paymentId)
    .execute();
  await audit(trx, actorId, 'overpayment_refunded', 'Invoice', row.invoice_id, {
    paymentId,
    overpaidCents: row.overpaid_cents,
    refundedOn: input.refundedOn,
    reference: input.reference,
  });
}
