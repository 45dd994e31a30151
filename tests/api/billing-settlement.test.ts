// Payments, credit notes, voids, the price list and the treasurer's overview, after October's and November's runs. The co-op, its members, fermenters, kegs and price list as of 1 December 2026 are
// tests/helpers/billing-file.ts's (its header tells the hand-worked figures).
import { sql } from 'kysely';
import { describe, expect, it } from 'vitest';
import type { InvoiceDetail, InvoiceSummary } from '../../shared/schemas/billing.ts';
import { ctx, treasurer, useBillingFile } from '../helpers/billing-file.ts';

const { ids, invoiceOf } = useBillingFile({ billed: true });

describe('payments, credit notes and voids', () => {
  it('takes a part payment, refuses an overpayment, and is paid by the rest', async () => {
    const inv = await invoiceOf(ids.b, '2026-11');
    const part = await treasurer.post(`/api/invoices/${inv.id}/payments`, {
      amountCents: 2000,
      method: 'bank_transfer',
      receivedOn: '2026-12-01',
      reference: 'Transfer 4411',
    });
    expect(part.status).toBe(201);
    expect(part.body.invoice).toMatchObject({ status: 'issued', paidCents: 2000, amountDueCents: 4182 });
    const over = await treasurer.post(`/api/invoices/${inv.id}/payments`, { amountCents: 5000, method: 'cash', receivedOn: '2026-12-01' });
    expect(over.status).toBe(422);
    const rest = await treasurer.post(`/api/invoices/${inv.id}/payments`, { amountCents: 4182, method: 'cash', receivedOn: '2026-12-01' });
    expect(rest.status).toBe(201);
    expect(rest.body.invoice).toMatchObject({ status: 'paid', amountDueCents: 0 });
    expect(rest.body.invoice.paidAt).toBeTruthy();
    const again = await treasurer.post(`/api/invoices/${inv.id}/payments`, { amountCents: 1, method: 'cash', receivedOn: '2026-12-01' });
    expect(again.status).toBe(409);
  });

  it('refunds part of a paid invoice with a credit note: 10.00 including 7.5 % tax is 9.30 + 0.70', async () => {
    const inv = await invoiceOf(ids.b, '2026-11');
    const res = await treasurer.post(`/api/invoices/${inv.id}/refunds`, {
      amountCents: 1000,
      reason: 'One day of F-91 waived: the lid seal leaked',
      refundMethod: 'bank_transfer',
    });
    expect(res.status).toBe(201);
    const after = res.body.invoice as InvoiceDetail;
    const note = after.creditNotes[0]!;
    // 10.00 / 1.075 = 9.302… → 9.30 net, 0.70 tax.
    expect(note).toMatchObject({ kind: 'refund', subtotalCents: 930, taxCents: 70, totalCents: 1000 });
    expect(note.number).toMatch(/^CN-2026-\d{4}$/);
    // Money went back, so the invoice is still settled: 61.82 paid − 10.00 refunded = 51.82; 10.00 credited.
    expect(after).toMatchObject({ status: 'paid', paidCents: 5182, creditedCents: 1000, amountDueCents: 0 });
    expect(after.payments.at(-1)).toMatchObject({ amountCents: -1000, method: 'bank_transfer', creditNoteId: note.id });
  });

  it('voids an invoice by replacing it with a credit note for all of it; the invoice stays', async () => {
    const inv = await invoiceOf(ids.d, '2026-11');
    expect(inv.status).toBe('issued');
    const res = await treasurer.post(`/api/invoices/${inv.id}/void`, { reason: 'Keg check-outs recorded against the wrong member' });
    expect(res.status).toBe(200);
    const after = res.body.invoice as InvoiceDetail;
    expect(after).toMatchObject({ status: 'void', number: inv.number, totalCents: inv.totalCents, creditedCents: inv.totalCents, amountDueCents: 0 });
    const note = after.creditNotes.find((n) => n.kind === 'void')!;
    expect(note.totalCents).toBe(inv.totalCents);
    expect(note.lines.map((l) => l.amountCents)).toEqual(inv.lines.map((l) => l.amountCents));
    expect(note.lines.map((l) => l.taxCents)).toEqual(inv.lines.map((l) => l.taxCents));
    // Credit notes are numbered in their own gapless series.
    const seqs = await ctx.db.selectFrom('credit_note').select('number_seq').where('number_year', '=', 2026).orderBy('number_seq').execute();
    expect(seqs.map((s) => s.number_seq)).toEqual(seqs.map((_, i) => i + 1));
    // Never deleted: still listed, still readable.
    const listed = await treasurer.get(`/api/invoices?status=void&memberId=${ids.d}`);
    expect(listed.body.items.map((i: InvoiceSummary) => i.id)).toContain(inv.id);
    expect((await treasurer.post(`/api/invoices/${inv.id}/void`, { reason: 'again' })).status).toBe(409);
    expect((await treasurer.post(`/api/invoices/${inv.id}/payments`, { amountCents: 100, method: 'cash', receivedOn: '2026-12-01' })).status).toBe(409);
  });

  it('keeps each member’s balance over every invoice issued to them', async () => {
    // B settled November (refund included), so only October's dues are owed: 15.00 + 8 % = 16.20.
    const b = await treasurer.get(`/api/billing/balance?memberId=${ids.b}`);
    expect(b.body).toMatchObject({ balanceCents: 1620, openInvoices: 1 });
    const a = await treasurer.get(`/api/billing/balance?memberId=${ids.a}`);
    const open = await ctx.db
      .selectFrom('invoice')
      .select(sql<number>`sum(total_cents - paid_cents - credited_cents)::int`.as('due'))
      .where('member_id', '=', ids.a)
      .executeTakeFirstOrThrow();
    expect(a.body.balanceCents).toBe(open.due);
    expect(a.body.openInvoices).toBe(2);
  });
});

