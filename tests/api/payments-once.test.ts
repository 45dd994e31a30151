import request from 'supertest';
import Stripe from 'stripe';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FakeSession, PaymentsFake } from '../../backend/fakes/payments-fake.ts';
import type { InvoiceDetail } from '../../shared/schemas/billing.ts';
import { createInvoice, createMember } from '../../db/factories/index.ts';
import { createTestContext, type ApiClient, type TestContext } from '../helpers/context.ts';
import { paymentsTestContext, type PaymentsTestContext } from '../helpers/payments.ts';

// An invoice is paid once: one open checkout at a time, webhooks replayed, reordered and raced with
// the member's return, and money that arrives beyond what is due kept as an overpayment to refund.
// The app listens on a real port so the provider fake can deliver its signed webhooks to it.

let ctx: TestContext;
let fake: PaymentsFake;
let opened: PaymentsTestContext | undefined;
let appUrl: string;
let treasurer: ApiClient;
const secret = 'whsec_cellarwright_local';
const DUE = 1620; // November's dues, 15.00 + 8 % tax

interface Payer {
  member: ApiClient;
  invoiceId: string;
}

/** A new member with November's dues invoiced on 1 Dec and unpaid, signed in. */
async function payer(name: string): Promise<Payer> {
  const m = await createMember(ctx.db, { name });
  const inv = await createInvoice(ctx.db, { memberId: m.id, period: '2026-11', today: '2026-12-01' });
  expect(inv.total_cents).toBe(DUE);
  return { member: await ctx.signIn(m.email), invoiceId: inv.id };
}

async function detail(api: ApiClient, id: string): Promise<InvoiceDetail> {
  const res = await api.get(`/api/invoices/${id}`);
  expect(res.status).toBe(200);
  return res.body.invoice;
}

const sessionsOf = (invoiceId: string) => ctx.db.selectFrom('checkout_session').selectAll().where('invoice_id', '=', invoiceId).orderBy('created_at').execute();
const paymentsOf = (invoiceId: string) => ctx.db.selectFrom('payment').selectAll().where('invoice_id', '=', invoiceId).orderBy('created_at').execute();
const openAtProvider = (invoiceId: string) => [...fake.sessions.values()].filter((s) => s.client_reference_id === invoiceId && s.status === 'open');

/** Presses "Pay" on the fake's hosted page, as a browser would. */
async function pay(url: string): Promise<void> {
  const html = await (await fetch(url)).text();
  const action = /action="([^"]+\/confirm)"/.exec(html)![1]!;
  const res = await fetch(new URL(action, url), { method: 'POST', redirect: 'manual' });
  expect(res.status).toBe(303);
}

/** Pays on the provider's page while its webhooks cannot reach the app (so only the provider knows). */
async function payUnnoticed(url: string): Promise<void> {
  fake.webhookUrl = 'http://127.0.0.1:9/api/webhooks/payments';
  try {
    await pay(url);
  } finally {
    fake.webhookUrl = `${appUrl}/api/webhooks/payments`;
  }
}

/** Marks a session paid at the fake without any webhook, and returns the event the provider would send. */
function paidAtProvider(sessionId: string, eventId: string, type = 'checkout.session.completed') {
  const s = fake.sessions.get(sessionId)!;
  Object.assign(s, { status: 'complete', payment_status: 'paid', url: null, payment_intent: s.payment_intent ?? `pi_test_${sessionId.slice(-8)}` });
  return eventFor(s, eventId, type);
}

function eventFor(s: FakeSession, eventId: string, type: string) {
  const { line_items_summary: _items, ...object } = s;
  return { id: eventId, object: 'event', type, created: Math.floor(ctx.clock.now().getTime() / 1000), data: { object: { ...object } } };
}

function postEvent(event: object, withSecret = secret, app = ctx.app) {
  const payload = JSON.stringify(event);
  const header = Stripe.webhooks.generateTestHeaderString({ payload, secret: withSecret });
  return request(app).post('/api/webhooks/payments').set('Content-Type', 'application/json').set('Stripe-Signature', header).send(payload);
}

