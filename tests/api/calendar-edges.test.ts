import { simpleParser } from 'mailparser';
import { afterEach, describe, expect, it } from 'vitest';
import type { InvoiceDetail, InvoiceSummary } from '../../shared/schemas/billing.ts';
import { createBooking, createFermenter, createInvoice, createKeg, createMember, setSetting } from '../../db/factories/index.ts';
import { fixtureEquipmentId } from '../../db/fixtures/index.ts';
import { createTestContext, type ApiClient, type TestContext } from '../helpers/context.ts';
import { icsUtc, parseIcs } from '../helpers/ics.ts';

// Calendar edges, each worked by hand. The fixture co-op keeps its books in UTC (the default
// booking_rules.timeZone); these tests move it to Europe/Berlin, a zone with summer time:
// CET (UTC+1) in winter, CEST (UTC+2) from 01:00 UTC on the last Sunday of March to 01:00 UTC on
// the last Sunday of October. Prices are the fixture's: a 30 L fermenter-day 1.50, dues 15.00 a month, 8 % tax.

const ZONE = 'Europe/Berlin';
let ctx: TestContext | undefined;
afterEach(async () => {
  await ctx?.close();
  ctx = undefined;
});

/** A context whose clock starts at `now`, with the co-op in Berlin. */
async function coopInBerlin(now: string): Promise<TestContext> {
  ctx = await createTestContext({}, { now });
  await setSetting(ctx.db, 'booking_rules', { timeZone: ZONE });
  return ctx;
}

async function invoiceOf(c: TestContext, treasurer: ApiClient, memberId: string, period: string): Promise<InvoiceDetail> {
  const row = await c.db.selectFrom('invoice').select('id').where('member_id', '=', memberId).where('period', '=', period).executeTakeFirstOrThrow();
  const res = await treasurer.get(`/api/invoices/${row.id}`);
  expect(res.status).toBe(200);
  return res.body.invoice;
}

describe('the turn of the year', () => {
  it('refuses December on the evening of 31 December, and bills it just after midnight co-op time in the new year’s number series', async () => {
    // 31 Dec 2026 22:30 UTC is 23:30 CET: still 31 December in the co-op, so December has not ended.
    const c = await coopInBerlin('2026-12-31T22:30:00Z');
    c.clock.freeze();
    const treasurer = await c.signIn('treasurer@example.org');
    const early = await treasurer.post('/api/invoice-runs', { period: '2026-12' });
    expect(early.status).toBe(409);
    expect(early.body.detail).toMatch(/has not ended/);
    expect(await c.db.selectFrom('invoice').select('id').execute()).toEqual([]);

    // 31 Dec 2026 23:30 UTC is 00:30 CET on 1 January 2027: December is over, and the invoices are
    // dated 1 Jan 2027, so they take the 2027 series from its start (the fixture has no invoices yet).
    c.clock.freeze('2026-12-31T23:30:00Z');
    const run = await treasurer.post('/api/invoice-runs', { period: '2026-12' });
    expect(run.status).toBe(201);
    const made = run.body.invoices as InvoiceSummary[];
    // The fixture's six members (member@ … member6@) owe December's dues.
    expect(made).toHaveLength(6);
    expect(made.every((i) => i.period === '2026-12' && i.status === 'issued' && i.issuedOn === '2027-01-01')).toBe(true);
    // Payment terms 14 days: 1 Jan + 14 = 15 Jan.
    expect(made.every((i) => i.dueOn === '2027-01-15')).toBe(true);
    expect(made.map((i) => i.number).sort()).toEqual(['INV-2027-0001', 'INV-2027-0002', 'INV-2027-0003', 'INV-2027-0004', 'INV-2027-0005', 'INV-2027-0006']);
    // Dues only: 15.00 + 8 % = 16.20.
    expect(made.every((i) => i.totalCents === 1620)).toBe(true);
  });
});

