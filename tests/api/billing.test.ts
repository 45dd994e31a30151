import ExcelJS from 'exceljs';
import { sql } from 'kysely';
import { describe, expect, it } from 'vitest';
import { addDays, longDate } from '../../shared/billing/dates.ts';
import type { InvoiceDetail, InvoiceSummary } from '../../shared/schemas/billing.ts';
import {
  createBooking,
  createFermenter,
  createInvoice,
  createKeg,
  createKegCheckout,
  createMember,
  createPrice,
  createTaxRate,
} from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { type ApiClient, type TestContext, useTestContext } from '../helpers/context.ts';
import { binary } from '../helpers/http.ts';
import { pdfText } from '../helpers/pdf.ts';

// Hand-worked examples. The co-op is the test fixture (six members on the rota of dues since August,
// 8 % tax) as of 1 December 2026, with September and October already billed to its own members on
// 1 Oct and 1 Nov: two of September's paid (one of them partly refunded), one voided, the rest open.
// This file adds four members of its own, a 60 L and a 120 L fermenter and two kegs, and two
// price-list changes that took effect in November: tax 7.5 % from 1 Nov, and 120 L fermenter-days
// from 4.00 to 4.50 from 15 Nov. Dues are 15.00 a month, 60 L days 2.75 (since 15 Oct), keg-weeks
// 2.00, late returns 1.00 a day.

/** The file's clock: 1 December 2026, the day the November run is made. */
const FILE_NOW = '2026-12-01T10:00:00Z';

let ctx: TestContext;
let treasurer: ApiClient;
const ids = { a: '', b: '', c: '', d: '' };
const equipment = { f60: '', f120: '', keg: '', keg2: '' };
/** The fixture's members (member@ … member6@), billed for September and October before this file's runs. */
const fixtureMembers = ['member', 'member2', 'member3', 'member4', 'member5', 'member6'].map(fixtureUserId);

const member = async (name: string, email: string) => (await createMember(ctx.db, { name, email, createdAt: '2026-08-01T09:00:00Z' })).id;

async function booking(equipmentId: string, ownerId: string, startsAt: string, endsAt: string) {
  await createBooking(ctx.db, { equipmentId, ownerId, startsAt, endsAt, now: FILE_NOW });
}

async function invoiceOf(memberId: string, period: string): Promise<InvoiceDetail> {
  const row = await ctx.db.selectFrom('invoice').select('id').where('member_id', '=', memberId).where('period', '=', period).executeTakeFirstOrThrow();
  const res = await treasurer.get(`/api/invoices/${row.id}`);
  expect(res.status).toBe(200);
  return res.body.invoice;
}

