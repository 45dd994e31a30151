import type PgBoss from 'pg-boss';
import { z } from 'zod';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { badRequest } from '../../lib/http-problem.ts';
import { isUuid } from '../../lib/uuid-params.ts';
import { coopToday } from './billing-profile.service.ts';
import { closeOpenSession, insertSession, invoiceForCheckout } from './checkout.repository.ts';
import { lockInvoice, recordPayment } from './invoice-commands.service.ts';
import type { CheckoutSession, ProviderEvent } from './payment-provider.ts';
import { completeSession, lockSession, paymentOfSession, sessionState, setEventOutcome, takeProviderEvent } from './payments.repository.ts';
import { queueReceipt } from './receipts.service.ts';

/**
 * Books a completed, paid checkout session as an online payment, once: the payment row's unique
 * checkout-session id makes a second report of the same session (another event, or the member's
 * return) change nothing. Money beyond what the invoice still owes (a second session paid, or one
 * paid as it was being expired) is kept on the payment as overpaid, owed back to the member, so the
 * invoice never owes less than nothing. The member's receipt is queued in the same transaction, so it
 * is sent once with the payment. Call inside a transaction.
 */
export async function applyPaidSession(
  trx: Database,
  session: CheckoutSession,
  now: Date,
  queue: PgBoss,
): Promise<{ outcome: string; invoiceId: string | null }> {
  let known = await lockSession(trx, session.id);
  if (!known && session.payment_status === 'paid') known = await adoptSession(trx, session);
  if (!known) return { outcome: 'unknown_session', invoiceId: null };
  if (session.payment_status !== 'paid') return { outcome: `not_paid:${session.payment_status}`, invoiceId: known.invoice_id };
  const already = await paymentOfSession(trx, session.id);
  if (already) return { outcome: 'already_recorded', invoiceId: known.invoice_id };
  const amount = session.amount_total ?? known.amount_cents;
  if ((session.currency ?? '').toUpperCase() !== known.currency.trim().toUpperCase()) {
    return { outcome: `currency_mismatch:${session.currency}`, invoiceId: known.invoice_id };
  }
  if (amount <= 0) return { outcome: 'nothing_paid', invoiceId: known.invoice_id };
  const inv = await lockInvoice(trx, known.invoice_id);
  const due = inv.status === 'issued' ? Math.max(inv.total_cents - inv.paid_cents - inv.credited_cents, 0) : 0;
  const overpaid = Math.max(amount - due, 0);
  const { today } = await coopToday(trx, now);
  const payment = await recordPayment(
    trx,
    known.invoice_id,
    {
      amountCents: amount,
      overpaidCents: overpaid,
      method: 'online',
      receivedOn: today,
      reference: typeof session.payment_intent === 'string' ? session.payment_intent : session.id,
      note:
        overpaid > 0
          ? overpaid === amount
            ? 'Paid online when nothing was due: to refund'
            : 'Paid online, more than was due: the excess is to refund'
          : 'Paid online',
      checkoutSessionId: session.id,
    },
    null,
    now,
  );
  await completeSession(trx, session.id, now);
  await queueReceipt(trx, queue, payment.id);
  if (overpaid > 0) {
    await audit(trx, null, 'overpayment_received', 'Invoice', known.invoice_id, { sessionId: session.id, amountCents: amount, overpaidCents: overpaid });
  }
  return { outcome: overpaid > 0 ? 'overpaid' : 'paid', invoiceId: known.invoice_id };
}

/**
 * A paid session we have no record of (made for one of our invoices, but its record was lost, e.g. the
 * instance stopped between asking the provider and writing it down): the money is ours to book, so the
 * session is recorded from what the provider says, when it names an invoice we have in its currency.
 */
async function adoptSession(trx: Database, session: CheckoutSession) {
  const invoiceId = session.client_reference_id;
  if (!invoiceId || session.metadata?.invoiceId !== invoiceId || !isUuid(invoiceId)) return undefined;
  const inv = await invoiceForCheckout(trx, invoiceId);
  if (!inv || (session.currency ?? '').toUpperCase() !== inv.currency.trim().toUpperCase() || !session.amount_total) return undefined;
  await insertSession(
    trx,
    {
      id: session.id,
      invoice_id: inv.id,
      amount_cents: session.amount_total,
      currency: inv.currency,
      url: session.url ?? '',
      status: 'complete',
      created_by: null,
    },
    { unlessKnown: true },
  );
  return lockSession(trx, session.id);
}

const sessionEvents = new Set(['checkout.session.completed', 'checkout.session.async_payment_succeeded', 'checkout.session.expired']);
const eventEnvelopeSchema = z.object({
  id: z.string().min(1).max(255),
  type: z.string().min(1).max(255),
  data: z.object({ object: z.record(z.string(), z.unknown()) }),
});
/** What this app reads of a checkout session; amounts fit the books' integer cents. */
const sessionObjectSchema = z.object({
  id: z.string().min(1).max(255),
  payment_status: z.string().max(60).nullish(),
  amount_total: z.number().int().min(0).max(2_147_483_647).nullish(),
  currency: z.string().max(10).nullish(),
  payment_intent: z.union([z.string().max(255), z.record(z.string(), z.unknown())]).nullish(),
});

/** A signed event this app cannot read (no id or type, or a checkout session without its fields) is refused, changing nothing. */
function checkEventShape(event: ProviderEvent): void {
  const envelope = eventEnvelopeSchema.safeParse(event);
  if (!envelope.success) throw badRequest('The event has no id, type or object: it is not one this app reads.');
  if (sessionEvents.has(envelope.data.type) && !sessionObjectSchema.safeParse(envelope.data.data.object).success) {
    throw badRequest('The checkout session in the event is not one this app reads.');
  }
}

/**
 * Handles one verified provider event, exactly once: its id goes into payment_event first, and a
 * replay (or a concurrent duplicate, which waits on that row) finds it there and does nothing.
 */
export async function handleProviderEvent(db: Database, event: ProviderEvent, now: Date, queue: PgBoss): Promise<{ duplicate: boolean; outcome: string }> {
  checkEventShape(event);
  return db.transaction().execute(async (trx) => {
    const fresh = await takeProviderEvent(trx, event);
    if (!fresh) return { duplicate: true, outcome: 'duplicate' };
    let result: { outcome: string; invoiceId: string | null } = { outcome: 'ignored', invoiceId: null };
    if (event.type === 'checkout.session.completed' || event.type === 'checkout.session.async_payment_succeeded') {
      result = await applyPaidSession(trx, event.data.object, now, queue);
    } else if (event.type === 'checkout.session.expired') {
      const s = event.data.object;
      const updated = await closeOpenSession(trx, s.id, 'expired', now);
      if (updated) result = { outcome: 'expired', invoiceId: updated.invoice_id };
      else {
        // Already closed here (paid, or expired by us): an expiry arriving late changes nothing.
        const known = await sessionState(trx, s.id);
        result = known ? { outcome: `already_${known.status}`, invoiceId: known.invoice_id } : { outcome: 'unknown_session', invoiceId: null };
      }
    }
    await setEventOutcome(trx, event.id, result);
    if (result.invoiceId) await audit(trx, null, `provider_event:${event.type}`, 'Invoice', result.invoiceId, { eventId: event.id, outcome: result.outcome });
    return { duplicate: false, outcome: result.outcome };
  });
}
