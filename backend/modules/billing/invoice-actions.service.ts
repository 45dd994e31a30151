import type { Payment, RefundInput, VoidInvoiceInput } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import type { Deps } from '../../lib/deps.ts';
import { coopToday } from './billing-profile.service.ts';
import { closeStaleCheckouts } from './checkout.service.ts';
import { refundInvoice, voidInvoice } from './credit-notes.service.ts';
import { recordManualPayment } from './invoice-commands.service.ts';
import { queueReceipt } from './receipts.service.ts';

/**
 * What the treasurer does to an invoice's money from the back office. Each runs in one transaction;
 * afterwards an open checkout that no longer asks for what is due is closed, so the member cannot pay twice.
 */
type BillingDeps = Pick<Deps, 'db' | 'config' | 'clock' | 'queue'>;

/** A bank transfer or cash received, booked with the member's receipt queued in the same transaction. */
export async function takePaymentByHand(
  { db, config, clock, queue }: BillingDeps,
  invoiceId: string,
  input: { amountCents: number; method: 'bank_transfer' | 'cash'; receivedOn: string; reference: string; note: string },
  actorId: string,
): Promise<Payment> {
  const now = clock.now();
  const payment = await db.transaction().execute(async (trx) => {
    const recorded = await recordManualPayment(trx, invoiceId, input, actorId, now);
    await queueReceipt(trx, queue, recorded.id);
    return recorded;
  });
  await closeStaleCheckouts(db, config, invoiceId, now, queue);
  return payment;
}

/** A void or credit at the clock's now, on the co-op's date, in one transaction; then stale checkouts are closed. */
async function creditOnCoopDate<R>(
  { db, config, clock, queue }: BillingDeps,
  invoiceId: string,
  credit: (trx: Database, today: string, now: Date) => Promise<R>,
): Promise<R> {
  const now = clock.now();
  const result = await db.transaction().execute(async (trx) => credit(trx, (await coopToday(trx, now)).today, now));
  await closeStaleCheckouts(db, config, invoiceId, now, queue);
  return result;
}

/** Voids an invoice on the co-op's date (see `voidInvoice`). */
export function voidInvoiceNow(deps: BillingDeps, invoiceId: string, input: Required<VoidInvoiceInput>, actorId: string) {
  return creditOnCoopDate(deps, invoiceId, (trx, today, now) => voidInvoice(trx, invoiceId, input, today, actorId, now));
}

/** Credits part of an invoice on the co-op's date, paying it back when a method is given (see `refundInvoice`). */
export function refundInvoiceNow(deps: BillingDeps, invoiceId: string, input: Required<RefundInput>, actorId: string) {
  return creditOnCoopDate(deps, invoiceId, (trx, today, now) => refundInvoice(trx, invoiceId, input, today, actorId, now));
}
