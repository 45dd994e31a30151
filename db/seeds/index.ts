import { sql } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import * as users from './0001_users.ts';
import * as equipment from './0002_equipment.ts';
import * as bookings from './0003_bookings.ts';
import * as batches from './0004_batches.ts';
import * as cellar from './0005_cellar.ts';
import * as billing from './0006_billing.ts';
import * as trace from './0007_trace.ts';
import * as inspections from './0008_inspections.ts';
import { demoCalendar, seedToday, type DemoCalendar } from './demo-calendar.ts';

/** Seeds in the order they run; each later capability appends its own. */
export const seeds: { name: string; seed: (db: Database, calendar: DemoCalendar) => Promise<void> }[] = [
  { name: '0001_users', seed: users.seed },
  { name: '0002_equipment', seed: equipment.seed },
  { name: '0003_bookings', seed: bookings.seed },
  { name: '0004_batches', seed: batches.seed },
  { name: '0005_cellar', seed: cellar.seed },
  { name: '0007_trace', seed: trace.seed },
  { name: '0008_inspections', seed: inspections.seed },
  // Billing reads every other capability's records: it stays last.
  { name: '0006_billing', seed: billing.seed },
];

/**
 * Seeds the demo co-op as of `today` ('YYYY-MM-DD'; by default SEED_TODAY, or the real date in the
 * co-op's time zone). Each seed runs once per database, so a later run never moves the demo.
 */
export async function runSeeds(db: Database, opts: { today?: string } = {}): Promise<string[]> {
  const ran: string[] = [];
  let calendar: DemoCalendar | undefined;
  for (const s of seeds) {
    const done = await db.transaction().execute(async (trx) => {
      // One seeder at a time, even with several instances starting together.
      await sql`select pg_advisory_xact_lock(7201)`.execute(trx);
      const row = await trx.selectFrom('seed_run').select('name').where('name', '=', s.name).executeTakeFirst();
      if (row) return false;
      calendar ??= demoCalendar(opts.today ?? (await seedToday(trx)));
      await s.seed(trx, calendar);
      await trx.insertInto('seed_run').values({ name: s.name }).execute();
      return true;
    });
    if (done) ran.push(s.name);
  }
  return ran;
}
