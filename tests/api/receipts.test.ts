import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import request from 'supertest';
import Stripe from 'stripe';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startPaymentsFake, type PaymentsFake } from '../../backend/fakes/payments-fake.ts';
import { createInvoice, createMember } from '../../db/factories/index.ts';
import { createTestContext, type ApiClient, type TestContext } from '../helpers/context.ts';

// A payment booked by hand or online sends the member one receipt, queued in the transaction that
// books it: replayed, reordered and concurrent provider events and the member's return send no more.

let ctx: TestContext;
let fake: PaymentsFake;
let server: Server;
let treasurer: ApiClient;
const secret = 'whsec_cellarwright_local';
const DUE = 1620; // November's dues, 15.00 + 8 % tax

async function payer(name: string) {
  const m = await createMember(ctx.db, { name });
  const inv = await createInvoice(ctx.db, { memberId: m.id, period: '2026-11', today: '2026-12-01' });
  expect(inv.total_cents).toBe(DUE);
  return { email: m.email, member: await ctx.signIn(m.email), invoiceId: inv.id, number: inv.number! };
}

/** Receipts queued for an address (sent or not yet): what the member will get. */
async function receiptsTo(email: string): Promise<{ subject: string; text: string }[]> {
  const r = await ctx.deps.pool.query(
    `select data from pgboss.job where name = 'email.send' and data->>'to' = $1 and data->>'subject' like 'Receipt:%' order by created_on`,
    [email],
  );
  return r.rows.map((row) => row.data);
}

function paidAtProvider(sessionId: string, eventId: string, type = 'checkout.session.completed') {
  const s = fake.sessions.get(sessionId)!;
  Object.assign(s, { status: 'complete', payment_status: 'paid', url: null, payment_intent: s.payment_intent ?? `pi_test_${sessionId.slice(-8)}` });
  const { line_items_summary: _items, ...object } = s;
  return { id: eventId, object: 'event', type, created: Math.floor(ctx.clock.now().getTime() / 1000), data: { object: { ...object } } };
}

function postEvent(event: object) {
  const payload = JSON.stringify(event);
  const header = Stripe.webhooks.generateTestHeaderString({ payload, secret });
  return request(ctx.app).post('/api/webhooks/payments').set('Content-Type', 'application/json').set('Stripe-Signature', header).send(payload);
}

beforeAll(async () => {
  fake = await startPaymentsFake({ webhookRetries: 0 });
  ctx = await createTestContext({ PAYMENTS_FAKE_PORT: String(fake.port) });
  server = ctx.app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', () => resolve()));
  const appUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  ctx.config.publicUrl = appUrl;
  // Events are posted by the tests themselves, so each replay is deliberate.
  fake.webhookUrl = 'http://127.0.0.1:9/api/webhooks/payments';
  treasurer = await ctx.signIn('treasurer@example.org');
});
afterAll(async () => {
  if (server) await new Promise<void>((resolve) => server.close(() => resolve()));
  await fake?.close();
  await ctx?.close();
});

describe('payment receipts', () => {
  it('e-mails a receipt for a payment recorded by the treasurer: amount, date, invoice, balance left, method', async () => {
    const p = await payer('Rita Receipt');
    const res = await treasurer.post(`/api/invoices/${p.invoiceId}/payments`, {
      amountCents: 620,
      method: 'bank_transfer',
      receivedOn: '2026-12-02',
      reference: 'Transfer 77',
    });
    expect(res.status).toBe(201);
    const mail = await ctx.waitForMail(p.email, /^Receipt:/);
    expect(mail.subject).toContain(p.number);
    expect(mail.text_body).toMatch(/amount\s+€6\.20/);
    expect(mail.text_body).toMatch(/received\s+2 Dec 2026/);
    expect(mail.text_body).toMatch(/method\s+Bank transfer \(Transfer 77\)/);
    expect(mail.text_body).toMatch(/still due\s+€10\.00/);
    expect(mail.text_body).toContain(p.number);
    // The rest, in cash: a second payment, a second receipt, nothing left to pay.
    await treasurer.post(`/api/invoices/${p.invoiceId}/payments`, { amountCents: 1000, method: 'cash', receivedOn: '2026-12-02' });
    const receipts = await receiptsTo(p.email);
    expect(receipts).toHaveLength(2);
    expect(receipts[1]!.text).toMatch(/still due\s+€0\.00 — the invoice is paid in full/);
    expect(receipts[1]!.text).toMatch(/method\s+Cash/);
  });

  it('sends nothing for a refused payment', async () => {
    const p = await payer('Nora Nothing');
    const res = await treasurer.post(`/api/invoices/${p.invoiceId}/payments`, { amountCents: DUE + 1, method: 'cash', receivedOn: '2026-12-02' });
    expect(res.status).toBe(422);
    expect(await receiptsTo(p.email)).toHaveLength(0);
  });

  it('sends one receipt for an online payment whose webhook is replayed, repeated under another id and raced with the return page', async () => {
    const p = await payer('Olga Online');
    const { body } = await p.member.post(`/api/invoices/${p.invoiceId}/checkout`);
    const event = paidAtProvider(body.sessionId, 'evt_test_receipt_once');
    const notice = paidAtProvider(body.sessionId, 'evt_test_receipt_async', 'checkout.session.async_payment_succeeded');
    const results = await Promise.all([
      ...Array.from({ length: 6 }, () => postEvent(event)),
      postEvent(notice),
      p.member.post(`/api/invoices/${p.invoiceId}/checkout/confirm`, { sessionId: body.sessionId }),
      p.member.post(`/api/invoices/${p.invoiceId}/checkout/confirm`, { sessionId: body.sessionId }),
    ]);
    expect(results.map((r) => r.status)).toEqual(Array(9).fill(200));
    // Replayed later, one by one, too.
    expect((await postEvent(event)).body).toMatchObject({ duplicate: true });
    expect((await postEvent(paidAtProvider(body.sessionId, 'evt_test_receipt_late'))).body).toMatchObject({ outcome: 'already_recorded' });
    const receipts = await receiptsTo(p.email);
    expect(receipts).toHaveLength(1);
    expect(receipts[0]!.text).toMatch(/method\s+Online/);
    expect(receipts[0]!.text).toMatch(/amount\s+€16\.20/);
    const mail = await ctx.waitForMail(p.email, /^Receipt:/);
    expect(mail.text_body).toMatch(/paid in full/);
    const payments = await ctx.db.selectFrom('payment').select('id').where('invoice_id', '=', p.invoiceId).execute();
    expect(payments).toHaveLength(1);
  });

  it('sends no receipt for money paid back', async () => {
    const p = await payer('Rob Refund');
    await treasurer.post(`/api/invoices/${p.invoiceId}/payments`, { amountCents: DUE, method: 'bank_transfer', receivedOn: '2026-12-02' });
    const refund = await treasurer.post(`/api/invoices/${p.invoiceId}/refunds`, { amountCents: 500, reason: 'Goodwill', refundMethod: 'bank_transfer' });
    expect(refund.status).toBe(201);
    expect(await receiptsTo(p.email)).toHaveLength(1);
  });
});
