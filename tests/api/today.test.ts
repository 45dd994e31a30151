import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestContext, type TestContext } from '../helpers/context.ts';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await createTestContext();
});
afterAll(async () => ctx?.close());

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
    const own = await ctx.db
      .selectFrom('booking')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('owner_id', '=', member.user.id)
      .where('state', 'in', ['booked', 'in_use'])
      .where('ends_at', '>', new Date())
      .executeTakeFirstOrThrow();
    expect(res.body.member.bookings.length).toBe(Math.min(own.n, 8));
    expect(res.body.member.bookings.length).toBeGreaterThan(0);
    const sorted = res.body.member.bookings.map((b: { startsAt: string }) => b.startsAt);
    expect([...sorted].sort()).toEqual(sorted);
    for (const b of res.body.member.batches) expect(['planned', 'fermenting', 'conditioning']).toContain(b.status);
    expect(res.body.member.balance).toMatchObject({ currency: expect.any(String), balanceCents: expect.any(Number) });
    const kegs = await ctx.db
      .selectFrom('keg_whereabouts')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('member_id', '=', member.user.id)
      .where('whereabouts', '=', 'with_member')
      .executeTakeFirstOrThrow();
    expect(res.body.member.kegs).toHaveLength(kegs.n);
  });

  it('gives the brewer-on-duty the cellar round and no money', async () => {
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
    expect(res.body.cellar.needsCleaning.total).toBe(dirty.n);
    expect(res.body.cellar.needsCleaning.items.length).toBe(Math.min(dirty.n, 10));
    const overdue = await ctx.db
      .selectFrom('keg_whereabouts')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('whereabouts', '=', 'with_member')
      .where('due_at', '<', sql<Date>`now()`)
      .executeTakeFirstOrThrow();
    expect(res.body.cellar.overdueKegs.total).toBe(overdue.n);
    for (const k of res.body.cellar.overdueKegs.items) expect(new Date(k.dueAt).getTime()).toBeLessThan(Date.now());
  });

  it('gives the treasurer unpaid invoices and ageing, and not the cellar round', async () => {
    const treasurer = await ctx.signIn('treasurer@example.org');
    const res = await treasurer.get('/api/today');
    expect(res.status).toBe(200);
    expect(res.body.cellar).toBeUndefined();
    expect(res.body.money.ageing).toEqual({ '0-30': expect.any(Number), '31-60': expect.any(Number), '61-90': expect.any(Number), '90+': expect.any(Number) });
    const open = await ctx.db
      .selectFrom('invoice')
      .select([(eb) => eb.fn.countAll<number>().as('n'), sql<number>`coalesce(sum(total_cents - paid_cents - credited_cents), 0)::int`.as('due')])
      .where('status', '=', 'issued')
      .where(sql<boolean>`total_cents - paid_cents - credited_cents > 0`)
      .executeTakeFirstOrThrow();
    expect(res.body.money.unpaid.count).toBe(open.n);
    expect(res.body.money.unpaid.totalCents).toBe(open.due);
  });

  it('gives an admin both the cellar round and the books', async () => {
    const admin = await ctx.signIn('admin@example.org');
    const res = await admin.get('/api/today');
    expect(res.body.cellar).toBeDefined();
    expect(res.body.money).toBeDefined();
  });
});
