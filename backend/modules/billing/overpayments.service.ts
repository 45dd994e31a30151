import type { Overpayment } from '../../../shared/schemas/billing.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound } from '../../lib/http-problem.ts';
import { paginate } from '../../lib/paginate.ts';
import { findPaymentOwner, lockPayment, markRefunded, overpaymentRows, overpaymentsQuery } from './payments.repository.ts';

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
  const row = await lockPayment(trx, paymentId);
  if (!row || row.overpaid_cents <= 0) throw notFound('Overpayment');
  if (row.overpayment_refunded_on) throw conflict(`This overpayment was already refunded on ${row.overpayment_refunded_on}.`);
  await markRefunded(trx, paymentId, { ...input, actorId });
  await audit(trx, actorId, 'overpayment_refunded', 'Invoice', row.invoice_id, {
    paymentId,
    overpaidCents: row.overpaid_cents,
    refundedOn: input.refundedOn,
    reference: input.reference,
  });
}
