import { z } from 'zod';
import type { Config } from '../../config/env.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { badRequest, conflict, HttpProblem } from '../../lib/http-problem.ts';
import { coopToday } from './billing-profile.service.ts';
import { lockInvoice, recordPayment } from './invoices.service.ts';
import { paymentProvider, type CheckoutSession, type ProviderEvent } from './payment-provider.ts';

/** Opens a hosted checkout for what is still due on an issued invoice; returns the provider's page. */
export async function createCheckout(
  db: Database,
  config: Config,
  invoiceId: string,
  actor: { id: string; email: string },
): Promise<{ url: string; sessionId: string }> {
  const inv = await db
    .selectFrom('invoice')
    .select(['id', 'number', 'status', 'currency', 'total_cents', 'paid_cents', 'credited_cents', 'period'])
    .where('id', '=', invoiceId)
    .executeTakeFirstOrThrow();
  if (inv.status !== 'issued') throw conflict(inv.status === 'paid' ? 'This invoice is already paid.' : `This invoice is ${inv.status} and cannot be paid.`);
  const due = inv.total_cents - inv.paid_cents - inv.credited_cents;
  if (due <= 0) throw conflict('Nothing is due on this invoice.');
  const back = `${config.publicUrl}/billing/my-invoices/${inv.id}`;
  let session: CheckoutSession;
  try {
    session = await paymentProvider(config).checkout.sessions.create({
      mode: 'payment',
      client_reference_id: inv.id,
      customer_email: actor.email,
      metadata: { invoiceId: inv.id, invoiceNumber: inv.number ?? '' },
      line_items: [
        {
          quantity: 1,
          price_data: {
            currency: inv.currency.trim().toLowerCase(),
            unit_amount: due,
            product_data: { name: `Invoice ${inv.number} (${inv.period})`, description: 'Larkspur Yard Brewing Co-op' },
          },
        },
      ],
      success_url: `${back}?checkout=success&session_id={CHECKOUT_SESSION_ID}`,
      cancel_url: `${back}?checkout=cancelled`,
    });
  } catch (err) {
    throw new HttpProblem(502, 'Payment provider unavailable', `The payment provider did not answer: ${(err as Error).message}`);
  }
  if (!session.url) throw new HttpProblem(502, 'Payment provider unavailable', 'The payment provider returned no checkout page.');
  await db.transaction().execute(async (trx) => {
    await trx
      .insertInto('checkout_session')
      .values({ id: session.id, invoice_id: inv.id, amount_cents: due, currency: inv.currency, url: session.url!, created_by: actor.id })
      .execute();
    await audit(trx, actor.id, 'checkout_started', 'Invoice', inv.id, { sessionId: session.id, amountCents: due });
  });
  return { url: session.url, sessionId: session.id };
}

/**
 * Books a completed, paid checkout session as an online payment, once: the payment row's unique
 * checkout-session id makes a second report of the same session (another event, or the member's
 * return) change nothing. Call inside a transaction.
 */
export async function applyPaidSession(trx: Database, session: CheckoutSession, now: Date): Promise<{ outcome: string; invoiceId: string | null }> {
  const known = await trx.selectFrom('checkout_session').selectAll().where('id', '=', session.id).forUpdate().executeTakeFirst();
  if (!known) return { outcome: 'unknown_session', invoiceId: null };
  if (session.payment_status !== 'paid') return { outcome: `not_paid:${session.payment_status}`, invoiceId: known.invoice_id };
  const already = await trx.selectFrom('payment').select('id').where('checkout_session_id', '=', session.id).executeTakeFirst();
  if (already) return { outcome: 'already_recorded', invoiceId: known.invoice_id };
  const amount = session.amount_total ?? known.amount_cents;
  if ((session.currency ?? '').toUpperCase() !== known.currency.trim().toUpperCase()) {
    return { outcome: `currency_mismatch:${session.currency}`, invoiceId: known.invoice_id };
  }
  await lockInvoice(trx, known.invoice_id);
  const { today } = await coopToday(trx, now);
  await recordPayment(
    trx,
    known.invoice_id,
    {
      amountCents: amount,
      method: 'online',
      receivedOn: today,
      reference: typeof session.payment_intent === 'string' ? session.payment_intent : session.id,
      note: 'Paid online',
      checkoutSessionId: session.id,
    },
    null,
  );
  await trx.updateTable('checkout_session').set({ status: 'complete', completed_at: now }).where('id', '=', session.id).execute();
  return { outcome: 'paid', invoiceId: known.invoice_id };
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
export async function handleProviderEvent(db: Database, event: ProviderEvent, now: Date): Promise<{ duplicate: boolean; outcome: string }> {
  checkEventShape(event);
  return db.transaction().execute(async (trx) => {
    const fresh = await trx
      .insertInto('payment_event')
      .values({ event_id: event.id, type: event.type, outcome: 'processing' })
      .onConflict((oc) => oc.column('event_id').doNothing())
      .returning('event_id')
      .executeTakeFirst();
    if (!fresh) return { duplicate: true, outcome: 'duplicate' };
    let result: { outcome: string; invoiceId: string | null } = { outcome: 'ignored', invoiceId: null };
    if (event.type === 'checkout.session.completed' || event.type === 'checkout.session.async_payment_succeeded') {
      result = await applyPaidSession(trx, event.data.object, now);
    } else if (event.type === 'checkout.session.expired') {
      const s = event.data.object;
      const updated = await trx.updateTable('checkout_session').set({ status: 'expired' }).where('id', '=', s.id).where('status', '=', 'open').returning('invoice_id').executeTakeFirst();
      result = { outcome: updated ? 'expired' : 'unknown_session', invoiceId: updated?.invoice_id ?? null };
    }
    await trx.updateTable('payment_event').set({ outcome: result.outcome, invoice_id: result.invoiceId }).where('event_id', '=', event.id).execute();
    if (result.invoiceId) await audit(trx, null, `provider_event:${event.type}`, 'Invoice', result.invoiceId, { eventId: event.id, outcome: result.outcome });
    return { duplicate: false, outcome: result.outcome };
  });
}

/** The member is back from the provider's page: ask the provider directly, in case its webhook is late. */
export async function confirmCheckout(db: Database, config: Config, invoiceId: string, sessionId: string, now: Date): Promise<string> {
  const known = await db.selectFrom('checkout_session').select(['id', 'invoice_id']).where('id', '=', sessionId).executeTakeFirst();
  if (!known || known.invoice_id !== invoiceId) return 'unknown_session';
  let session: CheckoutSession;
  try {
    session = await paymentProvider(config).checkout.sessions.retrieve(sessionId);
  } catch (err) {
    throw new HttpProblem(502, 'Payment provider unavailable', `The payment provider did not answer: ${(err as Error).message}`);
  }
  return db.transaction().execute(async (trx) => (await applyPaidSession(trx, session, now)).outcome);
}
