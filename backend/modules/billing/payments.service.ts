import type PgBoss from 'pg-boss';
import { z } from 'zod';
import type { Overpayment } from '../../../shared/schemas/billing.ts';
import type { Config } from '../../config/env.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { badRequest, conflict, HttpProblem, notFound } from '../../lib/http-problem.ts';
import { isUuid } from '../../lib/uuid-params.ts';
import { coopToday } from './billing-profile.service.ts';
import { lockInvoice, recordPayment } from './invoices.service.ts';
import { paymentProvider, type CheckoutSession, type ProviderEvent } from './payment-provider.ts';
import { queueReceipt } from './receipts.service.ts';

const providerDown = (err: unknown, what = 'The payment provider did not answer') =>
  new HttpProblem(502, 'Payment provider unavailable', `${what}: ${(err as Error).message}`);

const isUniqueViolation = (err: unknown) => (err as { code?: string }).code === '23505';

type OpenSession = { id: string; amount_cents: number; currency: string; url: string };

/**
 * Opens a hosted checkout for what is still due on an issued invoice; returns the provider's page.
 * An invoice has at most one open checkout (a partial unique index guarantees it): the open one is
 * reused while it asks for what is due, else it is expired at the provider before a new one is
 * opened; when the provider cannot expire it, no new one is opened. No row stays locked while the
 * provider is asked; every session the provider made is recorded, so money paid on any is booked.
 */
