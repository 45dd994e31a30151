import { sql } from 'kysely';
import pg from 'pg';
import { describe, expect, it } from 'vitest';
import { createAuditEntry, createBooking, createFermenter, createMember, createSanitationCycle, DAY, HOUR } from '../../db/factories/index.ts';
import { keptCount } from '../../backend/lib/paginate.ts';
import { type ApiClient, type TestContext, signInAs, useTestContext } from '../helpers/context.ts';

/**
 * The totals of the unfiltered bookings, audit and sanitation lists come from counts kept by triggers
 * (`row_count`) in the transaction that writes the rows. They must stay exact: after inserts, updates that move
 * rows between groups, deletes, a rolled-back transaction and writers on several connections at once.
 */
let ctx: TestContext;
let admin: ApiClient;
let memberId: string;
let vessel: string;
let now: number;

useTestContext(async (created) => {
  ctx = created;
  [admin] = await signInAs(ctx, 'admin');
  memberId = (await createMember(ctx.db)).id;
  now = ctx.clock.now().getTime();
  const fermenter = (await createFermenter(ctx.db)).id;
  for (let i = 0; i < 6; i++) {
    const startsAt = now + (i - 3) * 3 * DAY;
    await createBooking(ctx.db, {
      equipmentId: fermenter,
      ownerId: memberId,
      startsAt: new Date(startsAt),
      endsAt: new Date(startsAt + DAY),
      now: new Date(now),
      ...(i === 4 ? { state: 'cancelled' as const } : {}),
    });
    await createAuditEntry(ctx.db, { at: new Date(startsAt), action: 'created', subjectType: i % 2 ? 'Booking' : 'Invoice', subjectId: `r-${i}` });
  }
  vessel = (await createFermenter(ctx.db)).id;
  await createSanitationCycle(ctx.db, { equipmentId: vessel, readyAt: new Date(now - 2 * DAY) });
  await createSanitationCycle(ctx.db, { equipmentId: vessel, readyAt: new Date(now - DAY), until: 'cleaned' });
});

const countWhere = async (table: 'booking' | 'audit_log' | 'sanitation_cycle', where = sql`true`) =>
  (await sql<{ n: number }>`select count(*)::int as n from ${sql.table(table)} where ${where}`.execute(ctx.db)).rows[0]!.n;

/** Each list's total, as the API answers it, beside a count of the rows it stands for. */
async function totals() {
  const total = async (url: string) => {
    const res = await admin.get(url);
    expect(res.status, url).toBe(200);
    return res.body.total as number;
  };
  return {
    api: {
      bookings: await total('/api/bookings?pageSize=1'),
      bookingsWithCancelled: await total('/api/bookings?pageSize=1&includeCancelled=true'),
      bookingsCancelled: await total('/api/bookings?pageSize=1&state=cancelled'),
      audit: await total('/api/audit?pageSize=1'),
      auditOfBookings: await total('/api/audit?pageSize=1&subjectType=Booking'),
      cycles: await total('/api/sanitation-cycles?pageSize=1'),
      readyCycles: await total('/api/sanitation-cycles?pageSize=1&outcome=ready'),
    },
    counted: {
      bookings: await countWhere('booking', sql`state <> 'cancelled'`),
      bookingsWithCancelled: await countWhere('booking'),
      bookingsCancelled: await countWhere('booking', sql`state = 'cancelled'`),
      audit: await countWhere('audit_log'),
      auditOfBookings: await countWhere('audit_log', sql`subject_type = 'Booking'`),
      cycles: await countWhere('sanitation_cycle'),
      readyCycles: await countWhere('sanitation_cycle', sql`outcome = 'ready'`),
    },
  };
}

async function expectExact() {
  const t = await totals();
  expect(t.api).toEqual(t.counted);
  return t.counted;
}

/** A booking row as SQL writes it, on `equipmentId`, starting `startsAt` (ms), a day long. */
const bookingValues = (equipmentId: string, startsAt: number) =>
  sql`(${equipmentId}, ${memberId}, ${new Date(startsAt)}, ${new Date(startsAt + DAY)}, ${new Date(startsAt + DAY + HOUR)}, 'booked', ${memberId})`;
const insertBookings = (equipmentId: string, starts: number[]) =>
  sql`insert into booking (equipment_id, owner_id, starts_at, ends_at, blocked_until, state, created_by)
      values ${sql.join(starts.map((s) => bookingValues(equipmentId, s)))}`;