useTestContext(
  async (created) => {
    ctx = created;
    treasurer = await ctx.signIn('treasurer@example.org');
    const brewer = await ctx.signIn('brewer@example.org');

    // September and October for the fixture's members, each issued on the 1st of the next month
    // (dues only: 15.00 + 8 % = 16.20 each).
    const september: Record<string, string> = {};
    for (const memberId of fixtureMembers) {
      september[memberId] = (await createInvoice(ctx.db, { memberId, period: '2026-09', today: '2026-10-01' })).id;
    }
    for (const memberId of fixtureMembers) await createInvoice(ctx.db, { memberId, period: '2026-10', today: '2026-11-01' });
    // Maren (member@) and Tobias (member2@) paid September; Maren was refunded 5.00 of it; Bram's (member6@) was voided.
    for (const key of ['member', 'member2']) {
      const paid = await treasurer.post(`/api/invoices/${september[fixtureUserId(key)]}/payments`, {
        amountCents: 1620,
        method: 'bank_transfer',
        receivedOn: '2026-10-12',
      });
      expect(paid.status).toBe(201);
    }
    const refund = await treasurer.post(`/api/invoices/${september[fixtureUserId('member')]}/refunds`, {
      amountCents: 500,
      reason: 'Dues waived for a week away',
      refundMethod: 'bank_transfer',
    });
    expect(refund.status).toBe(201);
    const voided = await treasurer.post(`/api/invoices/${september[fixtureUserId('member6')]}/void`, { reason: 'Joined in October, not August' });
    expect(voided.status).toBe(200);

    ids.a = await member('Test Member Alder', 'alder.test@example.org');
    ids.b = await member('Test Member Birch', 'birch.test@example.org');
    ids.c = await member('Test Member Cedar', 'cedar.test@example.org');
    ids.d = await member('Test Member Damson', 'damson.test@example.org');
    equipment.f60 = (await createFermenter(ctx.db, { code: 'F-90', name: 'Test fermenter F-90', capacityLiters: 60, state: 'ready' })).id;
    equipment.f120 = (await createFermenter(ctx.db, { code: 'F-91', name: 'Test fermenter F-91', capacityLiters: 120, state: 'ready' })).id;
    equipment.keg = (await createKeg(ctx.db, { code: 'K-900', name: 'Test keg K-900', state: 'ready' })).id;
    equipment.keg2 = (await createKeg(ctx.db, { code: 'K-901', name: 'Test keg K-901', state: 'ready' })).id;

    // The price list as it stood: both changes were entered before they took effect.
    await createTaxRate(ctx.db, { rateBp: 750, label: 'VAT', effectiveFrom: '2026-11-01' });
    await createPrice(ctx.db, { item: 'fermenter_day', bandMaxLiters: 120, unitCents: 450, effectiveFrom: '2026-11-15' });

    // A: a 60 L fermenter from 28 Oct to 5 Nov, across the month boundary.
    await booking(equipment.f60, ids.a, '2026-10-28T10:00:00Z', '2026-11-05T10:00:00Z');
    // B: a 120 L fermenter from 10 to 20 Nov, across the price change on the 15th.
    await booking(equipment.f120, ids.b, '2026-11-10T09:00:00Z', '2026-11-20T09:00:00Z');
    // D: a keg out 3 Nov, due 17 Nov, back 20 Nov (three days late); another out 25 Nov, due 28 Nov, still out.
    await createKegCheckout(ctx.db, { kegId: equipment.keg, memberId: ids.d, at: '2026-11-03T10:00:00Z', dueAt: '2026-11-17T18:00:00Z' });
    ctx.clock.set('2026-11-20T15:00:00Z'); // the brewer on duty takes it back that afternoon
    const back = await brewer.post(`/api/kegs/${equipment.keg}/return`, {});
    ctx.clock.set(FILE_NOW);
    expect(back.status).toBe(200);
    await createKegCheckout(ctx.db, { kegId: equipment.keg2, memberId: ids.d, at: '2026-11-25T10:00:00Z', dueAt: '2026-11-28T18:00:00Z' });
  },
  {},
  { now: FILE_NOW },
);

