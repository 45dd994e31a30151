import { describe, expect, it } from 'vitest';
import {
  createBatch,
  createBooking,
  createFermenter,
  createInvoice,
  createKeg,
  createKegCheckout,
  createSanitationCycle,
  DAY,
  fillKeg,
  HOUR,
} from '../../db/factories/index.ts';
import { fixtureUserId } from '../../db/fixtures/index.ts';
import { type TestContext, useTestContext } from '../helpers/context.ts';

let ctx: TestContext;
/** What this file made for member@example.org (and, to stay out of it, for member2@). */
const made = {
  bookings: [] as string[],
  otherBooking: '',
  openBatches: [] as string[],
  packagedBatch: '',
  kegDue: '',
  kegOverdue: '',
  invoiceTotal: 0,
};

useTestContext(async (created) => {
  ctx = created;
  const now = ctx.clock.now().getTime();
  const t = (days: number) => new Date(now + days * DAY);
  const member = fixtureUserId('member');
  const other = fixtureUserId('member2');
  const fermenter = await createFermenter(ctx.db);
  const keg = await createKeg(ctx.db);

  // Bookings: one in use, one to come; one that has ended, one cancelled, and another member's.
  made.bookings.push((await createBooking(ctx.db, { ownerId: member, equipmentId: fermenter.id, startsAt: t(-2), endsAt: t(5), now: t(0) })).id);
  made.bookings.push((await createBooking(ctx.db, { ownerId: member, equipmentId: keg.id, startsAt: t(3), endsAt: t(20), now: t(0) })).id);
  await createBooking(ctx.db, { ownerId: member, equipmentId: keg.id, startsAt: t(-20), endsAt: t(-4), now: t(0) });
  await createBooking(ctx.db, { ownerId: member, equipmentId: fermenter.id, startsAt: t(30), endsAt: t(40), state: 'cancelled', now: t(0) });
  made.otherBooking = (await createBooking(ctx.db, { ownerId: other, equipmentId: fermenter.id, startsAt: t(7), endsAt: t(14), now: t(0) })).id;

  // Batches: planned and fermenting ones count; a packaged one does not.
  made.openBatches.push((await createBatch(ctx.db, { ownerId: member, name: 'Winter porter (planned)' })).id);
  made.openBatches.push(
    (
      await createBatch(ctx.db, {
        ownerId: member,
        name: 'Amber in the fermenter',
        readings: [
          { takenAt: t(-2), value: 1.054 },
          { takenAt: t(-1), value: 1.03 },
        ],
      })
    ).id,
  );
  made.packagedBatch = (await createBatch(ctx.db, { ownerId: member, name: 'Packaged pils', status: 'packaged' })).id;

  // Kegs out with the member: one due next week, one two days overdue; another member's keg not yet due.
  const due = await fillKeg(ctx.db, { kegId: (await createKeg(ctx.db)).id, at: t(-3), ownerId: member });
  await createKegCheckout(ctx.db, { kegId: due.fills[0]!.keg_id, memberId: member, at: new Date(now - 3 * DAY + 4 * HOUR), dueAt: t(7) });
  made.kegDue = due.fills[0]!.keg_id;
  const late = await fillKeg(ctx.db, { kegId: (await createKeg(ctx.db)).id, at: t(-20), ownerId: member });
  await createKegCheckout(ctx.db, { kegId: late.fills[0]!.keg_id, memberId: member, at: new Date(now - 20 * DAY + 4 * HOUR), dueAt: t(-2) });
  made.kegOverdue = late.fills[0]!.keg_id;
  const others = await fillKeg(ctx.db, { kegId: (await createKeg(ctx.db)).id, at: t(-5), ownerId: other });
  await createKegCheckout(ctx.db, { kegId: others.fills[0]!.keg_id, memberId: other, at: t(-4), dueAt: t(10) });

  // One issued, unpaid invoice: the member's November.
  const invoice = await createInvoice(ctx.db, { memberId: member, period: '2026-11', today: '2026-12-01', actorId: fixtureUserId('treasurer') });
  made.invoiceTotal = invoice.total_cents;
});

