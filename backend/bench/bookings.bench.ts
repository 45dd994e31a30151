// Bookings and labels: how fast the booking transaction runs (item row locked, owner row locked,
// rules, clash check, insert under the exclusion constraint), how it behaves when 40 requests
// race for one slot, how long a month of the calendar takes to read, and how long a QR label
// sheet for the whole cellar takes to render. Prints figures; not a test.
import { systemClock } from '../lib/clock.ts';
import { defineAbilityFor } from '../../shared/permissions/ability.ts';
import { createBooking, listBookings } from '../modules/bookings/bookings.service.ts';
import { equipmentByIds } from '../modules/equipment/equipment.service.ts';
import { renderLabelSheet } from '../modules/equipment/labels-pdf.service.ts';
import { coopProfile } from '../modules/settings/settings.service.ts';
import { bookingListQuerySchema } from '../../shared/schemas/booking.ts';
import { benchDatabase, peakRssMiB } from './bench-db.ts';

const SEQUENTIAL = Number(process.env.BENCH_BOOKINGS ?? 400);
const ROUNDS = Number(process.env.BENCH_BOOKING_ROUNDS ?? 10);
const DAY = 24 * 3600_000;

const bench = await benchDatabase('bookings');
try {
  const { db } = bench;
  const admin = await db.selectFrom('app_user').select(['id', 'roles']).where('email', '=', 'admin@example.org').executeTakeFirstOrThrow();
  const viewer = { id: admin.id, ability: defineAbilityFor({ id: admin.id, roles: admin.roles }) };
  const members = (await db.selectFrom('app_user').select('id').where('email', 'like', 'member%').orderBy('email').execute()).map((m) => m.id);
  const kegs = (await db.selectFrom('equipment').select('id').where('kind', '=', 'keg').where('state', '<>', 'out_of_service').orderBy('code').execute()).map(
    (k) => k.id,
  );
  const fermenters = (
    await db.selectFrom('equipment').select('id').where('kind', '=', 'fermenter').where('state', '<>', 'out_of_service').orderBy('code').execute()
  ).map((f) => f.id);
  // Lift the per-member limit so that only the clock and the constraint decide.
  await db
    .updateTable('setting')
    .set({
      value: JSON.stringify({
        cleaningBufferHours: 24,
        maxDays: { fermenter: 35, keg: 56, tap: 42, co2_cylinder: 56 },
        maxAdvanceDays: 90,
        maxActiveBookingsPerMember: 200,
        timeZone: 'UTC',
      }),
    })
    .where('key', '=', 'booking_rules')
    .execute();

  // Far enough ahead that the demo's bookings are over, within the 90 days one may book ahead.
  const base = new Date(Date.now() + 60 * DAY);
  base.setUTCHours(10, 0, 0, 0);

  // 1. One after another: each keg gets short bookings, two days apart (one day of use, one of buffer).
  let made = 0;
  let t0 = performance.now();
  for (let i = 0; i < SEQUENTIAL; i++) {
    const keg = kegs[i % kegs.length]!;
    const slot = Math.floor(i / kegs.length);
    const startsAt = new Date(base.getTime() + slot * 2 * DAY);
    const endsAt = new Date(startsAt.getTime() + DAY - 3600_000);
    await createBooking(
      db,
      { equipmentId: keg, startsAt: startsAt.toISOString(), endsAt: endsAt.toISOString(), ownerId: members[i % members.length]! },
      viewer,
      systemClock.now(),
    );
    made++;
  }
  const sequentialMs = performance.now() - t0;

  // 2. Contention: 40 requests for one fermenter slot at once, ROUNDS times (a new slot each round).
  const raceMs: number[] = [];
  let winners = 0;
  let conflicts = 0;
  for (let r = 0; r < ROUNDS; r++) {
    const startsAt = new Date(base.getTime() + r * 3 * DAY);
    const endsAt = new Date(startsAt.getTime() + 2 * DAY);
    const equipmentId = fermenters[r % fermenters.length]!;
    t0 = performance.now();
    const results = await Promise.allSettled(
      Array.from({ length: 40 }, (_, i) =>
        createBooking(
          db,
          { equipmentId, startsAt: startsAt.toISOString(), endsAt: endsAt.toISOString(), ownerId: members[i % members.length]! },
          viewer,
          systemClock.now(),
        ),
      ),
    );
    raceMs.push(performance.now() - t0);
    winners += results.filter((x) => x.status === 'fulfilled').length;
    conflicts += results.filter((x) => x.status === 'rejected' && (x.reason as { status?: number }).status === 409).length;
  }

  // 3. The calendar's read: every keg booking overlapping a month, page by page.
  const from = new Date(Date.now() - 15 * DAY).toISOString();
  const to = new Date(Date.now() + 75 * DAY).toISOString();
  t0 = performance.now();
  let rows = 0;
  const reads = 20;
  for (let i = 0; i < reads; i++) {
    for (let page = 1; ; page++) {
      const res = await listBookings(db, bookingListQuerySchema.parse({ from, to, kind: 'keg', page, pageSize: 100 }), viewer);
      rows += res.items.length;
      if (page * 100 >= res.total) break;
    }
  }
  const calendarMs = (performance.now() - t0) / reads;

  // 4. A label sheet for every item in the cellar.
  const all = await equipmentByIds(
    db,
    (await db.selectFrom('equipment').select('id').execute()).map((e) => e.id),
    systemClock.now(),
  );
  await renderLabelSheet(all.slice(0, 3), 'http://127.0.0.1:3000', await coopProfile(db)); // warm-up: font load
  t0 = performance.now();
  const pdf = await renderLabelSheet(all, 'http://127.0.0.1:3000', await coopProfile(db));
  const labelsMs = performance.now() - t0;

  const sorted = [...raceMs].sort((a, b) => a - b);
  console.log(
    `  ${made} bookings one after another: ${(sequentialMs / 1000).toFixed(2)} s, ${(sequentialMs / made).toFixed(1)} ms each, ${Math.round((made * 1000) / sequentialMs)} bookings/s`,
  );
  console.log(
    `  40 at once for one slot, ${ROUNDS} rounds: ${winners} booked, ${conflicts} answered 409; median ${sorted[Math.floor(sorted.length / 2)]!.toFixed(0)} ms, worst ${sorted.at(-1)!.toFixed(0)} ms a round`,
  );
  console.log(
    `  calendar read (kegs over ${Math.round((Date.parse(to) - Date.parse(from)) / DAY)} days, ${rows / reads} bookings): ${calendarMs.toFixed(1)} ms`,
  );
  console.log(
    `  label sheet for all ${all.length} items (${Math.ceil(all.length / 24)} A4 pages, ${(pdf.length / 1024).toFixed(0)} KiB): ${labelsMs.toFixed(0)} ms`,
  );
  console.log(`  peak memory ${peakRssMiB()} MiB`);
} finally {
  await bench.drop();
}