describe('invoice runs', () => {
  it('runs October for the members it has not billed yet, and a second run bills nobody twice', async () => {
    const first = await treasurer.post('/api/invoice-runs', { period: '2026-10' });
    expect(first.status).toBe(201);
    const made = (first.body.invoices as InvoiceSummary[]).map((i) => i.memberId).sort();
    // The fixture's members were billed for October on 1 Nov; only this file's new members are left.
    expect(made).toEqual([ids.a, ids.b, ids.c, ids.d].sort());
    expect(first.body.invoices.every((i: InvoiceSummary) => i.status === 'issued' && /^INV-2026-\d{4}$/.test(i.number!))).toBe(true);
    const again = await treasurer.post('/api/invoice-runs', { period: '2026-10' });
    expect(again.status).toBe(201);
    expect(again.body.invoices).toEqual([]);
    expect(again.body.run.invoiceCount).toBe(0);
  });

  it('makes one invoice per member when two runs of November start at once', async () => {
    const [r1, r2] = await Promise.all([
      treasurer.post('/api/invoice-runs', { period: '2026-11' }),
      treasurer.post('/api/invoice-runs', { period: '2026-11' }),
    ]);
    expect([r1.status, r2.status]).toEqual([201, 201]);
    const made = [...r1.body.invoices, ...r2.body.invoices] as InvoiceSummary[];
    // Every member: the fixture's six and this file's four (dues at least), none left out.
    expect(made.map((i) => i.memberId).sort()).toEqual([...fixtureMembers, ids.a, ids.b, ids.c, ids.d].sort());
    // Every invoice came from one of the two runs, never both.
    expect(new Set(made.map((i) => i.memberId)).size).toBe(made.length);
    const perMember = await ctx.db
      .selectFrom('invoice')
      .select(['member_id', (eb) => eb.fn.countAll<number>().as('n')])
      .where('period', '=', '2026-11')
      .groupBy('member_id')
      .execute();
    expect(perMember.length).toBe(made.length);
    expect(perMember.every((r) => r.n === 1)).toBe(true);
  });

  it('is guaranteed by the database: a second invoice for a member and period is refused', async () => {
    await expect(ctx.db.insertInto('invoice').values({ member_id: ids.a, period: '2026-11', currency: 'EUR' }).execute()).rejects.toMatchObject({
      code: '23505',
      constraint: 'invoice_member_id_period_key',
    });
  });

  it('numbers invoices 1, 2, 3 … in the year with no gaps', async () => {
    const rows = await ctx.db.selectFrom('invoice').select(['number_seq', 'number']).where('number_year', '=', 2026).orderBy('number_seq').execute();
    expect(rows.map((r) => r.number_seq)).toEqual(rows.map((_, i) => i + 1));
    expect(rows[0]!.number).toBe('INV-2026-0001');
  });

  it('refuses a period that has not ended, and a malformed one', async () => {
    const december = await treasurer.post('/api/invoice-runs', { period: '2026-12' });
    expect(december.status).toBe(409);
    expect(december.body.detail).toMatch(/has not ended/);
    const bad = await treasurer.post('/api/invoice-runs', { period: 'November' });
    expect(bad.status).toBe(422);
    expect(bad.body.errors[0].path).toBe('period');
  });

  it('previews a period without writing anything', async () => {
    const before = await ctx.db
      .selectFrom('invoice')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .executeTakeFirstOrThrow();
    const res = await treasurer.get('/api/invoice-runs/preview?period=2026-11');
    expect(res.status).toBe(200);
    expect(res.body.invoices.every((i: { alreadyInvoiced: boolean }) => i.alreadyInvoiced)).toBe(true);
    const after = await ctx.db
      .selectFrom('invoice')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .executeTakeFirstOrThrow();
    expect(after.n).toBe(before.n);
  });
});