/** What the invoice owes, what it has been paid, and what came in beyond that, from the database. */
async function books(invoiceId: string) {
  const inv = await ctx.db.selectFrom('invoice').selectAll().where('id', '=', invoiceId).executeTakeFirstOrThrow();
  const payments = await paymentsOf(invoiceId);
  return {
    status: inv.status,
    due: inv.total_cents - inv.paid_cents - inv.credited_cents,
    paid: inv.paid_cents,
    received: payments.reduce((s, p) => s + p.amount_cents, 0),
    overpaid: payments.reduce((s, p) => s + p.overpaid_cents, 0),
    payments: payments.length,
  };
}

beforeAll(async () => {
  opened = await paymentsTestContext();
  ({ ctx, fake, appUrl } = opened);
  treasurer = await ctx.signIn('treasurer@example.org');
});
afterAll(() => opened?.close());

describe('one open checkout per invoice', () => {
  it('reuses the open checkout while it asks for what is due', async () => {
    const { member, invoiceId } = await payer('Rhea Reuse');
    const first = await member.post(`/api/invoices/${invoiceId}/checkout`);
    const second = await member.post(`/api/invoices/${invoiceId}/checkout`);
    expect([first.status, second.status]).toEqual([201, 201]);
    expect(first.body.reused).toBe(false);
    expect(second.body).toMatchObject({ sessionId: first.body.sessionId, url: first.body.url, reused: true });
    expect(openAtProvider(invoiceId)).toHaveLength(1);
    expect((await sessionsOf(invoiceId)).map((s) => s.status)).toEqual(['open']);
  });

  it('expires the old checkout at the provider and here when what is due has changed', async () => {
    const { member, invoiceId } = await payer('Paula Part');
    const old = await member.post(`/api/invoices/${invoiceId}/checkout`);
    const part = await treasurer.post(`/api/invoices/${invoiceId}/payments`, { amountCents: 500, method: 'bank_transfer', receivedOn: '2026-12-02' });
    expect(part.status).toBe(201);
    // Recording the transfer already closed the checkout that asked for the whole amount.
    expect(fake.sessions.get(old.body.sessionId)!.status).toBe('expired');
    const fresh = await member.post(`/api/invoices/${invoiceId}/checkout`);
    expect(fresh.status).toBe(201);
    expect(fresh.body.sessionId).not.toBe(old.body.sessionId);
    expect(fake.sessions.get(old.body.sessionId)!.status).toBe('expired');
    expect(fake.sessions.get(fresh.body.sessionId)!.amount_total).toBe(DUE - 500);
    expect(openAtProvider(invoiceId).map((s) => s.id)).toEqual([fresh.body.sessionId]);
    expect((await sessionsOf(invoiceId)).map((s) => [s.id, s.status])).toEqual([
      [old.body.sessionId, 'expired'],
      [fresh.body.sessionId, 'open'],
    ]);
  });

  it('closes the open checkout when the invoice is voided, so it cannot be paid any more', async () => {
    const { member, invoiceId } = await payer('Vera Void');
    const open = await member.post(`/api/invoices/${invoiceId}/checkout`);
    const voided = await treasurer.post(`/api/invoices/${invoiceId}/void`, { reason: 'Billed in error' });
    expect(voided.status).toBe(200);
    expect(fake.sessions.get(open.body.sessionId)!.status).toBe('expired');
    expect((await sessionsOf(invoiceId)).map((r) => r.status)).toEqual(['expired']);
  });

  it('opens no new checkout when the provider cannot expire the old one', async () => {
    const { member, invoiceId } = await payer('Otto Outage');
    const old = await member.post(`/api/invoices/${invoiceId}/checkout`);
    fake.failing.add('expire');
    try {
      // The cash is booked though the checkout it makes stale cannot be closed now.
      const cash = await treasurer.post(`/api/invoices/${invoiceId}/payments`, { amountCents: 620, method: 'cash', receivedOn: '2026-12-02' });
      expect(cash.status).toBe(201);
      const refused = await member.post(`/api/invoices/${invoiceId}/checkout`);
      expect(refused.status).toBe(502);
      expect(refused.headers['content-type']).toMatch(/problem\+json/);
      expect(refused.body.detail).toMatch(/could not be closed, so no new one was opened/);
      // And when the provider cannot even be asked about it, the same.
      fake.failing.add('retrieve');
      expect((await member.post(`/api/invoices/${invoiceId}/checkout`)).status).toBe(502);
    } finally {
      fake.failing.clear();
    }
    expect(openAtProvider(invoiceId).map((s) => s.id)).toEqual([old.body.sessionId]);
    expect((await sessionsOf(invoiceId)).map((s) => s.status)).toEqual(['open']);
    // Once the provider answers again, the old one is closed and one for the 10.00 left is opened.
    const fresh = await member.post(`/api/invoices/${invoiceId}/checkout`);
    expect(fresh.status).toBe(201);
    expect(openAtProvider(invoiceId).map((s) => [s.id, s.amount_total])).toEqual([[fresh.body.sessionId, DUE - 620]]);
  });

  it('opens one checkout however many are asked for at once', async () => {
    const { member, invoiceId } = await payer('Connie Current');
    const all = await Promise.all(Array.from({ length: 6 }, () => member.post(`/api/invoices/${invoiceId}/checkout`)));
    expect(all.map((r) => r.status)).toEqual(Array(6).fill(201));
    const ids = new Set(all.map((r) => r.body.sessionId));
    expect(ids.size).toBe(1);
    expect(openAtProvider(invoiceId).map((s) => s.id)).toEqual([...ids]);
    // Sessions the provider made for a losing request are on record (as expired), never open.
    const rows = await sessionsOf(invoiceId);
    expect(rows.filter((s) => s.status === 'open').map((s) => s.id)).toEqual([...ids]);
    for (const s of rows.filter((r) => r.status !== 'open')) expect(fake.sessions.get(s.id)!.status).toBe('expired');
  });

  it('is enforced by the database: a second open session for an invoice is refused', async () => {
    const { member, invoiceId } = await payer('Dora Database');
    await member.post(`/api/invoices/${invoiceId}/checkout`);
    await expect(
      ctx.db
        .insertInto('checkout_session')
        .values({ id: 'cs_test_second_open', invoice_id: invoiceId, amount_cents: DUE, currency: 'EUR', url: 'http://x' })
        .execute(),
    ).rejects.toMatchObject({ code: '23505', constraint: 'checkout_session_one_open_per_invoice_key' });
  });

  it('books a session paid at the provider before it could be expired, and then opens none', async () => {
    const { member, invoiceId } = await payer('Tess Timing');
    const old = await member.post(`/api/invoices/${invoiceId}/checkout`);
    await payUnnoticed(old.body.url);
    // The treasurer records a bank transfer meanwhile: now the provider's payment is partly too much.
    await treasurer.post(`/api/invoices/${invoiceId}/payments`, { amountCents: 500, method: 'bank_transfer', receivedOn: '2026-12-02' });
    const res = await member.post(`/api/invoices/${invoiceId}/checkout`);
    expect(res.status).toBe(409);
    expect(res.body.detail).toBe('This invoice is already paid.');
    expect(await books(invoiceId)).toEqual({ status: 'paid', due: 0, paid: DUE, received: DUE + 500, overpaid: 500, payments: 2 });
    expect(openAtProvider(invoiceId)).toHaveLength(0);
    expect((await sessionsOf(invoiceId)).map((s) => s.status)).toEqual(['complete']);
  });
});