export async function createCheckout(
  db: Database,
  config: Config,
  invoiceId: string,
  actor: { id: string; email: string },
  now: Date,
  queue: PgBoss,
): Promise<{ url: string; sessionId: string; reused: boolean }> {
  const provider = paymentProvider(config);
  for (let attempt = 0; attempt < 4; attempt++) {
    const inv = await db
      .selectFrom('invoice')
      .select(['id', 'number', 'status', 'currency', 'total_cents', 'paid_cents', 'credited_cents', 'period'])
      .where('id', '=', invoiceId)
      .executeTakeFirstOrThrow();
    if (inv.status !== 'issued') throw conflict(inv.status === 'paid' ? 'This invoice is already paid.' : `This invoice is ${inv.status} and cannot be paid.`);
    const due = inv.total_cents - inv.paid_cents - inv.credited_cents;
    if (due <= 0) throw conflict('Nothing is due on this invoice.');

    const open = await db
      .selectFrom('checkout_session')
      .select(['id', 'amount_cents', 'currency', 'url'])
      .where('invoice_id', '=', inv.id)
      .where('status', '=', 'open')
      .executeTakeFirst();
    if (open) {
      if (open.amount_cents === due && open.currency === inv.currency) {
        let remote: CheckoutSession;
        try {
          remote = await provider.checkout.sessions.retrieve(open.id);
        } catch (err) {
          throw providerDown(err);
        }
        if (remote.status === 'open') return { url: remote.url ?? open.url, sessionId: open.id, reused: true };
        await settleClosedSession(db, remote, now, queue);
      } else {
        await expireAtProvider(db, config, open, now, queue);
      }
      continue;
    }

    const back = `${config.publicUrl}/billing/my-invoices/${inv.id}`;
    let session: CheckoutSession;
    try {
      session = await provider.checkout.sessions.create({
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
      throw providerDown(err);
    }
    if (!session.url) throw new HttpProblem(502, 'Payment provider unavailable', 'The payment provider returned no checkout page.');
    const row = { id: session.id, invoice_id: inv.id, amount_cents: due, currency: inv.currency, url: session.url, created_by: actor.id };
    let opened: boolean;
    try {
      opened = await db.transaction().execute(async (trx) => {
        // Under the invoice's lock: still issued, still this much due, and no other checkout opened meanwhile.
        const cur = await lockInvoice(trx, inv.id);
        const stillDue = cur.total_cents - cur.paid_cents - cur.credited_cents;
        const other = await trx.selectFrom('checkout_session').select('id').where('invoice_id', '=', inv.id).where('status', '=', 'open').executeTakeFirst();
        if (cur.status !== 'issued' || stillDue !== due || other) return false;
        await trx.insertInto('checkout_session').values(row).execute();
        await audit(trx, actor.id, 'checkout_started', 'Invoice', inv.id, { sessionId: session.id, amountCents: due });
        return true;
      });
    } catch (err) {
      if (!isUniqueViolation(err)) throw err;
      opened = false;
    }
    if (opened) return { url: session.url, sessionId: session.id, reused: false };
    // Another checkout or a payment won the race: keep a record of this session (so money paid on it
    // is still booked), close it at the provider, and look again.
    await db
      .insertInto('checkout_session')
      .values({ ...row, status: 'expired' })
      .onConflict((oc) => oc.column('id').doNothing())
      .execute();
    try {
      await provider.checkout.sessions.expire(session.id);
    } catch {
      // Recorded as expired here; should it be paid all the same, the payment is booked (as overpayment if need be).
    }
  }
  throw conflict('The invoice changed while its checkout was being opened; try again.');
}

/**
 * After a payment by hand, a credit or a void: an open checkout that no longer asks for what is due is
 * expired at the provider, so the member cannot pay it as well. Best effort: when the provider cannot
 * be reached the session stays open (a new checkout then refuses), and money paid on it is booked.
 */
export async function closeStaleCheckouts(
  db: Database,
  config: Config,
  invoiceId: string,
  now: Date,
  queue: PgBoss,
): Promise<{ closed: number; failed: number }> {
  const inv = await db.selectFrom('invoice').select(['status', 'total_cents', 'paid_cents', 'credited_cents']).where('id', '=', invoiceId).executeTakeFirst();
  if (!inv) return { closed: 0, failed: 0 };
  const due = inv.total_cents - inv.paid_cents - inv.credited_cents;
  const open = await db
    .selectFrom('checkout_session')
    .select(['id', 'amount_cents', 'currency', 'url'])
    .where('invoice_id', '=', invoiceId)
    .where('status', '=', 'open')
    .execute();
  let closed = 0;
  let failed = 0;
  for (const s of open) {
    if (inv.status === 'issued' && s.amount_cents === due) continue;
    try {
      await expireAtProvider(db, config, s, now, queue);
      closed++;
    } catch {
      failed++;
    }
  }
  return { closed, failed };
}

/** Expires an open session at the provider and here; refuses (502) when the provider cannot. */
async function expireAtProvider(db: Database, config: Config, open: OpenSession, now: Date, queue: PgBoss): Promise<void> {
  const provider = paymentProvider(config);
  let closed: CheckoutSession;
  try {
    closed = await provider.checkout.sessions.expire(open.id);
  } catch (err) {
    // Perhaps it is no longer open there (paid, or expired on its own): ask.
    let remote: CheckoutSession;
    try {
      remote = await provider.checkout.sessions.retrieve(open.id);
    } catch {
      throw providerDown(err, 'The earlier checkout of this invoice could not be closed, so no new one was opened');
    }
    if (remote.status === 'open') throw providerDown(err, 'The earlier checkout of this invoice could not be closed, so no new one was opened');
    closed = remote;
  }
  await settleClosedSession(db, closed, now, queue);
}

/** Brings our record of a session the provider reports as no longer open into line with it. */
async function settleClosedSession(db: Database, remote: CheckoutSession, now: Date, queue: PgBoss): Promise<void> {
  if (remote.payment_status === 'paid') {
    await db.transaction().execute((trx) => applyPaidSession(trx, remote, now, queue));
    return;
  }
  const status = remote.status === 'complete' ? 'complete' : 'expired';
  await db.transaction().execute(async (trx) => {
    const updated = await trx
      .updateTable('checkout_session')
      .set({ status, ...(status === 'complete' ? { completed_at: now } : {}) })
      .where('id', '=', remote.id)
      .where('status', '=', 'open')
      .returning('invoice_id')
      .executeTakeFirst();
    if (updated) await audit(trx, null, status === 'expired' ? 'checkout_expired' : 'checkout_closed', 'Invoice', updated.invoice_id, { sessionId: remote.id });
  });
}

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
  let known = await trx.selectFrom('checkout_session').selectAll().where('id', '=', session.id).forUpdate().executeTakeFirst();
  if (!known && session.payment_status === 'paid') known = await adoptSession(trx, session);
  if (!known) return { outcome: 'unknown_session', invoiceId: null };
  if (session.payment_status !== 'paid') return { outcome: `not_paid:${session.payment_status}`, invoiceId: known.invoice_id };
  const already = await trx.selectFrom('payment').select('id').where('checkout_session_id', '=', session.id).executeTakeFirst();
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
  );
  await trx.updateTable('checkout_session').set({ status: 'complete', completed_at: now }).where('id', '=', session.id).execute();
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
  const inv = await trx.selectFrom('invoice').select(['id', 'currency']).where('id', '=', invoiceId).executeTakeFirst();
  if (!inv || (session.currency ?? '').toUpperCase() !== inv.currency.trim().toUpperCase() || !session.amount_total) return undefined;
  await trx
    .insertInto('checkout_session')
    .values({
      id: session.id,
      invoice_id: inv.id,
      amount_cents: session.amount_total,
      currency: inv.currency,
      url: session.url ?? '',
      status: 'complete',
      created_by: null,
    })
    .onConflict((oc) => oc.column('id').doNothing())
    .execute();
  return trx.selectFrom('checkout_session').selectAll().where('id', '=', session.id).forUpdate().executeTakeFirst();
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
    const fresh = await trx
      .insertInto('payment_event')
      .values({ event_id: event.id, type: event.type, outcome: 'processing' })
      .onConflict((oc) => oc.column('event_id').doNothing())
      .returning('event_id')
      .executeTakeFirst();
    if (!fresh) return { duplicate: true, outcome: 'duplicate' };
    let result: { outcome: string; invoiceId: string | null } = { outcome: 'ignored', invoiceId: null };
    if (event.type === 'checkout.session.completed' || event.type === 'checkout.session.async_payment_succeeded') {
      result = await applyPaidSession(trx, event.data.object, now, queue);
    } else if (event.type === 'checkout.session.expired') {
      const s = event.data.object;
      const updated = await trx
        .updateTable('checkout_session')
        .set({ status: 'expired' })
        .where('id', '=', s.id)
        .where('status', '=', 'open')
        .returning('invoice_id')
        .executeTakeFirst();
      if (updated) result = { outcome: 'expired', invoiceId: updated.invoice_id };
      else {
        // Already closed here (paid, or expired by us): an expiry arriving late changes nothing.
        const known = await trx.selectFrom('checkout_session').select(['invoice_id', 'status']).where('id', '=', s.id).executeTakeFirst();
        result = known ? { outcome: `already_${known.status}`, invoiceId: known.invoice_id } : { outcome: 'unknown_session', invoiceId: null };
      }
    }
    await trx.updateTable('payment_event').set({ outcome: result.outcome, invoice_id: result.invoiceId }).where('event_id', '=', event.id).execute();
    if (result.invoiceId) await audit(trx, null, `provider_event:${event.type}`, 'Invoice', result.invoiceId, { eventId: event.id, outcome: result.outcome });
    return { duplicate: false, outcome: result.outcome };
  });
}