describe('charges worked by hand', () => {
  it('splits a booking across a month boundary: 4 days in October, 4 in November', async () => {
    // 28 Oct → 5 Nov is 8 days: nights of 28–31 Oct on October's invoice, 1–4 Nov on November's.
    const october = await invoiceOf(ids.a, '2026-10');
    const octLine = october.lines.find((l) => l.item === 'fermenter_day')!;
    expect(octLine).toMatchObject({
      sourceType: 'booking',
      sourceLabel: 'F-90, 28 Oct–1 Nov, 4 days (booking 28 Oct–5 Nov, split at month end)',
      quantity: 4,
      unitPriceCents: 275,
      amountCents: 1100, // 4 × 2.75
      taxRateBp: 800,
      taxCents: 88, // 8 % of 11.00
      serviceFrom: '2026-10-28',
      serviceTo: '2026-10-31',
    });
    const november = await invoiceOf(ids.a, '2026-11');
    const novLine = november.lines.find((l) => l.item === 'fermenter_day')!;
    expect(novLine).toMatchObject({
      sourceId: octLine.sourceId, // the same booking
      sourceLabel: 'F-90, 1–5 Nov, 4 days (booking 28 Oct–5 Nov, split at month end)',
      quantity: 4,
      amountCents: 1100,
      taxRateBp: 750,
      taxCents: 83, // 7.5 % of 11.00 = 82.5 → 83, half-up
    });
    // November: dues 15.00 + tax 1.125 → 1.13; days 11.00 + 0.83.
    expect(november).toMatchObject({ subtotalCents: 2600, taxCents: 113 + 83, totalCents: 2796 });
  });

  it('splits days at a mid-month price change: 5 days at 4.00, 5 days at 4.50', async () => {
    const inv = await invoiceOf(ids.b, '2026-11');
    const days = inv.lines.filter((l) => l.item === 'fermenter_day');
    expect(days.map((l) => [l.sourceLabel, l.quantity, l.unitPriceCents, l.amountCents, l.taxCents])).toEqual([
      ['F-91, 10–15 Nov, 5 days', 5, 400, 2000, 150], // 7.5 % of 20.00
      ['F-91, 15–20 Nov, 5 days', 5, 450, 2250, 169], // 7.5 % of 22.50 = 168.75 → 169
    ]);
    // Dues 15.00 (tax 1.13) + 20.00 + 22.50 = 57.50 net; tax 1.13 + 1.50 + 1.69 = 4.32.
    expect(inv).toMatchObject({ subtotalCents: 5750, taxCents: 432, totalCents: 6182 });
  });

  it('charges a late keg return by the day and keg-weeks by the week begun', async () => {
    const inv = await invoiceOf(ids.d, '2026-11');
    const pick = (item: string) => inv.lines.filter((l) => l.item === item).map((l) => [l.sourceLabel, l.quantity, l.amountCents]);
    // K-900: out 3 Nov, back 20 Nov: weeks begun 3, 10, 17 Nov = 3 × 2.00. Due 17 Nov: late 17, 18, 19 Nov = 3 × 1.00.
    // K-901: out 25 Nov, still out: one week begun in November; due 28 Nov: late 28, 29, 30 Nov = 3 × 1.00 (December's days on December's invoice).
    expect(pick('keg_week')).toEqual([
      ['K-900, out 3–20 Nov, 3 weeks from 3 Nov', 3, 600],
      ['K-901, out since 25 Nov, 1 week from 25 Nov', 1, 200],
    ]);
    expect(pick('late_keg_day')).toEqual([
      ['K-900, due 17 Nov, returned 20 Nov: 3 days late (17–19 Nov)', 3, 300],
      ['K-901, due 28 Nov, not yet returned: 3 days late (28–30 Nov)', 3, 300],
    ]);
    expect(inv.lines.every((l) => l.item === 'membership_month' || l.sourceType === 'keg_checkout')).toBe(true);
  });

  it('rounds tax per line, half-up: three 0.20 charges carry 0.02 tax each, 0.06 in all, not 0.05', async () => {
    // A draft August invoice for C (August was never billed); charges added to it go straight on.
    const draft = await ctx.db.insertInto('invoice').values({ member_id: ids.c, period: '2026-08', currency: 'EUR' }).returning('id').executeTakeFirstOrThrow();
    for (let i = 1; i <= 3; i++) {
      const res = await treasurer.post('/api/manual-charges', {
        memberId: ids.c,
        period: '2026-08',
        description: `Sample bottle ${i}`,
        reason: 'Bottles from the co-op shelf for a competition entry',
        amountCents: 20,
      });
      expect(res.status).toBe(201);
      expect(res.body.charge.invoiceId).toBe(draft.id);
    }
    const inv = (await treasurer.get(`/api/invoices/${draft.id}`)).body.invoice as InvoiceDetail;
    // 8 % of 0.20 is 1.6 cents → 2 on each line; 8 % of the 0.60 subtotal would have been 4.8 → 5.
    expect(inv.lines.map((l) => [l.sourceLabel, l.amountCents, l.taxRateBp, l.taxCents])).toEqual([
      ['Charge: Bottles from the co-op shelf for a competition entry', 20, 800, 2],
      ['Charge: Bottles from the co-op shelf for a competition entry', 20, 800, 2],
      ['Charge: Bottles from the co-op shelf for a competition entry', 20, 800, 2],
    ]);
    expect(inv).toMatchObject({ status: 'draft', number: null, subtotalCents: 60, taxCents: 6, totalCents: 66 });
    // And an exact half rounds up: A's November fermenter line above (82.5 → 83 cents).
  });

  it('never bills one piece of use twice, even through a forged second line', async () => {
    const line = await ctx.db.selectFrom('invoice_line').selectAll().where('source_type', '=', 'booking').limit(1).executeTakeFirstOrThrow();
    const other = await ctx.db.selectFrom('invoice').select('id').where('id', '<>', line.invoice_id).limit(1).executeTakeFirstOrThrow();
    const { id: _id, ...copy } = line;
    await expect(
      ctx.db
        .insertInto('invoice_line')
        .values({ ...copy, invoice_id: other.id })
        .execute(),
    ).rejects.toMatchObject({
      code: '23505',
      constraint: 'invoice_line_source_key',
    });
  });
});

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

