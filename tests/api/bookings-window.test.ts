import { describe, expect, it } from 'vitest';
import { createBooking, createFermenter, createMember } from '../../db/factories/index.ts';
import { type ApiClient, type TestContext, useTestContext } from '../helpers/context.ts';

let ctx: TestContext;
let admin: ApiClient;
let ownerId: string;
const DAY = 24 * 3600_000;
const bookings: { id: string; startsAt: Date; endsAt: Date }[] = [];

/** A time `days` (fractions allowed) from the test's now. */
const at = (days: number) => new Date(ctx.clock.now().getTime() + days * DAY);

// Each booking on its own fermenter, all held by one member, around a window from day 100 to day 110.
const periods: [from: number, to: number][] = [
  [90, 100], // ends exactly at the window's start: outside
  [110, 115], // starts exactly at the window's end: outside
  [90, 100.0001], // ends just after the start: inside
  [109.9999, 112], // starts just before the end: inside
  [102, 104], // within
  [95, 120], // around the whole window
  [40, 101], // the longest on record, starting long before the window: inside
  [20, 39], // long before: outside
  [130, 131], // long after: outside
];

useTestContext(async (created) => {
  ctx = created;
  admin = await ctx.signIn('admin@example.org');
  ownerId = (await createMember(ctx.db)).id;
  for (const [from, to] of periods) {
    const item = await createFermenter(ctx.db);
    const row = await createBooking(ctx.db, { equipmentId: item.id, ownerId, startsAt: at(from), endsAt: at(to), state: 'booked' });
    bookings.push({ id: row.id, startsAt: row.starts_at, endsAt: row.ends_at });
  }
});

/** The ids of the bookings a window should list: those ending after `from` and starting before `to`, in start order. */
function expected(from: Date | null, to: Date | null): string[] {
  return bookings
    .filter((b) => (!from || b.endsAt > from) && (!to || b.startsAt < to))
    .sort((a, b) => a.startsAt.getTime() - b.startsAt.getTime())
    .map((b) => b.id);
}

async function listed(query: string, pageSize = 50): Promise<{ ids: string[]; total: number }> {
  const ids: string[] = [];
  let total = -1;
  for (let page = 1; page < 20; page++) {
    const res = await admin.get(`/api/bookings?ownerId=${ownerId}&pageSize=${pageSize}&page=${page}${query}`);
    expect(res.status).toBe(200);
    total = res.body.total;
    ids.push(...res.body.items.map((b: { id: string }) => b.id));
    if (ids.length >= total || res.body.items.length === 0) break;
  }
  return { ids, total };
}

const param = (name: string, d: Date | null) => (d ? `&${name}=${encodeURIComponent(d.toISOString())}` : '');

describe('the bookings overlapping a window', () => {
  it('lists exactly the bookings that end after its start and begin before its end, whatever their length', async () => {
    for (const [from, to] of [
      [at(100), at(110)],
      [at(100), null],
      [null, at(110)],
      [at(39), at(40)],
      [at(0), at(200)],
    ] as [Date | null, Date | null][]) {
      const want = expected(from, to);
      const got = await listed(`${param('from', from)}${param('to', to)}`);
      expect({ from, to, ids: got.ids }).toEqual({ from, to, ids: want });
      expect(got.total).toBe(want.length);
    }
  });

  it('lists the same bookings whether the window is read whole (92 days or less) or walked in start order (longer)', async () => {
    for (const [from, to] of [
      [at(30), at(122)],
      [at(30), at(122.01)],
      [at(9), at(101)],
      [at(9), at(101.01)],
    ] as [Date, Date][]) {
      const want = expected(from, to);
      const got = await listed(`${param('from', from)}${param('to', to)}`, 3);
      expect({ from, to, ids: got.ids, total: got.total }).toEqual({ from, to, ids: want, total: want.length });
    }
  });

  it('pages through a window without repeating or skipping a booking, and counts it exactly', async () => {
    const window = `${param('from', at(100))}${param('to', at(110))}`;
    const paged = await listed(window, 2);
    expect(paged.ids).toEqual(expected(at(100), at(110)));
    expect(paged.total).toBe(paged.ids.length);
  });

  it('leaves cancelled bookings out unless asked for', async () => {
    const item = await createFermenter(ctx.db);
    const cancelled = await createBooking(ctx.db, { equipmentId: item.id, ownerId, startsAt: at(103), endsAt: at(105), state: 'cancelled' });
    const window = `${param('from', at(100))}${param('to', at(110))}`;
    expect((await listed(window)).ids).not.toContain(cancelled.id);
    expect((await listed(`${window}&includeCancelled=true`)).ids).toContain(cancelled.id);
  });
});
