import { Migrator, sql, type Migration } from 'kysely';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createDb, type Database } from '../../backend/db/database.ts';
import { previewRun } from '../../backend/modules/billing/invoice-runs.service.ts';
import { coopTimeZone } from '../../backend/modules/settings/settings.service.ts';
import { productionRecords } from '../../backend/modules/batches/production-records.service.ts';
import { getBookingRules } from '../../backend/modules/settings/settings.service.ts';
import { cellarSection, memberSection } from '../../backend/modules/today/today.service.ts';
import { listMaintenance } from '../../backend/modules/equipment/inspections.service.ts';
import { addDays, nextPeriod, periodBounds } from '../../shared/billing/dates.ts';
import { demoCalendar, DESIGN_TODAY, seedToday } from '../../db/seeds/demo-calendar.ts';
import { runSeeds } from '../../db/seeds/index.ts';
import { withDatabase } from '../helpers/urls.ts';

// The demo co-op is seeded as of the day it is seeded. Whatever that day, it must keep its rules
// (no clashing bookings, kegs filled only when sanitized, books only for months that have ended)
// and give every role a Today with something to do. Each date gets a fresh database, seeded in turn.

const DAY = 86_400_000;
/** Days to seed on; one co-op keeps its books in a time zone that changes to summer time that weekend. */
const dates: { today: string; timeZone?: string }[] = [
  { today: DESIGN_TODAY },
  { today: '2027-01-31' },
  { today: '2027-12-31' },
  { today: '2028-02-29' },
  { today: '2029-03-29', timeZone: 'Europe/Berlin' },
  { today: '2031-07-15' },
];
// The migrations as `npm run migrate` runs them (loaded through Vite, as the rest of this file is).
const migrations = import.meta.glob<Migration>('../../db/migrations/*.ts', { eager: true });
const migrator = (db: Database) =>
  new Migrator({
    db,
    provider: {
      getMigrations: () => Promise.resolve(Object.fromEntries(Object.entries(migrations).map(([file, m]) => [file.split('/').pop()!.replace(/\.ts$/, ''), m]))),
    },
  });
const count = async (db: Database, query: ReturnType<typeof sql>) => Number(((await query.execute(db)).rows[0] as { n: string | number }).n);

describe('the demo calendar', () => {
  it('is the design itself on the design day', () => {
    const cal = demoCalendar(DESIGN_TODAY);
    expect(cal.shiftDays).toBe(0);
    expect(cal.now.toISOString()).toBe('2026-12-01T08:00:00.000Z');
    expect(cal.at('2026-11-16T17:00:00Z').toISOString()).toBe('2026-11-16T17:00:00.000Z');
    expect(cal.date('2030-06-30')).toBe('2030-06-30');
    expect(cal.period('2026-09')).toBe('2026-09');
    expect(cal.monthDate('2026-10-15')).toBe('2026-10-15');
    expect(cal.lastDayOf('2026-11')).toBe('2026-11-30');
  });

  it('moves instants by whole days and the books by whole months', () => {
    const cal = demoCalendar('2028-02-29');
    expect(cal.shiftDays).toBe(455);
    expect(cal.now.toISOString()).toBe('2028-02-29T08:00:00.000Z');
    expect(cal.at('2026-11-30T10:00:00Z').toISOString()).toBe('2028-02-28T10:00:00.000Z');
    expect(cal.period('2026-09')).toBe('2027-11');
    expect(cal.period('2027-01')).toBe('2028-03');
    expect(cal.monthDate('2026-01-01')).toBe('2027-03-01');
    // The design's 31 October falls on the last day of a shorter month.
    expect(demoCalendar('2027-05-10').monthDate('2026-10-31')).toBe('2027-03-31');
    expect(demoCalendar('2027-06-10').monthDate('2026-10-31')).toBe('2027-04-30');
    expect(cal.lastDayOf('2026-11')).toBe('2028-01-31');
  });

  it('refuses a day that is not a date', () => {
    expect(() => demoCalendar('2027-02-29')).toThrow(/YYYY-MM-DD/);
    expect(() => demoCalendar('1 March 2027')).toThrow(/YYYY-MM-DD/);
  });
});