describe('GET /api/today', () => {
  it('needs a signed-in person', async () => {
    const res = await (await import('supertest')).default(ctx.app).get('/api/today');
    expect(res.status).toBe(401);
  });

  it('gives a member their own bookings, batches, kegs and balance, and nothing of the cellar or the books', async () => {
    const member = await ctx.signIn('member@example.org');
    const res = await member.get('/api/today');
    expect(res.status).toBe(200);
    expect(res.body.cellar).toBeUndefined();
    expect(res.body.money).toBeUndefined();
    const bookings = res.body.member.bookings as { id: string; startsAt: string }[];
    expect(bookings.map((b) => b.id)).toEqual(made.bookings);
    const sorted = bookings.map((b) => b.startsAt);
    expect([...sorted].sort()).toEqual(sorted);
    const batches = res.body.member.batches as { id: string; status: string }[];
    expect(batches.map((b) => b.id).sort()).toEqual([...made.openBatches].sort());
    for (const b of batches) expect(['planned', 'fermenting', 'conditioning']).toContain(b.status);
    expect(res.body.member.balance).toMatchObject({ currency: expect.any(String), balanceCents: made.invoiceTotal });
    expect(made.invoiceTotal).toBeGreaterThan(0);
    const kegs = res.body.member.kegs as { id: string; overdue: boolean }[];
    expect(kegs).toHaveLength(2);
    expect(kegs.find((k) => k.id === made.kegOverdue)).toMatchObject({ overdue: true });
    expect(kegs.find((k) => k.id === made.kegDue)).toMatchObject({ overdue: false });
  });

  it('gives the brewer-on-duty the cellar round and no money', async () => {
    // A keg cleaned but not yet sanitized is on the round as well as every vessel needing cleaning.
    const cleaned = await createKeg(ctx.db);
    await createSanitationCycle(ctx.db, { equipmentId: cleaned.id, readyAt: new Date(ctx.clock.now().getTime() - HOUR), until: 'cleaned' });
    const brewer = await ctx.signIn('brewer@example.org');
    const res = await brewer.get('/api/today');
    expect(res.status).toBe(200);
    expect(res.body.money).toBeUndefined();
    expect(res.body.member).toBeUndefined();
    const dirty = await ctx.db
      .selectFrom('equipment')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('state', 'in', ['needs_cleaning', 'cleaned'])
      .where('kind', 'in', ['fermenter', 'keg'])
      .executeTakeFirstOrThrow();
    expect(dirty.n).toBeGreaterThan(10);
    expect(res.body.cellar.needsCleaning.total).toBe(dirty.n);
    expect(res.body.cellar.needsCleaning.items.length).toBe(10);
    // Only the keg past its due date is overdue; the others out are not yet due.
    expect(res.body.cellar.overdueKegs.total).toBe(1);
    expect(res.body.cellar.overdueKegs.items.map((k: { id: string }) => k.id)).toEqual([made.kegOverdue]);
    expect(res.body.cellar.overdueKegs.items[0].memberName).toBe('Maren Holloway');
  });

  it('gives the treasurer unpaid invoices and ageing, and not the cellar round', async () => {
    const treasurer = await ctx.signIn('treasurer@example.org');
    const res = await treasurer.get('/api/today');
    expect(res.status).toBe(200);
    expect(res.body.cellar).toBeUndefined();
    expect(res.body.money.ageing).toEqual({ '0-30': expect.any(Number), '31-60': expect.any(Number), '61-90': expect.any(Number), '90+': expect.any(Number) });
    expect(res.body.money.unpaid.count).toBe(1);
    expect(res.body.money.unpaid.totalCents).toBe(made.invoiceTotal);
  });

  it('gives an admin both the cellar round and the books', async () => {
    const admin = await ctx.signIn('admin@example.org');
    const res = await admin.get('/api/today');
    expect(res.body.cellar).toBeDefined();
    expect(res.body.money).toBeDefined();
  });
});