describe('a leap year', () => {
  it('counts 29 fermenter-days for a booking from 1 February to 1 March 2028, midnight to midnight co-op time', async () => {
    const c = await coopInBerlin('2028-03-02T09:00:00Z');
    const treasurer = await c.signIn('treasurer@example.org');
    const member = await createMember(c.db, { name: 'Lea Leap' });
    const fermenter = await createFermenter(c.db, { capacityLiters: 30 });
    // 00:00 CET on 1 Feb is 23:00 UTC on 31 Jan; 00:00 CET on 1 Mar is 23:00 UTC on 29 Feb. In the
    // co-op's days that is 1 Feb → 1 Mar: 29 days in 2028 (a UTC reading would put one of them in January).
    await createBooking(c.db, {
      equipmentId: fermenter.id,
      ownerId: member.id,
      startsAt: '2028-02-01T00:00:00+01:00',
      endsAt: '2028-03-01T00:00:00+01:00',
      now: c.clock.now(),
    });
    const january = await treasurer.post('/api/invoice-runs', { period: '2028-01' });
    expect(january.status).toBe(201);
    const janInvoice = await invoiceOf(c, treasurer, member.id, '2028-01');
    expect(janInvoice.lines.filter((l) => l.item === 'fermenter_day')).toEqual([]);

    const february = await treasurer.post('/api/invoice-runs', { period: '2028-02' });
    expect(february.status).toBe(201);
    const inv = await invoiceOf(c, treasurer, member.id, '2028-02');
    const days = inv.lines.filter((l) => l.item === 'fermenter_day');
    expect(days).toHaveLength(1);
    expect(days[0]).toMatchObject({
      sourceLabel: `${fermenter.code}, 1 Feb–1 Mar, 29 days`,
      quantity: 29,
      unitPriceCents: 150,
      amountCents: 4350, // 29 × 1.50
      taxCents: 348, // 8 % of 43.50
      serviceFrom: '2028-02-01',
      serviceTo: '2028-02-29',
    });
    // With dues 15.00 (tax 1.20): 58.50 net, 4.68 tax, 63.18.
    expect(inv).toMatchObject({ subtotalCents: 5850, taxCents: 468, totalCents: 6318 });
  });
});

describe('the last day of a month', () => {
  it('bills a booking that ends at 23:00 on 31 January co-op time in January only', async () => {
    const c = await coopInBerlin('2027-02-01T09:00:00Z');
    const treasurer = await c.signIn('treasurer@example.org');
    const member = await createMember(c.db, { name: 'Jan Lastday' });
    const fermenter = await createFermenter(c.db, { capacityLiters: 30 });
    // 20 Jan 10:00 CET → 31 Jan 23:00 CET (22:00 UTC): co-op days 20 Jan → 31 Jan = 11 days, all January's.
    await createBooking(c.db, {
      equipmentId: fermenter.id,
      ownerId: member.id,
      startsAt: '2027-01-20T10:00:00+01:00',
      endsAt: '2027-01-31T23:00:00+01:00',
      now: c.clock.now(),
    });
    expect((await treasurer.post('/api/invoice-runs', { period: '2027-01' })).status).toBe(201);
    const jan = await invoiceOf(c, treasurer, member.id, '2027-01');
    expect(jan.lines.filter((l) => l.item === 'fermenter_day').map((l) => [l.sourceLabel, l.quantity, l.amountCents, l.serviceFrom, l.serviceTo])).toEqual([
      [`${fermenter.code}, 20–31 Jan, 11 days`, 11, 1650, '2027-01-20', '2027-01-30'], // 11 × 1.50
    ]);

    c.clock.set('2027-03-01T09:00:00Z');
    expect((await treasurer.post('/api/invoice-runs', { period: '2027-02' })).status).toBe(201);
    const feb = await invoiceOf(c, treasurer, member.id, '2027-02');
    // February: the member's dues and nothing from the booking (its cleaning buffer into 1 Feb is not billed).
    expect(feb.lines.map((l) => l.item)).toEqual(['membership_month']);
    expect(feb).toMatchObject({ subtotalCents: 1500, taxCents: 120, totalCents: 1620 });
  });
});

