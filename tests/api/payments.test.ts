import request from 'supertest';
import Stripe from 'stripe';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { PaymentsFake } from '../../backend/fakes/payments-fake.ts';
import type { InvoiceDetail } from '../../shared/schemas/billing.ts';
import { createInvoice, createMember } from '../../db/factories/index.ts';
import type { ApiClient, TestContext } from '../helpers/context.ts';
import { paymentsTestContext, type PaymentsTestContext } from '../helpers/payments.ts';

// Online payment end to end against the local fake of the payment provider: the app listens on a
// real port so the fake can deliver its signed webhooks to it.

let ctx: TestContext;
let fake: PaymentsFake;
let opened: PaymentsTestContext | undefined;
let appUrl: string;
const secret = 'whsec_cellarwright_local';
/** Members with November's dues invoiced on 1 Dec and unpaid (16.20): one per story below. */
const payers = { paid: '', cancels: '', late: '', webhook: '' };

async function memberWithUnpaidInvoice(name: string): Promise<string> {
  const m = await createMember(ctx.db, { name });
  await createInvoice(ctx.db, { memberId: m.id, period: '2026-11', today: '2026-12-01' });
  return m.email;
}

async function unpaidInvoiceOf(email: string): Promise<{ id: string; due: number; number: string }> {
  const row = await ctx.db
    .selectFrom('invoice')
    .innerJoin('app_user', 'app_user.id', 'invoice.member_id')
    .select(['invoice.id', 'invoice.number', (eb) => eb.ref('invoice.total_cents').as('total'), 'invoice.paid_cents', 'invoice.credited_cents'])
    .where('app_user.email', '=', email)
    .where('invoice.status', '=', 'issued')
    .orderBy('invoice.issued_on')
    .executeTakeFirstOrThrow();
  return { id: row.id, due: row.total - row.paid_cents - row.credited_cents, number: row.number! };
}

async function detail(api: ApiClient, id: string): Promise<InvoiceDetail> {
  const res = await api.get(`/api/invoices/${id}`);
  expect(res.status).toBe(200);
  return res.body.invoice;
}

/** Presses "Pay" on the fake's hosted page, as a browser would; returns where it redirects. */
async function pay(url: string): Promise<string> {
  const page = await fetch(url);
  expect(page.status).toBe(200);
  const html = await page.text();
  const action = /action="([^"]+\/confirm)"/.exec(html)![1]!;
  const res = await fetch(new URL(action, url), { method: 'POST', redirect: 'manual' });
  expect(res.status).toBe(303);
  return res.headers.get('location')!;
}

function signed(event: object, withSecret = secret) {
  const payload = JSON.stringify(event);
  return { payload, header: Stripe.webhooks.generateTestHeaderString({ payload, secret: withSecret }) };
}

const postWebhook = (payload: string, header?: string) => {
  const r = request(ctx.app).post('/api/webhooks/payments').set('Content-Type', 'application/json');
  return (header ? r.set('Stripe-Signature', header) : r).send(payload);
};

beforeAll(async () => {
  opened = await paymentsTestContext();
  ({ ctx, fake, appUrl } = opened);
  payers.paid = await memberWithUnpaidInvoice('Pia Payer');
  payers.cancels = await memberWithUnpaidInvoice('Cato Cancel');
  payers.late = await memberWithUnpaidInvoice('Lorna Late');
  payers.webhook = await memberWithUnpaidInvoice('Wim Webhook');
});
afterAll(() => opened?.close());