describe('price list', () => {
  it('refuses a back-dated price and accepts one from a later date, which can be withdrawn before it starts', async () => {
    const back = await treasurer.post('/api/prices', { item: 'keg_week', unitCents: 250, effectiveFrom: '2026-11-15' });
    expect(back.status).toBe(422);
    expect(back.body.errors[0]).toMatchObject({ path: 'effectiveFrom' });
    const later = await treasurer.post('/api/prices', { item: 'keg_week', unitCents: 250, effectiveFrom: '2031-02-01', note: 'Agreed for 2031' });
    expect(later.status).toBe(201);
    expect(later.body.price).toMatchObject({ item: 'keg_week', unitCents: 250, current: false });
    const listed = await treasurer.get('/api/prices');
    const kegWeeks = listed.body.items.filter((p: { item: string }) => p.item === 'keg_week');
    expect(kegWeeks.find((p: { current: boolean }) => p.current).unitCents).toBe(200);
    expect((await treasurer.delete(`/api/prices/${later.body.price.id}`)).status).toBe(204);
    const current = kegWeeks.find((p: { current: boolean }) => p.current);
    expect((await treasurer.delete(`/api/prices/${current.id}`)).status).toBe(409);
  });

  it('needs a capacity band for fermenter-days only, and allows a zero tax rate', async () => {
    const noBand = await treasurer.post('/api/prices', { item: 'fermenter_day', unitCents: 300, effectiveFrom: '2031-01-01' });
    expect(noBand.status).toBe(422);
    expect(noBand.body.errors[0].path).toBe('bandMaxLiters');
    const zero = await treasurer.post('/api/tax-rates', { rateBp: 0, label: 'No tax', effectiveFrom: '2031-01-01' });
    expect(zero.status).toBe(201);
    expect(zero.body.taxRate).toMatchObject({ rateBp: 0, current: false });
  });

  it('takes a manual charge only for a period not yet issued to the member', async () => {
    const closed = await treasurer.post('/api/manual-charges', { memberId: ids.a, period: '2026-11', description: 'Late fee', reason: 'x', amountCents: 500 });
    expect(closed.status).toBe(409);
    const credit = await treasurer.post('/api/manual-charges', {
      memberId: ids.a,
      period: '2026-12',
      description: 'Goodwill credit',
      reason: 'Booking moved by the co-op',
      amountCents: -500,
    });
    expect(credit.status).toBe(201);
    expect(credit.body.charge).toMatchObject({ amountCents: -500, invoiceId: null });
    const noReason = await treasurer.post('/api/manual-charges', { memberId: ids.a, period: '2026-12', description: 'x', reason: '', amountCents: 100 });
    expect(noReason.status).toBe(422);
  });
});

describe('treasurer’s overview', () => {
  it('ages open amounts by invoice date: those issued 1 Oct are 61–90 days old on 1 Dec, 1 Nov and 1 Dec 0–30', async () => {
    const res = await treasurer.get('/api/billing/ageing?asOf=2026-12-01');
    expect(res.status).toBe(200);
    const open = await ctx.db
      .selectFrom('invoice')
      .select(['issued_on', sql<number>`sum(total_cents - paid_cents - credited_cents)::int`.as('due')])
      .where('status', '=', 'issued')
      .where(sql<boolean>`total_cents - paid_cents - credited_cents > 0`)
      .groupBy('issued_on')
      .execute();
    const due = (day: string) => open.find((o) => o.issued_on === day)?.due ?? 0;
    expect(open.map((o) => o.issued_on).sort()).toEqual(['2026-10-01', '2026-11-01', '2026-12-01']);
    // 1 Oct → 61 days, 1 Nov → 30 days, 1 Dec → 0 days.
    expect(res.body.totals).toEqual({ '0-30': due('2026-11-01') + due('2026-12-01'), '31-60': 0, '61-90': due('2026-10-01'), '90+': 0 });
    expect(res.body.totalCents).toBe(open.reduce((s, o) => s + o.due, 0));
    // Ines (member3@) has left September (16.20, issued 1 Oct) and October open; Maren paid September.
    const ines = res.body.rows.find((r: { memberName: string }) => r.memberName === 'Ines Farrow');
    expect(ines.buckets['61-90']).toBe(1620);
    const maren = res.body.rows.find((r: { memberName: string }) => r.memberName === 'Maren Holloway');
    expect(maren.buckets['61-90']).toBe(0);
    const later = await treasurer.get('/api/billing/ageing?asOf=2027-01-15');
    expect(later.body.totals).toEqual({ '0-30': 0, '31-60': due('2026-12-01'), '61-90': due('2026-11-01'), '90+': due('2026-10-01') });
  });

  it('summarises what is unpaid and overdue, and the last run', async () => {
    const res = await treasurer.get('/api/billing/summary');
    expect(res.status).toBe(200);
    expect(res.body.unpaid.count).toBeGreaterThan(0);
    expect(res.body.overdue.count).toBeGreaterThan(0);
    expect(res.body.lastRun.period).toBe('2026-11');
    expect(res.body.currency).toBe('EUR');
  });
});