/** A checkout session for the invoice made at the provider directly, one the app has no record of. */
function sessionAtProvider(invoiceId: string) {
  const sdk = new Stripe('sk_test_cellarwright_local', { host: '127.0.0.1', port: fake.port, protocol: 'http', maxNetworkRetries: 0, telemetry: false });
  return sdk.checkout.sessions.create({
    mode: 'payment',
    client_reference_id: invoiceId,
    metadata: { invoiceId },
    line_items: [{ quantity: 1, price_data: { currency: 'eur', unit_amount: DUE, product_data: { name: 'Invoice' } } }],
    success_url: `${appUrl}/ok`,
    cancel_url: `${appUrl}/cancel`,
  });
}

describe('paid twice', () => {
  it('books both sessions: one pays the invoice, the other is an overpayment the treasurer sees', async () => {
    const { member, invoiceId } = await payer('Tom Twice');
    const a = await member.post(`/api/invoices/${invoiceId}/checkout`);
    // A second session for the same invoice that the app has no record of (its record was lost
    // between asking the provider and writing it down): the provider still knows whose it is.
    const b = await sessionAtProvider(invoiceId);
    await pay(a.body.url);
    await pay(b.url!);
    expect(
      fake.deliveries
        .filter((d) => d.type === 'checkout.session.completed')
        .slice(-2)
        .map((d) => d.status),
    ).toEqual([200, 200]);
    expect(await books(invoiceId)).toEqual({ status: 'paid', due: 0, paid: DUE, received: 2 * DUE, overpaid: DUE, payments: 2 });
    const events = await ctx.db.selectFrom('payment_event').select(['outcome']).where('invoice_id', '=', invoiceId).orderBy('received_at').execute();
    expect(events.map((e) => e.outcome)).toEqual(['paid', 'overpaid']);

    // The treasurer sees it on the invoice, in the summary and in the list of overpayments to refund.
    const inv = await detail(treasurer, invoiceId);
    expect(inv).toMatchObject({ status: 'paid', amountDueCents: 0, paidCents: DUE });
    expect(inv.payments.map((p) => [p.amountCents, p.overpaidCents])).toEqual([
      [DUE, 0],
      [DUE, DUE],
    ]);
    const summary = await treasurer.get('/api/billing/summary');
    expect(summary.body.overpayments.count).toBeGreaterThanOrEqual(1);
    const list = await treasurer.get('/api/billing/overpayments?open=true');
    expect(list.status).toBe(200);
    const mine = list.body.items.filter((o: { invoiceId: string }) => o.invoiceId === invoiceId);
    expect(mine).toEqual([expect.objectContaining({ amountCents: DUE, overpaidCents: DUE, refundedOn: null, memberName: 'Tom Twice' })]);
    // The list pages on the server: its total counts every open one, a page holds at most pageSize.
    expect(list.body).toMatchObject({ page: 1, pageSize: 50, total: list.body.items.length });
    const paged = await treasurer.get(`/api/billing/overpayments?open=true&pageSize=1&page=${list.body.total + 1}`);
    expect(paged.body).toMatchObject({ items: [], total: list.body.total, page: list.body.total + 1, pageSize: 1 });
    expect((await treasurer.get('/api/billing/overpayments?pageSize=1000')).status).toBe(422);
    // The member is owed it: their balance is in credit by that much.
    const balance = await member.get('/api/billing/balance');
    expect(balance.body.balanceCents).toBe(-DUE);
    expect((await member.get('/api/billing/overpayments')).status).toBe(403);

    // Paid back by the treasurer: no longer owed, once.
    const refunded = await treasurer.post(`/api/billing/overpayments/${mine[0].paymentId}/refunded`, {
      refundedOn: '2026-12-03',
      reference: 'Bank transfer 4471',
    });
    expect(refunded.status).toBe(200);
    expect(refunded.body.overpayment).toMatchObject({ refundedOn: '2026-12-03', refundReference: 'Bank transfer 4471' });
    expect((await treasurer.post(`/api/billing/overpayments/${mine[0].paymentId}/refunded`, { refundedOn: '2026-12-03' })).status).toBe(409);
    expect((await member.get('/api/billing/balance')).body.balanceCents).toBe(0);
    const after = await treasurer.get('/api/billing/overpayments?open=true');
    expect(after.body.items.some((o: { invoiceId: string }) => o.invoiceId === invoiceId)).toBe(false);
    const bad = await treasurer.post(`/api/billing/overpayments/${mine[0].paymentId}/refunded`, { refundedOn: 'yesterday' });
    expect(bad.status).toBe(422);
    expect((await member.post(`/api/billing/overpayments/${mine[0].paymentId}/refunded`, { refundedOn: '2026-12-03' })).status).toBe(403);
  });
});

