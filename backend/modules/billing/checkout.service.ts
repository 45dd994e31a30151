import type PgBoss from 'pg-boss';
import type { Config } from '../../config/env.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, HttpProblem } from '../../lib/http-problem.ts';
import { getBillingProfile } from './billing-profile.service.ts';
import { closeOpenSession, findSession, insertSession, invoiceForCheckout, openSessions } from './checkout.repository.ts';
import { lockInvoice } from './invoice-commands.service.ts';
import { paymentProvider, type CheckoutSession } from './payment-provider.ts';
import { applyPaidSession } from './payments.service.ts';

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
    const inv = await invoiceForCheckout(db, invoiceId);
    if (!inv) throw new Error(`No invoice ${invoiceId}`);
    if (inv.status !== 'issued') throw conflict(inv.status === 'paid' ? 'This invoice is already paid.' : `This invoice is ${inv.status} and cannot be paid.`);
    const due = inv.total_cents - inv.paid_cents - inv.credited_cents;
    if (due <= 0) throw conflict('Nothing is due on this invoice.');

    const [open] = await openSessions(db, inv.id);
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
    const { coopName } = await getBillingProfile(db);
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
              product_data: { name: `Invoice ${inv.number} (${inv.period})`, description: coopName },
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
        const [other] = await openSessions(trx, inv.id);
        if (cur.status !== 'issued' || stillDue !== due || other) return false;
        await insertSession(trx, row);
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
    await insertSession(db, { ...row, status: 'expired' }, { unlessKnown: true });
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
  const inv = await invoiceForCheckout(db, invoiceId);
  if (!inv) return { closed: 0, failed: 0 };
  const due = inv.total_cents - inv.paid_cents - inv.credited_cents;
  const open = await openSessions(db, invoiceId);
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
    const updated = await closeOpenSession(trx, remote.id, status, now);
    if (updated) await audit(trx, null, status === 'expired' ? 'checkout_expired' : 'checkout_closed', 'Invoice', updated.invoice_id, { sessionId: remote.id });
  });
}

/** The member is back from the provider's page: ask the provider directly, in case its webhook is late. */
export async function confirmCheckout(db: Database, config: Config, invoiceId: string, sessionId: string, now: Date, queue: PgBoss): Promise<string> {
  const known = await findSession(db, sessionId);
  if (!known || known.invoice_id !== invoiceId) return 'unknown_session';
  let session: CheckoutSession;
  try {
    session = await paymentProvider(config).checkout.sessions.retrieve(sessionId);
  } catch (err) {
    throw new HttpProblem(502, 'Payment provider unavailable', `The payment provider did not answer: ${(err as Error).message}`);
  }
  return db.transaction().execute(async (trx) => (await applyPaidSession(trx, session, now, queue)).outcome);
}