describe('summer time', () => {
  it('keeps a booking’s wall-clock start and end in the e-mail and the calendar file across both changes', async () => {
    // Spring: on Sun 28 Mar 2027 clocks go from 02:00 CET to 03:00 CEST.
    const c = await coopInBerlin('2027-03-20T10:00:00Z');
    const member = await c.signIn('member@example.org');
    const cases = [
      // 10:00 CET = 09:00 UTC; 10:00 CEST = 08:00 UTC; blocked until 24 h later, 30 Mar 08:00 UTC = 10:00 CEST.
      {
        now: '2027-03-20T10:00:00Z',
        startsAt: '2027-03-27T10:00:00+01:00',
        endsAt: '2027-03-29T10:00:00+02:00',
        start: '2027-03-27T09:00:00.000Z',
        end: '2027-03-29T08:00:00.000Z',
        blocked: '2027-03-30T08:00:00.000Z',
        from: 'Sat 27 Mar 2027',
        until: 'Mon 29 Mar 2027',
      },
      // Autumn: on Sun 31 Oct 2027 clocks go from 03:00 CEST back to 02:00 CET.
      // 10:00 CEST = 08:00 UTC; 10:00 CET = 09:00 UTC; blocked until 2 Nov 09:00 UTC = 10:00 CET.
      {
        now: '2027-10-20T10:00:00Z',
        startsAt: '2027-10-30T10:00:00+02:00',
        endsAt: '2027-11-01T10:00:00+01:00',
        start: '2027-10-30T08:00:00.000Z',
        end: '2027-11-01T09:00:00.000Z',
        blocked: '2027-11-02T09:00:00.000Z',
        from: 'Sat 30 Oct 2027',
        until: 'Mon 1 Nov 2027',
      },
    ];
    for (const k of cases) {
      c.clock.set(k.now);
      const res = await member.post('/api/bookings', { equipmentId: fixtureEquipmentId('F-01'), startsAt: k.startsAt, endsAt: k.endsAt });
      expect(res.status).toBe(201);
      expect(res.body.booking).toMatchObject({ startsAt: k.start, endsAt: k.end, blockedUntil: k.blocked });

      const subject = new RegExp(`^Booked: F-01 .*${k.from.replace(/^\w+, /, '')}`);
      const mail = await c.waitForMail('member@example.org', subject);
      const text = mail.text_body.replace(/\s+/g, ' ');
      expect(text).toContain(`from ${k.from}, 10:00 (${ZONE})`);
      expect(text).toContain(`until ${k.until}, 10:00 (${ZONE})`);
      const parsed = await simpleParser(mail.raw);
      const cal = parseIcs(parsed.attachments.find((a) => a.filename === 'booking.ics')!.content.toString('utf8'));
      const ev = cal.components.find((x) => x.type === 'VEVENT')!;
      expect(icsUtc(ev.get('DTSTART')!.value).toISOString()).toBe(k.start);
      expect(icsUtc(ev.get('DTEND')!.value).toISOString()).toBe(k.end);
    }
  });

  it('counts calendar days, not 24-hour spans, for a fermenter booked across either change', async () => {
    const c = await coopInBerlin('2027-04-02T09:00:00Z');
    const member = await createMember(c.db, { name: 'Sommer Zeit' });
    const fermenter = await createFermenter(c.db, { capacityLiters: 30 });
    // Autumn 2026 (25 Oct): 20 Oct 10:00 CEST → 27 Oct 10:00 CET is 169 hours, 7 calendar days.
    await createBooking(c.db, {
      equipmentId: fermenter.id,
      ownerId: member.id,
      startsAt: '2026-10-20T10:00:00+02:00',
      endsAt: '2026-10-27T10:00:00+01:00',
      now: c.clock.now(),
    });
    // Spring 2027 (28 Mar): 24 Mar 10:00 CET → 31 Mar 10:00 CEST is 167 hours, 7 calendar days.
    await createBooking(c.db, {
      equipmentId: fermenter.id,
      ownerId: member.id,
      startsAt: '2027-03-24T10:00:00+01:00',
      endsAt: '2027-03-31T10:00:00+02:00',
      now: c.clock.now(),
    });
    const october = await createInvoice(c.db, { memberId: member.id, period: '2026-10', today: '2026-11-01' });
    const march = await createInvoice(c.db, { memberId: member.id, period: '2027-03', today: '2027-04-01' });
    const days = (lines: typeof october.lines) => lines.filter((l) => l.item === 'fermenter_day').map((l) => [l.source_label, l.quantity, l.amount_cents]);
    expect(days(october.lines)).toEqual([[`${fermenter.code}, 20–27 Oct, 7 days`, 7, 1050]]); // 7 × 1.50
    expect(days(march.lines)).toEqual([[`${fermenter.code}, 24–31 Mar, 7 days`, 7, 1050]]);
  });
});

describe('a keg due back tomorrow', () => {
  it('is overdue only once the clock passes its due time', async () => {
    const c = await coopInBerlin('2026-12-02T10:00:00Z');
    const brewer = await c.signIn('brewer@example.org');
    const member = await c.signIn('member@example.org');
    const keg = await createKeg(c.db);
    // Checked out on 2 Dec, due back on 3 Dec at 18:00 UTC (19:00 CET).
    const out = await brewer.post(`/api/kegs/${keg.id}/check-out`, { memberId: member.user.id, dueAt: '2026-12-03T18:00:00Z' });
    expect(out.status).toBe(200);
    const check = async () => {
      const one = await brewer.get(`/api/kegs/${keg.id}`);
      const list = await brewer.get('/api/kegs/overdue');
      return { overdue: one.body.keg.overdue as boolean, listed: list.body.items.some((k: { id: string }) => k.id === keg.id) };
    };
    expect(await check()).toEqual({ overdue: false, listed: false }); // the day before
    c.clock.freeze('2026-12-03T00:00:01+01:00');
    expect(await check()).toEqual({ overdue: false, listed: false }); // the due day has begun, the due time has not come
    c.clock.freeze('2026-12-03T18:00:00Z');
    expect(await check()).toEqual({ overdue: false, listed: false }); // exactly at the due time: not yet past it
    c.clock.freeze('2026-12-03T18:00:01Z');
    expect(await check()).toEqual({ overdue: true, listed: true }); // one second past
    c.clock.freeze('2026-12-04T09:00:00Z');
    expect(await check()).toEqual({ overdue: true, listed: true });
  });
});
