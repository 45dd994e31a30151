import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { longDate } from '../../shared/billing/dates.ts';
import type { InvoiceDetail } from '../../shared/schemas/billing.ts';
import { createInvoice, createInvoicePayment, createMember, type InvoiceWithLines } from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { createTestContext, type ApiClient, type TestContext } from '../helpers/context.ts';
import { binary } from '../helpers/http.ts';
import { pdfText } from '../helpers/pdf.ts';
import { FAR_AHEAD, laterBy, withClockAt } from '../helpers/time.ts';

// A credit note on a part-paid invoice records a credit only, unless the treasurer says the money was paid
// back and how: then, and only then, a refund is recorded and the credit note's PDF says so.

let ctx: TestContext;
let treasurer: ApiClient;

beforeAll(async () => {
  ctx = await createTestContext();
  treasurer = await ctx.signIn('treasurer@example.org');
});
afterAll(async () => {
  await ctx?.close();
});

/** A member of its own, billed November's dues on 1 December and part-paid 10.00 by bank transfer. */
async function partPaidInvoice(email: string): Promise<InvoiceWithLines> {
  const member = await createMember(ctx.db, { email, createdAt: '2026-10-01T09:00:00Z' });
  const invoice = await createInvoice(ctx.db, { memberId: member.id, period: '2026-11', today: '2026-12-01', actorId: fixtureUserId('treasurer') });
  await createInvoicePayment(ctx.db, { invoiceId: invoice.id, amountCents: 1000, receivedOn: '2026-12-01', actorId: fixtureUserId('treasurer') });
  return invoice;
}

async function detail(id: string): Promise<InvoiceDetail> {
  const res = await treasurer.get(`/api/invoices/${id}`);
  expect(res.status).toBe(200);
  return res.body.invoice;
}

async function creditNoteText(creditNoteId: string): Promise<string> {
  const res = await treasurer.get(`/api/credit-notes/${creditNoteId}/pdf`).buffer(true).parse(binary);
  expect(res.status).toBe(200);
  return pdfText(res.body as Buffer, { flat: true });
}

describe('a credit note on a part-paid invoice', () => {
  it('records a credit only when no refund method is given: nothing paid back, and the PDF says so', async () => {
    const invoice = await partPaidInvoice('credit-only.test@example.org');
    const before = await detail(invoice.id);
    expect(before).toMatchObject({ status: 'issued', paidCents: 1000 });
    expect(before.amountDueCents).toBeGreaterThan(500);

    const res = await treasurer.post(`/api/invoices/${invoice.id}/refunds`, { amountCents: 500, reason: 'Dues waived for a week away' });
    expect(res.status).toBe(201);
    const after = await detail(invoice.id);
    const note = after.creditNotes.find((n) => n.kind === 'refund')!;
    expect(note.totalCents).toBe(500);
    // The credit lowers what is owed; the 10.00 received stays received and no payment goes out.
    expect(after).toMatchObject({ paidCents: 1000, creditedCents: 500, amountDueCents: before.amountDueCents - 500 });
    expect(after.payments.map((p) => p.amountCents)).toEqual([1000]);
    const outgoing = await ctx.db.selectFrom('payment').select('id').where('invoice_id', '=', invoice.id).where('amount_cents', '<', 0).execute();
    expect(outgoing).toEqual([]);

    const text = await creditNoteText(note.id);
    expect(text).toContain(note.number);
    expect(text).toMatch(/Credit note/);
    expect(text).toContain(`The credit reduces what is owed on invoice ${invoice.number}`);
    expect(text).not.toMatch(/paid back|refund/i);
  });

  it('records a refund when the treasurer says it was paid back, and how: the PDF names the way and the day', async () => {
    const invoice = await partPaidInvoice('paid-back.test@example.org');
    const res = await treasurer.post(`/api/invoices/${invoice.id}/refunds`, { amountCents: 400, reason: 'Dues waived for a week away', refundMethod: 'cash' });
    expect(res.status).toBe(201);
    const after = await detail(invoice.id);
    const note = after.creditNotes.find((n) => n.kind === 'refund')!;
    const payback = after.payments.find((p) => p.creditNoteId === note.id)!;
    expect(payback).toMatchObject({ amountCents: -400, method: 'cash' });
    expect(after).toMatchObject({ paidCents: 600, creditedCents: 400 });

    const text = await creditNoteText(note.id);
    expect(text).toContain('Credit and refund');
    expect(text).toContain(`€4.00 was paid back in cash on ${longDate(payback.receivedOn)}.`);
  });

  it('refuses to pay back more than was paid, and then records nothing', async () => {
    const invoice = await partPaidInvoice('too-much.test@example.org');
    const res = await treasurer.post(`/api/invoices/${invoice.id}/refunds`, { amountCents: 1200, reason: 'Dues waived', refundMethod: 'bank_transfer' });
    expect(res.status).toBe(422);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    const after = await detail(invoice.id);
    expect(after).toMatchObject({ paidCents: 1000, creditedCents: 0, creditNotes: [] });
  });
});

describe('invoice stamps follow the clock', () => {
  const invoiceStamps = (id: string) =>
    ctx.db.selectFrom('invoice').select(['updated_at', 'paid_at', 'voided_at']).where('id', '=', id).executeTakeFirstOrThrow();

  it('a payment that settles an invoice, and its void, carry the clock’s time, whatever the real date', async () => {
    const invoice = await partPaidInvoice('stamped.test@example.org');
    await withClockAt(ctx.clock, FAR_AHEAD, async () => {
      const due = (await detail(invoice.id)).amountDueCents;
      const paid = await treasurer.post(`/api/invoices/${invoice.id}/payments`, { amountCents: due, method: 'cash', receivedOn: FAR_AHEAD.slice(0, 10) });
      expect(paid.status).toBe(201);
      expect(paid.body.invoice).toMatchObject({ status: 'paid', paidAt: FAR_AHEAD });
      expect(await invoiceStamps(invoice.id)).toEqual({ updated_at: new Date(FAR_AHEAD), paid_at: new Date(FAR_AHEAD), voided_at: null });

      const later = laterBy(FAR_AHEAD, 3600_000);
      ctx.clock.freeze(later);
      const voided = await treasurer.post(`/api/invoices/${invoice.id}/void`, { reason: 'Billed to the wrong member', refundMethod: 'bank_transfer' });
      expect(voided.status).toBe(200);
      expect(await detail(invoice.id)).toMatchObject({ status: 'void', voidedAt: later, paidAt: FAR_AHEAD });
      expect(await invoiceStamps(invoice.id)).toEqual({ updated_at: new Date(later), paid_at: new Date(FAR_AHEAD), voided_at: new Date(later) });
    });
  });
});