describe('who sees what', () => {
  it('shows a member only their own invoices, never drafts, and others’ are 404, PDFs included', async () => {
    const member = await ctx.signIn('member@example.org');
    const list = await member.get('/api/invoices?pageSize=100');
    expect(list.status).toBe(200);
    expect(list.body.total).toBeGreaterThan(0);
    expect(list.body.items.every((i: InvoiceSummary) => i.memberId === member.user.id && i.status !== 'draft')).toBe(true);
    // Asking for someone else's by filter just finds nothing.
    const filtered = await member.get(`/api/invoices?memberId=${ids.a}`);
    expect(filtered.body.total).toBe(0);
    const others = await ctx.db.selectFrom('invoice').select('id').where('member_id', '<>', member.user.id).where('status', '<>', 'draft').limit(3).execute();
    for (const o of others) {
      expect((await member.get(`/api/invoices/${o.id}`)).status).toBe(404);
      expect((await member.get(`/api/invoices/${o.id}/pdf`)).status).toBe(404);
      expect((await member.post(`/api/invoices/${o.id}/checkout`)).status).toBe(404);
    }
    const draft = await ctx.db.selectFrom('invoice').select('id').where('status', '=', 'draft').executeTakeFirstOrThrow();
    expect((await member.get(`/api/invoices/${draft.id}`)).status).toBe(404);
    expect((await member.get('/api/invoices/not-a-uuid')).status).toBe(404);
    const mine = list.body.items[0] as InvoiceSummary;
    const pdf = await member.get(`/api/invoices/${mine.id}/pdf`).buffer(true).parse(binary);
    expect(pdf.status).toBe(200);
    expect(pdf.headers['content-type']).toBe('application/pdf');
    // The member may not run, export, record payments or read the ageing.
    expect((await member.post('/api/invoice-runs', { period: '2026-11' })).status).toBe(403);
    expect((await member.get('/api/invoices/export?period=2026-11&format=csv')).status).toBe(403);
    expect((await member.get('/api/billing/ageing')).status).toBe(403);
    expect((await member.post(`/api/invoices/${mine.id}/payments`, { amountCents: 1, method: 'cash', receivedOn: '2026-12-01' })).status).toBe(403);
    const balance = await member.get('/api/billing/balance');
    expect(balance.status).toBe(200);
    expect(typeof balance.body.balanceCents).toBe('number');
  });

  it('keeps every billing route from the brewer-on-duty with 403', async () => {
    const brewer = await ctx.signIn('brewer@example.org');
    const inv = await ctx.db.selectFrom('invoice').select('id').where('status', '=', 'issued').limit(1).executeTakeFirstOrThrow();
    const price = await ctx.db.selectFrom('price').select('id').limit(1).executeTakeFirstOrThrow();
    const charge = await ctx.db.selectFrom('manual_charge').select('id').limit(1).executeTakeFirstOrThrow();
    const run = await ctx.db.selectFrom('invoice_run').select('id').limit(1).executeTakeFirstOrThrow();
    const calls: [string, () => Promise<{ status: number }>][] = [
      ['GET /api/invoices', () => brewer.get('/api/invoices')],
      ['GET /api/invoices/:id', () => brewer.get(`/api/invoices/${inv.id}`)],
      ['GET /api/invoices/:id/pdf', () => brewer.get(`/api/invoices/${inv.id}/pdf`)],
      ['GET /api/invoices/export csv', () => brewer.get('/api/invoices/export?period=2026-11&format=csv')],
      ['GET /api/invoices/export xlsx', () => brewer.get('/api/invoices/export?period=2026-11&format=xlsx')],
      ['POST /api/invoices/:id/issue', () => brewer.post(`/api/invoices/${inv.id}/issue`)],
      ['POST /api/invoices/:id/send', () => brewer.post(`/api/invoices/${inv.id}/send`)],
      ['POST /api/invoices/:id/checkout', () => brewer.post(`/api/invoices/${inv.id}/checkout`)],
      ['POST /api/invoices/:id/checkout/confirm', () => brewer.post(`/api/invoices/${inv.id}/checkout/confirm`, { sessionId: 'cs_x' })],
      ['POST /api/invoices/:id/payments', () => brewer.post(`/api/invoices/${inv.id}/payments`, { amountCents: 1, method: 'cash', receivedOn: '2026-12-01' })],
      ['POST /api/invoices/:id/void', () => brewer.post(`/api/invoices/${inv.id}/void`, { reason: 'x' })],
      ['POST /api/invoices/:id/refunds', () => brewer.post(`/api/invoices/${inv.id}/refunds`, { amountCents: 1, reason: 'x' })],
      ['GET /api/invoice-runs', () => brewer.get('/api/invoice-runs')],
      ['GET /api/invoice-runs/preview', () => brewer.get('/api/invoice-runs/preview?period=2026-11')],
      ['POST /api/invoice-runs', () => brewer.post('/api/invoice-runs', { period: '2026-11' })],
      ['POST /api/invoice-runs/:id/issue', () => brewer.post(`/api/invoice-runs/${run.id}/issue`)],
      ['GET /api/prices', () => brewer.get('/api/prices')],
      ['POST /api/prices', () => brewer.post('/api/prices', { item: 'keg_week', unitCents: 1, effectiveFrom: '2031-01-01' })],
      ['DELETE /api/prices/:id', () => brewer.delete(`/api/prices/${price.id}`)],
      ['GET /api/tax-rates', () => brewer.get('/api/tax-rates')],
      ['POST /api/tax-rates', () => brewer.post('/api/tax-rates', { rateBp: 1, label: 'x', effectiveFrom: '2031-01-01' })],
      ['DELETE /api/tax-rates/:id', () => brewer.delete(`/api/tax-rates/${price.id}`)],
      ['GET /api/manual-charges', () => brewer.get('/api/manual-charges')],
      [
        'POST /api/manual-charges',
        () => brewer.post('/api/manual-charges', { memberId: ids.a, period: '2026-12', description: 'x', reason: 'x', amountCents: 1 }),
      ],
      ['DELETE /api/manual-charges/:id', () => brewer.delete(`/api/manual-charges/${charge.id}`)],
      ['GET /api/billing/summary', () => brewer.get('/api/billing/summary')],
      ['GET /api/billing/ageing', () => brewer.get('/api/billing/ageing')],
      ['GET /api/billing/balance', () => brewer.get('/api/billing/balance')],
      ['GET /api/billing/profile', () => brewer.get('/api/billing/profile')],
      ['PUT /api/billing/profile', () => brewer.put('/api/billing/profile', {})],
      ['GET /api/credit-notes/:id/pdf', () => brewer.get(`/api/credit-notes/${price.id}/pdf`)],
      ['POST /api/invoice-runs/:id/send', () => brewer.post(`/api/invoice-runs/${run.id}/send`)],
    ];
    const statuses = await Promise.all(calls.map(async ([name, call]) => [name, (await call()).status] as const));
    expect(statuses.filter(([, s]) => s !== 403)).toEqual([]);
  });
});