describe('paying online', () => {
  it('takes a member from checkout to paid: the fake’s page, its signed webhook, back to the app', async () => {
    const member = await ctx.signIn(payers.paid);
    const inv = await unpaidInvoiceOf(payers.paid);
    expect(inv.due).toBe(1620); // November's dues, 15.00 + 8 % tax
    const res = await member.post(`/api/invoices/${inv.id}/checkout`);
    expect(res.status).toBe(201);
    expect(res.body.url.startsWith(`${fake.url}/pay/cs_test_`)).toBe(true);
    // The session the app asked the provider for: what is due, in the invoice's currency.
    const session = fake.sessions.get(res.body.sessionId)!;
    expect(session).toMatchObject({ amount_total: inv.due, currency: 'eur', client_reference_id: inv.id, customer_email: payers.paid });
    const page = await (await fetch(res.body.url)).text();
    expect(page).toContain(inv.number);

    const back = await pay(res.body.url);
    expect(back).toBe(`${appUrl}/billing/my-invoices/${inv.id}?checkout=success&session_id=${res.body.sessionId}`);
    expect(fake.deliveries.at(-1)).toMatchObject({ type: 'checkout.session.completed', status: 200 });
    const after = await detail(member, inv.id);
    expect(after).toMatchObject({ status: 'paid', amountDueCents: 0 });
    expect(after.payments.at(-1)).toMatchObject({ method: 'online', amountCents: inv.due });
    const event = await ctx.db.selectFrom('payment_event').selectAll().where('event_id', '=', fake.deliveries.at(-1)!.eventId).executeTakeFirstOrThrow();
    expect(event).toMatchObject({ type: 'checkout.session.completed', outcome: 'paid', invoice_id: inv.id });
    // Nothing left to pay: no second checkout.
    expect((await member.post(`/api/invoices/${inv.id}/checkout`)).status).toBe(409);
  });

  it('leaves the invoice open when the member cancels on the provider’s page', async () => {
    const member = await ctx.signIn(payers.cancels);
    const inv = await unpaidInvoiceOf(payers.cancels);
    const { body } = await member.post(`/api/invoices/${inv.id}/checkout`);
    const html = await (await fetch(body.url)).text();
    const cancel = /action="([^"]+\/cancel)"/.exec(html)![1]!;
    const res = await fetch(new URL(cancel, body.url), { method: 'POST', redirect: 'manual' });
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe(`${appUrl}/billing/my-invoices/${inv.id}?checkout=cancelled`);
    expect((await detail(member, inv.id)).status).toBe('issued');
  });

  it('is for the member the invoice is addressed to only', async () => {
    const inv = await unpaidInvoiceOf(payers.cancels);
    const other = await ctx.signIn('member@example.org');
    expect((await other.post(`/api/invoices/${inv.id}/checkout`)).status).toBe(404);
    const treasurer = await ctx.signIn('treasurer@example.org');
    expect((await treasurer.post(`/api/invoices/${inv.id}/checkout`)).status).toBe(403);
    const brewer = await ctx.signIn('brewer@example.org');
    expect((await brewer.post(`/api/invoices/${inv.id}/checkout`)).status).toBe(403);
  });

  it('still books the payment when the webhook is late: the member’s return asks the provider', async () => {
    const member = await ctx.signIn(payers.late);
    const inv = await unpaidInvoiceOf(payers.late);
    const { body } = await member.post(`/api/invoices/${inv.id}/checkout`);
    fake.webhookUrl = 'http://127.0.0.1:9/api/webhooks/payments'; // nobody listens there
    try {
      await pay(body.url);
    } finally {
      fake.webhookUrl = `${appUrl}/api/webhooks/payments`;
    }
    expect((await detail(member, inv.id)).status).toBe('issued');
    const confirmed = await member.post(`/api/invoices/${inv.id}/checkout/confirm`, { sessionId: body.sessionId });
    expect(confirmed.status).toBe(200);
    expect(confirmed.body).toMatchObject({ outcome: 'paid', invoice: { status: 'paid' } });
    // Confirming again, or the webhook arriving after all, changes nothing.
    const again = await member.post(`/api/invoices/${inv.id}/checkout/confirm`, { sessionId: body.sessionId });
    expect(again.body.outcome).toBe('already_recorded');
    const session = fake.sessions.get(body.sessionId)!;
    const late = signed({ id: 'evt_test_late_delivery', object: 'event', type: 'checkout.session.completed', data: { object: session } });
    const res = await postWebhook(late.payload, late.header);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ duplicate: false, outcome: 'already_recorded' });
    const payments = await ctx.db.selectFrom('payment').select('id').where('checkout_session_id', '=', body.sessionId).execute();
    expect(payments).toHaveLength(1);
  });
});

