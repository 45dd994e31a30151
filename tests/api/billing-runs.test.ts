// Invoice runs, the charges they make, and who may see the invoices. The co-op, its members, fermenters, kegs and price list as of 1 December 2026 are
// tests/helpers/billing-file.ts's (its header tells the hand-worked figures).
import { describe, expect, it } from 'vitest';
import type { InvoiceDetail, InvoiceSummary } from '../../shared/schemas/billing.ts';
import { ctx, fixtureMembers, treasurer, useBillingFile } from '../helpers/billing-file.ts';
import { countRows } from '../helpers/counts.ts';
import { binary } from '../helpers/http.ts';

const { ids, invoiceOf } = useBillingFile();

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
    const before = await countRows(ctx, 'invoice');
    const res = await treasurer.get('/api/invoice-runs/preview?period=2026-11');
    expect(res.status).toBe(200);
    expect(res.body.invoices.every((i: { alreadyInvoiced: boolean }) => i.alreadyInvoiced)).toBe(true);
    const after = await countRows(ctx, 'invoice');
    expect(after).toBe(before);
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