describe('kept counts of the long lists', () => {
  it('give each unfiltered list (and one filtered by its group) the exact total', async () => {
    const counted = await expectExact();
    expect(counted.bookings).toBeGreaterThanOrEqual(5);
    expect(counted.bookingsCancelled).toBeGreaterThanOrEqual(1);
    expect(counted.readyCycles).toBeGreaterThanOrEqual(1);
    expect(counted.cycles).toBeGreaterThan(counted.readyCycles);
  });

  it('stay exact after inserts of many rows in one statement and updates that move rows between groups', async () => {
    const before = await expectExact();
    const fermenter = (await createFermenter(ctx.db)).id;
    await insertBookings(
      fermenter,
      Array.from({ length: 40 }, (_, i) => now + 30 * DAY + i * 2 * DAY),
    ).execute(ctx.db);
    await sql`insert into audit_log (action, subject_type, subject_id) select 'created', 'Booking', g::text from generate_series(1, 25) g`.execute(ctx.db);
    const after = await expectExact();
    expect(after.bookings).toBe(before.bookings + 40);
    expect(after.auditOfBookings).toBe(before.auditOfBookings + 25);
    // Cancel ten, then a pass that changes other columns only (no row changes group).
    await sql`update booking set state = 'cancelled', cancelled_at = now(), cancelled_by = owner_id
              where id in (select id from booking where equipment_id = ${fermenter} order by starts_at limit 10)`.execute(ctx.db);
    await sql`update booking set notes = 'checked' where equipment_id = ${fermenter}`.execute(ctx.db);
    await sql`update audit_log set subject_type = 'Invoice' where subject_id in ('1', '2', '3') and action = 'created' and detail = '{}'`.execute(ctx.db);
    const moved = await expectExact();
    expect(moved.bookings).toBe(after.bookings - 10);
    expect(moved.bookingsCancelled).toBe(after.bookingsCancelled + 10);
    expect(moved.bookingsWithCancelled).toBe(after.bookingsWithCancelled);
    expect(moved.auditOfBookings).toBe(after.auditOfBookings - 3);
  });

  it('stay exact after deletes', async () => {
    const before = await expectExact();
    await sql`delete from booking where notes = 'checked' and state = 'cancelled'`.execute(ctx.db);
    await sql`delete from audit_log where subject_id in ('4', '5')`.execute(ctx.db);
    await sql`delete from sanitation_cycle where equipment_id = ${vessel} and outcome = 'ready'`.execute(ctx.db);
    const after = await expectExact();
    expect(after.bookingsCancelled).toBe(before.bookingsCancelled - 10);
    expect(after.audit).toBe(before.audit - 2);
    expect(after.readyCycles).toBe(before.readyCycles - 1);
  });

  it('leave no trace of a rolled-back transaction', async () => {
    const before = await expectExact();
    const fermenter = (await createFermenter(ctx.db)).id;
    await expect(
      ctx.db.transaction().execute(async (trx) => {
        await insertBookings(fermenter, [now + 600 * DAY, now + 602 * DAY]).execute(trx);
        await sql`insert into audit_log (action, subject_type) values ('created', 'Booking')`.execute(trx);
        await sql`delete from sanitation_cycle where equipment_id = ${vessel}`.execute(trx);
        throw new Error('changed my mind');
      }),
    ).rejects.toThrow('changed my mind');
    expect(await expectExact()).toEqual(before);
  });

  it('take writers on several connections at once without one waiting for another, and stay exact', async () => {
    const before = await expectExact();
    // Connections whose backends fall on different shards (process id modulo 64).
    const clients: pg.Client[] = [];
    const shards = new Set<number>();
    const spare: pg.Client[] = [];
    while (clients.length < 4) {
      const c = new pg.Client({ connectionString: ctx.databaseUrl });
      await c.connect();
      const shard = (await c.query<{ pid: number }>('select pg_backend_pid() as pid')).rows[0]!.pid % 64;
      if (shards.has(shard)) spare.push(c);
      else {
        shards.add(shard);
        clients.push(c);
      }
    }
    try {
      const fermenters: string[] = [];
      for (let i = 0; i < clients.length; i++) fermenters.push((await createFermenter(ctx.db)).id);
      // Every transaction writes before any commits: a writer that had to wait for another's row would hit the timeout.
      for (const [i, c] of clients.entries()) {
        await c.query('begin');
        await c.query(`set local lock_timeout = '5s'`);
        const q = insertBookings(fermenters[i]!, [now + 800 * DAY, now + 802 * DAY, now + 804 * DAY]).compile(ctx.db);
        await c.query(q.sql, [...q.parameters]);
        await c.query(`insert into audit_log (action, subject_type) select 'created', 'Booking' from generate_series(1, 7)`);
      }
      await Promise.all(clients.map((c, i) => c.query(i === 2 ? 'rollback' : 'commit')));
    } finally {
      await Promise.all([...clients, ...spare].map((c) => c.end()));
    }
    const after = await expectExact();
    expect(after.bookings).toBe(before.bookings + 3 * 3);
    expect(after.audit).toBe(before.audit + 3 * 7);
  });

  it('sum a few rows per table, whatever the groups asked for', async () => {
    expect(await keptCount(ctx.db, 'booking', { in: [] })).toBe(0);
    expect(await keptCount(ctx.db, 'booking', { notIn: [] })).toBe(await countWhere('booking'));
    expect(await keptCount(ctx.db, 'booking', { in: ['booked', 'in_use'] })).toBe(await countWhere('booking', sql`state in ('booked', 'in_use')`));
    const rows = await sql<{ n: number }>`select count(*)::int as n from row_count`.execute(ctx.db);
    expect(rows.rows[0]!.n).toBeLessThanOrEqual(64 * 8);
  });
});