describe.skipIf(!inject('adminUrl'))('the demo seeded on a given day', () => {
  for (const { today, timeZone } of dates) {
    describe(`as of ${today}${timeZone ? ` in ${timeZone}` : ''}`, () => {
      const cal = demoCalendar(today);
      const now = cal.now;
      const name = `${inject('dbPrefix')}demo_${today.replaceAll('-', '')}`;
      let db: Database;

      beforeAll(async () => {
        const admin = new pg.Client({ connectionString: inject('adminUrl') });
        await admin.connect();
        await admin.query(`drop database if exists ${name}`);
        await admin.query(`create database ${name}`);
        await admin.end();
        db = createDb(withDatabase(inject('adminUrl'), name), 2).db;
        const { error } = await migrator(db).migrateToLatest();
        if (error) throw error as Error;
        if (timeZone) {
          const rules = await getBookingRules(db);
          await db
            .updateTable('setting')
            .set({ value: JSON.stringify({ ...rules, timeZone }) })
            .where('key', '=', 'booking_rules')
            .execute();
        }
        const ran = await runSeeds(db, { today });
        expect(ran).toContain('0006_billing');
      }, 240_000);

      afterAll(async () => {
        await db?.destroy();
        const admin = new pg.Client({ connectionString: inject('adminUrl') });
        await admin.connect();
        await admin.query(`drop database if exists ${name} with (force)`);
        await admin.end();
      });

      it("is seeded as of SEED_TODAY when set, and otherwise as of the date in the co-op's time zone", async () => {
        expect(await seedToday(db, { SEED_TODAY: today }, new Date('2020-01-01T12:00:00Z'))).toBe(today);
        const lateEvening = new Date(`${addDays(today, -1)}T23:30:00Z`);
        expect(await seedToday(db, {}, lateEvening)).toBe(timeZone === 'Europe/Berlin' ? today : addDays(today, -1));
        expect((await getBookingRules(db)).timeZone).toBe(timeZone ?? 'UTC');
      });

      it('books no item twice, cleaning buffer included', async () => {
        expect(await count(db, sql`select count(*) as n from booking`)).toBeGreaterThan(100);
        const clashes = await count(
          db,
          sql`select count(*) as n from booking a join booking b on b.equipment_id = a.equipment_id and a.id < b.id
              where a.state <> 'cancelled' and b.state <> 'cancelled'
                and tstzrange(a.starts_at, a.blocked_until) && tstzrange(b.starts_at, b.blocked_until)`,
        );
        expect(clashes).toBe(0);
      });

      it('fills a keg only after a complete cycle of that keg made it ready and fresh, but for the two lapses the audit is meant to flag', async () => {
        const { rows } = await sql<{ code: string; filled_at: Date; cycle_id: string | null; fresh_until: Date | null; first_fill: boolean }>`
          select e.code, f.filled_at, f.sanitation_cycle_id as cycle_id, c.fresh_until,
                 not exists (select 1 from keg_fill g where g.keg_id = f.keg_id and g.filled_at < f.filled_at) as first_fill
          from keg_fill f
          join equipment e on e.id = f.keg_id
          left join sanitation_cycle c on c.id = f.sanitation_cycle_id
          where not (c.equipment_id is not distinct from f.keg_id and c.complete and c.outcome = 'ready'
                     and c.completed_at <= f.filled_at and c.fresh_until >= f.filled_at)`.execute(db);
        expect(await count(db, sql`select count(*) as n from keg_fill`)).toBeGreaterThan(50);
        // K-017's commissioning clean was kept on paper only; one keg was filled after its window had lapsed.
        expect(rows).toHaveLength(2);
        const unrecorded = rows.find((r) => r.cycle_id === null);
        expect(unrecorded).toMatchObject({ code: 'K-017', first_fill: true });
        const lapsed = rows.find((r) => r.cycle_id !== null)!;
        expect(lapsed.fresh_until!.getTime()).toBeLessThan(lapsed.filled_at.getTime());
      });

      it('bills only months that have ended, the two before last, and leaves the last one to run', async () => {
        const periods = (await db.selectFrom('invoice').select('period').distinct().orderBy('period').execute()).map((r) => r.period);
        expect(periods).toEqual([cal.period('2026-09'), cal.period('2026-10')]);
        for (const p of periods) expect(periodBounds(p).next <= today).toBe(true);
        const issued = await db.selectFrom('invoice').select(['period', 'issued_on']).distinct().execute();
        for (const i of issued) expect(i.issued_on).toBe(periodBounds(i.period).next);
        const lastEnded = cal.period('2026-11');
        expect(periodBounds(lastEnded).next <= today).toBe(true);
        expect(periodBounds(nextPeriod(lastEnded)).next > today).toBe(true);
        const preview = await previewRun(db, lastEnded, { today });
        expect(preview.canRun).toBe(true);
        expect(preview.invoices.length).toBeGreaterThan(10);
      });

      it('keeps every invoice equal to its lines, and never takes more than is due', async () => {
        const bad = await count(
          db,
          sql`select count(*) as n from invoice i
              left join (select invoice_id, sum(amount_cents) as amount, sum(tax_cents) as tax from invoice_line group by invoice_id) l on l.invoice_id = i.id
              where i.subtotal_cents <> coalesce(l.amount, 0) or i.tax_cents <> coalesce(l.tax, 0)
                 or i.total_cents <> coalesce(l.amount, 0) + coalesce(l.tax, 0)`,
        );
        expect(bad).toBe(0);
        const over = await count(db, sql`select count(*) as n from invoice where status <> 'void' and paid_cents + credited_cents > total_cents`);
        expect(over).toBe(0);
        expect(await count(db, sql`select count(*) as n from invoice where status = 'paid'`)).toBeGreaterThan(0);
        expect(await count(db, sql`select count(*) as n from invoice where status = 'void'`)).toBe(1);
      });

      it('gives the treasurer unpaid invoices of recent months', async () => {
        const unpaid = await count(
          db,
          sql`select count(*) as n from invoice where status = 'issued' and total_cents - paid_cents - credited_cents > 0
              and issued_on >= ${addDays(today, -92)}::date and issued_on <= ${today}::date`,
        );
        expect(unpaid).toBeGreaterThan(0);
      });

      it('has bookings in use and coming up, and the demo member has both and a batch fermenting now', async () => {
        const current = await count(db, sql`select count(*) as n from booking where state in ('in_use', 'booked') and ends_at > ${now}`);
        expect(current).toBeGreaterThan(0);
        const soon = await count(
          db,
          sql`select count(*) as n from booking where state = 'booked' and starts_at > ${now} and starts_at <= ${new Date(now.getTime() + 30 * DAY)}`,
        );
        expect(soon).toBeGreaterThan(0);
        const inUse = await count(db, sql`select count(*) as n from booking where state = 'in_use' and (starts_at > ${now} or ends_at <= ${now})`);
        expect(inUse).toBe(0);
        const fermenting = await count(
          db,
          sql`select count(*) as n from batch b where b.status = 'fermenting'
              and exists (select 1 from reading r where r.batch_id = b.id and r.taken_at > ${new Date(now.getTime() - 3 * DAY)} and r.taken_at <= ${now})`,
        );
        expect(fermenting).toBeGreaterThan(0);

        const member = await db.selectFrom('app_user').select('id').where('email', '=', 'member@example.org').executeTakeFirstOrThrow();
        const section = await memberSection(db, member.id, now);
        expect(section.bookings.some((b) => new Date(b.startsAt) <= now && b.state === 'in_use')).toBe(true);
        expect(section.bookings.some((b) => new Date(b.startsAt) > now && new Date(b.startsAt).getTime() <= now.getTime() + 30 * DAY)).toBe(true);
        const own = section.batches.find((b) => b.status === 'fermenting');
        expect(own?.latestAt).toBeTruthy();
        expect(now.getTime() - new Date(own!.latestAt!).getTime()).toBeLessThan(3 * DAY);
      });

      it('shows the brewer a keg past its pressure test and a cylinder past its test date, and neither is in use', async () => {
        const due = await listMaintenance(db, { page: 1, pageSize: 50, sort: 'dueAt', order: 'asc', q: undefined, status: 'overdue' }, now);
        const keg = due.items.find((i) => i.equipment.kind === 'keg' && i.kind === 'pressure_test');
        const cylinder = due.items.find((i) => i.equipment.code === 'C-6' && i.kind === 'hydrostatic_test');
        expect(keg).toBeTruthy();
        expect(cylinder).toBeTruthy();
        expect(keg!.equipment.state).not.toBe('holding');
        expect(due.items.every((i) => i.equipment.code !== 'C-1')).toBe(true);
        const line = await db.selectFrom('co2_cylinder_supply').select('cylinder_id').where('connected', '=', true).execute();
        expect(line).toHaveLength(1);
      });

      it('gives the brewer vessels to clean, transfers due and overdue kegs', async () => {
        const section = await cellarSection(db, new Date(now.getTime() + 2 * 3_600_000), true);
        expect(section.needsCleaning.items.some((i) => i.state === 'needs_cleaning')).toBe(true);
        expect(section.transfersDue.length).toBeGreaterThan(0);
        // A transfer is due on the day itself (a fermenter's booking ends within the three days the
        // Today screen looks ahead), and more come up within the week.
        const transfers = await count(
          db,
          sql`select count(*) as n from booking b join equipment e on e.id = b.equipment_id join batch t on t.id = b.batch_id
              where e.kind = 'fermenter' and b.state = 'in_use' and t.status in ('fermenting', 'conditioning')
                and b.ends_at > ${now} and b.ends_at < ${new Date(now.getTime() + 7 * DAY)}`,
        );
        expect(transfers).toBeGreaterThan(0);
        const tomorrow = await cellarSection(db, new Date(now.getTime() + 2 * DAY), true);
        expect(tomorrow.transfersDue.length).toBeGreaterThan(0);
        expect(section.overdueKegs.total).toBeGreaterThan(0);
        const overdue = await count(
          db,
          sql`select count(*) as n from keg_whereabouts where whereabouts = 'with_member' and member_id is not null and due_at < ${`${today}T00:00:00Z`}::timestamptz`,
        );
        expect(overdue).toBeGreaterThan(0);
      });

      it('has a batch fined with gelatin out with a member and on a tap, near its best-before on Today', async () => {
        const kegs = await db
          .selectFrom('keg_fill as kf')
          .innerJoin('transfer as t', 't.id', 'kf.transfer_id')
          .innerJoin('keg_whereabouts as kw', 'kw.keg_id', 'kf.keg_id')
          .select(['kf.batch_id', 'kw.whereabouts', 'kw.tap_id', 'kf.best_before'])
          .where('t.finings_kind', '=', 'gelatin')
          .where('kf.emptied_at', 'is', null)
          .execute();
        const batchIds = [...new Set(kegs.map((k) => k.batch_id))];
        const both = batchIds.filter(
          (id) => kegs.some((k) => k.batch_id === id && k.whereabouts === 'with_member') && kegs.some((k) => k.batch_id === id && k.tap_id),
        );
        expect(both.length).toBeGreaterThan(0);
        expect(await count(db, sql`select count(*) as n from keg_fill where best_before is null`)).toBe(0);
        const section = await cellarSection(db, now, true);
        expect(section.bestBefore.items.some((i) => both.includes(i.batchId))).toBe(true);
      });

      it('records nothing after its today (only plans lie ahead)', async () => {
        const after = async (table: string, column: string) => count(db, sql`select count(*) as n from ${sql.table(table)} where ${sql.ref(column)} > ${now}`);
        for (const [table, column] of [
          ['reading', 'taken_at'],
          ['transfer', 'transferred_at'],
          ['sanitation_cycle', 'completed_at'],
          ['sanitation_step', 'at'],
          ['keg_fill', 'filled_at'],
          ['keg_movement', 'at'],
          ['equipment_state_change', 'at'],
          ['invoice_run', 'created_at'],
        ] as const) {
          expect(await after(table, column), `${table}.${column} after ${now.toISOString()}`).toBe(0);
        }
        for (const [table, column] of [
          ['payment', 'received_on'],
          ['credit_note', 'issued_on'],
          ['invoice', 'issued_on'],
        ] as const) {
          expect(await count(db, sql`select count(*) as n from ${sql.table(table)} where ${sql.ref(column)} > ${today}::date`), `${table}.${column}`).toBe(0);
        }
        // The history reaches back about three months, and its users and registry before it.
        const first = await db
          .selectFrom('booking')
          .select((eb) => eb.fn.min('starts_at').as('first'))
          .executeTakeFirstOrThrow();
        expect((now.getTime() - new Date(first.first).getTime()) / DAY).toBeGreaterThan(80);
      });

      it('accounts for every litre in the monthly production report, and records transfer times that end at the transfer', async () => {
        const report = await productionRecords(db, { timeZone: await coopTimeZone(db), now });
        expect(report.monthly.length).toBe(12); // the twelve months up to this one
        for (const m of report.monthly) expect(m.balanceLiters, m.month).toBe(0);
        expect(report.monthly.some((m) => m.producedLiters > 0 && m.removals.totalLiters > 0 && m.closing.totalLiters > 0)).toBe(true);
        const odd = await count(db, sql`select count(*) as n from transfer where started_at is null or ended_at <> transferred_at or ended_at <= started_at`);
        expect(odd).toBe(0);
      });
    });
  }
});