/** The member is back from the provider's page: ask the provider directly, in case its webhook is late. */
export async function confirmCheckout(db: Database, config: Config, invoiceId: string, sessionId: string, now: Date, queue: PgBoss): Promise<string> {
  const known = await db.selectFrom('checkout_session').select(['id', 'invoice_id']).where('id', '=', sessionId).executeTakeFirst();
  if (!known || known.invoice_id !== invoiceId) return 'unknown_session';
  let session: CheckoutSession;
  try {
    session = await paymentProvider(config).checkout.sessions.retrieve(sessionId);
  } catch (err) {
    throw new HttpProblem(502, 'Payment provider unavailable', `The payment provider did not answer: ${(err as Error).message}`);
  }
  return db.transaction().execute(async (trx) => (await applyPaidSession(trx, session, now, queue)).outcome);
}

/** Online payments that brought more than their invoice owed, newest first; `open` keeps those not yet refunded. */
function overpaymentsQuery(db: Database, q: { open?: boolean; memberId?: string; paymentId?: string }) {
  let query = db.selectFrom('payment').where('payment.overpaid_cents', '>', 0);
  if (q.open) query = query.where('payment.overpayment_refunded_on', 'is', null);
  if (q.memberId) query = query.where('payment.member_id', '=', q.memberId);
  if (q.paymentId) query = query.where('payment.id', '=', q.paymentId);
  return query;
}

/** One page of overpayments, newest first, with how many there are in all. */
export async function pageOverpayments(
  db: Database,
  q: { open?: boolean; memberId?: string; page: number; pageSize: number },
): Promise<{ items: Overpayment[]; total: number; page: number; pageSize: number }> {
  const { total } = await overpaymentsQuery(db, q)
    .select((eb) => eb.fn.countAll<number>().as('total'))
    .executeTakeFirstOrThrow();
  const items = await listOverpayments(db, q, { limit: q.pageSize, offset: (q.page - 1) * q.pageSize });
  return { items, total: Number(total), page: q.page, pageSize: q.pageSize };
}

export async function listOverpayments(
  db: Database,
  q: { open?: boolean; memberId?: string; paymentId?: string },
  window: { limit: number; offset: number } = { limit: 1, offset: 0 },
): Promise<Overpayment[]> {
  const query = overpaymentsQuery(db, q)
    .innerJoin('invoice', 'invoice.id', 'payment.invoice_id')
    .innerJoin('app_user', 'app_user.id', 'payment.member_id')
    .select([
      'payment.id',
      'payment.invoice_id',
      'invoice.number',
      'payment.member_id',
      'app_user.name',
      'payment.currency',
      'payment.received_on',
      'payment.amount_cents',
      'payment.overpaid_cents',
      'payment.reference',
      'payment.overpayment_refunded_on',
      'payment.overpayment_refund_reference',
    ]);
  const rows = await query
    .orderBy('payment.received_on', 'desc')
    .orderBy('payment.created_at', 'desc')
    .orderBy('payment.id')
    .limit(window.limit)
    .offset(window.offset)
    .execute();
  return rows.map((r) => ({
    paymentId: r.id,
    invoiceId: r.invoice_id,
    invoiceNumber: r.number,
    memberId: r.member_id,
    memberName: r.name,
    currency: r.currency.trim(),
    receivedOn: r.received_on,
    amountCents: r.amount_cents,
    overpaidCents: r.overpaid_cents,
    reference: r.reference,
    refundedOn: r.overpayment_refunded_on,
    refundReference: r.overpayment_refund_reference,
  }));
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