describe('webhooks replayed, reordered and raced', () => {
  it('books a session expired here and then reported paid, and ignores an expiry after payment', async () => {
    const { member, invoiceId } = await payer('Rory Reorder');
    const { body } = await member.post(`/api/invoices/${invoiceId}/checkout`);
    const s = fake.sessions.get(body.sessionId)!;
    const expired = await postEvent(eventFor({ ...s, status: 'expired', url: null }, 'evt_test_reorder_expired', 'checkout.session.expired'));
    expect(expired.body).toMatchObject({ duplicate: false, outcome: 'expired' });
    expect((await sessionsOf(invoiceId)).map((r) => r.status)).toEqual(['expired']);
    // It was paid all the same (the expiry raced the payment at the provider): the money is booked.
    const completed = await postEvent(paidAtProvider(body.sessionId, 'evt_test_reorder_completed'));
    expect(completed.body).toMatchObject({ duplicate: false, outcome: 'paid' });
    const late = await postEvent(eventFor({ ...s, status: 'expired' }, 'evt_test_reorder_expired_late', 'checkout.session.expired'));
    expect(late.body).toMatchObject({ duplicate: false, outcome: 'already_complete' });
    expect((await sessionsOf(invoiceId)).map((r) => r.status)).toEqual(['complete']);
    // Delivered twice, and under another event id: nothing more.
    const twice = await postEvent(paidAtProvider(body.sessionId, 'evt_test_reorder_completed'));
    expect(twice.body).toMatchObject({ duplicate: true });
    const another = await postEvent(paidAtProvider(body.sessionId, 'evt_test_reorder_async', 'checkout.session.async_payment_succeeded'));
    expect(another.body).toMatchObject({ duplicate: false, outcome: 'already_recorded' });
    expect(await books(invoiceId)).toEqual({ status: 'paid', due: 0, paid: DUE, received: DUE, overpaid: 0, payments: 1 });
  });

  it('books one payment when identical webhooks, other notices and the member’s return arrive at once', async () => {
    const { member, invoiceId } = await payer('Cora Concurrent');
    const { body } = await member.post(`/api/invoices/${invoiceId}/checkout`);
    const event = paidAtProvider(body.sessionId, 'evt_test_concurrent');
    const notice = paidAtProvider(body.sessionId, 'evt_test_concurrent_async', 'checkout.session.async_payment_succeeded');
    const results = await Promise.all([
      ...Array.from({ length: 8 }, () => postEvent(event)),
      postEvent(notice),
      postEvent(notice),
      member.post(`/api/invoices/${invoiceId}/checkout/confirm`, { sessionId: body.sessionId }),
      member.post(`/api/invoices/${invoiceId}/checkout/confirm`, { sessionId: body.sessionId }),
    ]);
    expect(results.map((r) => r.status)).toEqual(Array(12).fill(200));
    const outcomes = results.map((r) => r.body.outcome);
    expect(outcomes.filter((o) => o === 'paid')).toHaveLength(1);
    expect(outcomes.filter((o) => o !== 'paid').every((o) => o === 'duplicate' || o === 'already_recorded')).toBe(true);
    expect(results.slice(0, 8).filter((r) => r.body.duplicate === false)).toHaveLength(1);
    expect(await books(invoiceId)).toEqual({ status: 'paid', due: 0, paid: DUE, received: DUE, overpaid: 0, payments: 1 });
    const events = await ctx.db
      .selectFrom('payment_event')
      .select('event_id')
      .where('event_id', 'in', ['evt_test_concurrent', 'evt_test_concurrent_async'])
      .execute();
    expect(events).toHaveLength(2);
  });

  it('books two sessions paid at once: exactly what was due as paid, the rest as overpayment, none lost', async () => {
    const { member, invoiceId } = await payer('Dana Double');
    const a = await member.post(`/api/invoices/${invoiceId}/checkout`);
    // A second session at the provider, as a lost race left it when the provider would not expire it (recorded here as expired).
    const b = await sessionAtProvider(invoiceId);
    await ctx.db
      .insertInto('checkout_session')
      .values({ id: b.id, invoice_id: invoiceId, amount_cents: DUE, currency: 'EUR', url: b.url!, status: 'expired' })
      .execute();
    const ea = paidAtProvider(a.body.sessionId, 'evt_test_double_a');
    const eb = paidAtProvider(b.id, 'evt_test_double_b');
    const results = await Promise.all([
      ...Array.from({ length: 4 }, () => postEvent(ea)),
      ...Array.from({ length: 4 }, () => postEvent(eb)),
      member.post(`/api/invoices/${invoiceId}/checkout/confirm`, { sessionId: a.body.sessionId }),
      member.post(`/api/invoices/${invoiceId}/checkout/confirm`, { sessionId: b.id }),
    ]);
    expect(results.map((r) => r.status)).toEqual(Array(10).fill(200));
    const outcomes = results.map((r) => r.body.outcome);
    expect(outcomes.filter((o) => o === 'paid' || o === 'overpaid').sort()).toEqual(['overpaid', 'paid']);
    expect(outcomes.filter((o) => o !== 'paid' && o !== 'overpaid').every((o) => o === 'duplicate' || o === 'already_recorded')).toBe(true);
    expect(await books(invoiceId)).toEqual({ status: 'paid', due: 0, paid: DUE, received: 2 * DUE, overpaid: DUE, payments: 2 });
    expect((await paymentsOf(invoiceId)).map((p) => p.overpaid_cents).sort((x, y) => x - y)).toEqual([0, DUE]);
  });
});

