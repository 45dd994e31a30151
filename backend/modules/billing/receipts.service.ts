import type PgBoss from 'pg-boss';
import { formatMoney } from '../../../shared/billing/money.ts';
import type { Database } from '../../db/database.ts';
import { enqueueMailIn } from '../../lib/mailer.ts';
import { receiptMail } from '../mail/templates/receipt.ts';
import { getBillingProfile } from './billing-profile.service.ts';
import { paymentForReceipt } from './payments.repository.ts';

/**
 * Queues the member's receipt for a payment, inside the transaction that books it: the job commits
 * with the payment row or not at all, and a payment row is made once (a replayed provider event or a
 * second report of the same checkout finds it and books nothing), so each payment gets one receipt.
 * Money paid back (a negative payment) gets none: its credit note says so.
 */
export async function queueReceipt(trx: Database, queue: PgBoss, paymentId: string): Promise<boolean> {
  const p = await paymentForReceipt(trx, paymentId);
  if (p.amount_cents <= 0) return false;
  const currency = p.currency.trim();
  const money = (cents: number) => formatMoney(cents, currency, 'en-GB');
  const remaining = Math.max(p.total_cents - p.paid_cents - p.credited_cents, 0);
  const profile = await getBillingProfile(trx);
  await enqueueMailIn(trx, queue, {
    to: p.email,
    ...receiptMail({
      profile,
      memberName: p.name,
      invoice: { number: p.number, period: p.period, totalCents: p.total_cents },
      payment: { amountCents: p.amount_cents, overpaidCents: p.overpaid_cents, method: p.method, receivedOn: p.received_on, reference: p.reference },
      remainingCents: remaining,
      money,
    }),
  });
  return true;
}