describe('documents', () => {
  it('renders an invoice PDF whose text names the co-op, member, number, dates, sources, tax, total and how to pay', async () => {
    const inv = await invoiceOf(ids.a, '2026-11');
    const res = await treasurer.get(`/api/invoices/${inv.id}/pdf`).buffer(true).parse(binary);
    expect(res.status).toBe(200);
    const text = pdfText(res.body as Buffer).replace(/\s+/g, ' ');
    expect(text).toContain('Larkspur Yard Brewing Co-op');
    expect(text).toContain('17 Maltings Lane');
    expect(text).toContain('Test Member Alder');
    expect(text).toContain(inv.number!);
    expect(text).toContain(longDate(inv.issuedOn!)); // invoice date
    expect(text).toContain(longDate(addDays(inv.issuedOn!, 14))); // due after the 14-day terms
    expect(text).toContain('F-90, 1–5 Nov, 4 days');
    expect(text).toContain('Tax at 7.5 %');
    expect(text).toContain('€27.96');
    expect(text).toMatch(/How to pay/);
    expect(text).toContain(`quoting ${inv.number}`);
  });

  it('renders a credit note PDF for the treasurer and the member it credits, and no one else', async () => {
    const note = await ctx.db
      .selectFrom('credit_note')
      .innerJoin('app_user', 'app_user.id', 'credit_note.member_id')
      .select(['credit_note.id', 'credit_note.number', 'credit_note.total_cents', 'app_user.email'])
      .where('credit_note.kind', '=', 'refund')
      .where('app_user.email', 'like', '%@example.org')
      .where('credit_note.member_id', '<>', ids.b)
      .executeTakeFirstOrThrow();
    const res = await treasurer.get(`/api/credit-notes/${note.id}/pdf`).buffer(true).parse(binary);
    expect(res.status).toBe(200);
    const text = pdfText(res.body as Buffer).replace(/\s+/g, ' ');
    expect(text).toContain('Credit note');
    expect(text).toContain(note.number);
    expect(text).toMatch(/was paid back by bank transfer/);
    const owner = await ctx.signIn(note.email);
    expect((await owner.get(`/api/credit-notes/${note.id}/pdf`)).status).toBe(200);
    const other = await ctx.signIn(note.email === 'member@example.org' ? 'member2@example.org' : 'member@example.org');
    expect((await other.get(`/api/credit-notes/${note.id}/pdf`)).status).toBe(404);
  });

  it('e-mails the invoice with its PDF attached, through the queue', async () => {
    const inv = await invoiceOf(ids.a, '2026-11');
    const res = await treasurer.post(`/api/invoices/${inv.id}/send`);
    expect(res.status).toBe(202);
    expect(res.body).toMatchObject({ queued: true, to: 'alder.test@example.org' });
    const mail = await ctx.waitForMail('alder.test@example.org', /Invoice INV-2026-/);
    expect(mail.subject).toContain(inv.number!);
    expect(mail.text_body).toContain('€27.96');
    expect(mail.raw).toMatch(/Content-Type: application\/pdf/);
    expect(mail.raw).toContain(`invoice-${inv.number}.pdf`);
    const sent = await invoiceOf(ids.a, '2026-11');
    expect(sent.sentAt).toBeTruthy();
  });

  it('exports a period’s lines, credit notes and payments as CSV and XLSX with formula-like text neutralised', async () => {
    // Charges whose text a spreadsheet would run, on an invoice of C's for September.
    const draft = await ctx.db.insertInto('invoice').values({ member_id: ids.c, period: '2026-09', currency: 'EUR' }).returning('id').executeTakeFirstOrThrow();
    for (const description of ['=HYPERLINK("http://example.org","x")', '@SUM(A1)', '+44 phone fee', '-10% spoilage']) {
      const r = await treasurer.post('/api/manual-charges', {
        memberId: ids.c,
        period: '2026-09',
        description,
        reason: 'Typed by the treasurer',
        amountCents: 150,
      });
      expect(r.status).toBe(201);
    }
    expect((await treasurer.post(`/api/invoices/${draft.id}/issue`)).status).toBe(200);
    const csv = await treasurer.get('/api/invoices/export?period=2026-09&format=csv');
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    expect(csv.headers['content-disposition']).toMatch(/cellarwright-ledger-2026-09\.csv/);
    expect(csv.text).toContain(`"'=HYPERLINK(""http://example.org"",""x"")"`);
    expect(csv.text).toContain(",'@SUM(A1),");
    expect(csv.text).toContain(",'+44 phone fee,");
    expect(csv.text).toContain(",'-10% spoilage,");
    expect(csv.text).not.toMatch(/(^|,)"?[=@+]/m);
    // Amounts stay numbers; September's voided invoice brings its credit note, and its paid invoices their payments.
    const lines = csv.text.split('\r\n');
    expect(lines[0]).toMatch(/^\ufeffRecord,Invoice,Status/);
    expect(lines.some((l) => l.startsWith('credit note,'))).toBe(true);
    expect(lines.some((l) => l.startsWith('payment,'))).toBe(true);
    expect(lines.some((l) => /,1\.50,/.test(l))).toBe(true);

    const xlsx = await treasurer.get('/api/invoices/export?period=2026-09&format=xlsx').buffer(true).parse(binary);
    expect(xlsx.status).toBe(200);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(xlsx.body);
    expect(wb.worksheets.map((w) => w.name)).toEqual(['Invoice lines', 'Credit notes', 'Payments']);
    const sheet = wb.getWorksheet('Invoice lines')!;
    const texts: string[] = [];
    const amounts: unknown[] = [];
    sheet.eachRow((row, n) => {
      if (n === 1) return;
      const described = row.getCell(8).value;
      texts.push(typeof described === 'string' ? described : JSON.stringify(described));
      amounts.push(row.getCell(16).value);
    });
    expect(texts).toContain('\'=HYPERLINK("http://example.org","x")');
    expect(texts).toContain("'-10% spoilage");
    expect(texts.some((t) => /^[=+\-@]/.test(t))).toBe(false);
    expect(amounts.every((a) => typeof a === 'number')).toBe(true);
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