describe('the payment webhook', () => {
  let sessionId: string;
  let invoiceId: string;
  let event: object;

  beforeAll(async () => {
    const member = await ctx.signIn(payers.webhook);
    const inv = await unpaidInvoiceOf(payers.webhook);
    invoiceId = inv.id;
    const { body } = await member.post(`/api/invoices/${inv.id}/checkout`);
    sessionId = body.sessionId;
    // What the provider would send once the member paid (built here, not delivered by the fake).
    const session = { ...fake.sessions.get(sessionId)!, status: 'complete', payment_status: 'paid', payment_intent: 'pi_test_webhook' };
    event = {
      id: 'evt_test_replayed',
      object: 'event',
      type: 'checkout.session.completed',
      created: Math.floor(ctx.clock.now().getTime() / 1000),
      data: { object: session },
    };
  });

  const paymentsOf = () =>
    ctx.db.selectFrom('payment').select(['id', 'amount_cents']).where('invoice_id', '=', invoiceId).where('method', '=', 'online').execute();

  it('rejects a bad signature, a tampered body and a missing signature with 400, recording nothing', async () => {
    const wrongSecret = signed(event, 'whsec_someone_else');
    expect((await postWebhook(wrongSecret.payload, wrongSecret.header)).status).toBe(400);
    const good = signed(event);
    const tampered = good.payload.replace('"amount_total":', '"amount_total":1,"x":');
    const res = await postWebhook(tampered, good.header);
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(/problem\+json/);
    expect((await postWebhook(good.payload)).status).toBe(400);
    // The provider's SDK checks a signature's age against the machine's own clock (not the co-op's), so the stale one is an hour old by that clock.
    const stale = Stripe.webhooks.generateTestHeaderString({ payload: good.payload, secret, timestamp: Math.floor(Date.now() / 1000) - 3600 });
    expect((await postWebhook(good.payload, stale)).status).toBe(400);
    expect(await paymentsOf()).toHaveLength(0);
    expect(await ctx.db.selectFrom('payment_event').select('event_id').where('event_id', '=', 'evt_test_replayed').execute()).toHaveLength(0);
  });

  it('marks the invoice paid once, and a replay of the same event is a no-op', async () => {
    const first = signed(event);
    const res = await postWebhook(first.payload, first.header);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ received: true, duplicate: false, outcome: 'paid' });
    const afterFirst = await ctx.db.selectFrom('invoice').selectAll().where('id', '=', invoiceId).executeTakeFirstOrThrow();
    expect(afterFirst.status).toBe('paid');
    // The provider retries with a fresh signature; a replayer resends it as it was. Both change nothing.
    const replay = signed(event);
    const [r1, r2] = await Promise.all([postWebhook(replay.payload, replay.header), postWebhook(first.payload, first.header)]);
    expect([r1.body.duplicate, r2.body.duplicate]).toEqual([true, true]);
    const afterReplay = await ctx.db.selectFrom('invoice').selectAll().where('id', '=', invoiceId).executeTakeFirstOrThrow();
    expect(afterReplay.paid_cents).toBe(afterFirst.paid_cents);
    expect(afterReplay.updated_at).toEqual(afterFirst.updated_at);
    expect(await paymentsOf()).toHaveLength(1);
    // Another event about the same paid session (a second kind of notice) does not pay twice either.
    const other = signed({ ...event, id: 'evt_test_async_notice', type: 'checkout.session.async_payment_succeeded' });
    const r3 = await postWebhook(other.payload, other.header);
    expect(r3.body).toMatchObject({ duplicate: false, outcome: 'already_recorded' });
    expect(await paymentsOf()).toHaveLength(1);
  });

  it('records and ignores events it has no use for', async () => {
    const e = signed({ id: 'evt_test_other', object: 'event', type: 'customer.created', data: { object: { id: 'cus_1' } } });
    const res = await postWebhook(e.payload, e.header);
    expect(res.body).toMatchObject({ duplicate: false, outcome: 'ignored' });
  });
});

describe('the provider fake', () => {
  it('refuses an API call without the right key, as the provider does', async () => {
    const res = await fetch(`${fake.url}/v1/checkout/sessions/cs_x`, { headers: { authorization: 'Bearer sk_test_wrong' } });
    expect(res.status).toBe(401);
    expect((await res.json()).error.type).toBe('invalid_request_error');
  });

  it('answers the SDK’s calls for unknown sessions with its error shape', async () => {
    const sdk = new Stripe('sk_test_cellarwright_local', { host: '127.0.0.1', port: fake.port, protocol: 'http', maxNetworkRetries: 0, telemetry: false });
    await expect(sdk.checkout.sessions.retrieve('cs_test_nope')).rejects.toMatchObject({ statusCode: 404, type: 'StripeInvalidRequestError' });
  });
});
