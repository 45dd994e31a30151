import type { Payment, RefundInput, VoidInvoiceInput } from '../../../shared/schemas/billing.ts';
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
  const payment = await db.transaction().execute(async (trx) => {
    const recorded = await recordManualPayment(trx, invoiceId, input, actorId);
    await queueReceipt(trx, queue, recorded.id);
    return recorded;
  });
  await closeStaleCheckouts(db, config, invoiceId, clock.now(), queue);
  return payment;
}

/** Voids an invoice on the co-op's date (see `voidInvoice`). */
export async function voidInvoiceNow({ db, config, clock, queue }: BillingDeps, invoiceId: string, input: Required<VoidInvoiceInput>, actorId: string) {
  const result = await db.transaction().execute(async (trx) => {
    const { today } = await coopToday(trx, clock.now());
    return voidInvoice(trx, invoiceId, input, today, actorId);
  });
  await closeStaleCheckouts(db, config, invoiceId, clock.now(), queue);
  return result;
}

/** Credits part of an invoice on the co-op's date, paying it back when a method is given (see `refundInvoice`). */
export async function refundInvoiceNow({ db, config, clock, queue }: BillingDeps, invoiceId: string, input: Required<RefundInput>, actorId: string) {
  const result = await db.transaction().execute(async (trx) => {
    const { today } = await coopToday(trx, clock.now());
    return refundInvoice(trx, invoiceId, input, today, actorId);
  });
  await closeStaleCheckouts(db, config, invoiceId, clock.now(), queue);
  return result;
}