describe('webhook secrets', () => {
  it('refuses an event forged with the public development secret when a real one is configured', async () => {
    const real = 'whsec_a_real_signing_secret_from_the_provider';
    const other = await createTestContext({ PAYMENTS_FAKE_PORT: String(fake.port), STRIPE_WEBHOOK_SECRET: real });
    try {
      const m = await createMember(other.db, { name: 'Fay Forged' });
      const inv = await createInvoice(other.db, { memberId: m.id, period: '2026-11', today: '2026-12-01' });
      await other.db
        .insertInto('checkout_session')
        .values({ id: 'cs_test_forged', invoice_id: inv.id, amount_cents: DUE, currency: 'EUR', url: 'http://x' })
        .execute();
      const session = {
        id: 'cs_test_forged',
        object: 'checkout.session',
        status: 'complete',
        payment_status: 'paid',
        amount_total: DUE,
        currency: 'eur',
        client_reference_id: inv.id,
        metadata: { invoiceId: inv.id },
      };
      const event = { id: 'evt_test_forged', object: 'event', type: 'checkout.session.completed', data: { object: session } };
      const forged = await postEvent(event, secret, other.app);
      expect(forged.status).toBe(400);
      expect(forged.headers['content-type']).toMatch(/problem\+json/);
      const untouched = await other.db.selectFrom('invoice').select(['status', 'paid_cents']).where('id', '=', inv.id).executeTakeFirstOrThrow();
      expect(untouched).toEqual({ status: 'issued', paid_cents: 0 });
      expect(await other.db.selectFrom('payment_event').select('event_id').execute()).toHaveLength(0);
      // The same event signed with the configured secret is the provider's: it is booked.
      const genuine = await postEvent(event, real, other.app);
      expect(genuine.body).toMatchObject({ duplicate: false, outcome: 'paid' });
    } finally {
      await other.close();
    }
  });
});
