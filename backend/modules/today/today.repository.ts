import { sql } from 'kysely';
import type { Database } from '../../db/database.ts';
import { batchesWithLastReading } from '../batches/batches.repository.ts';
import { bookingSummaryColumns, bookingWithVessel } from '../calendar/calendar-feed.repository.ts';
import { effectiveStateSql } from '../equipment/vessel-state.ts';
import { kegFillsWithWhereabouts } from '../kegs/keg-fills.repository.ts';

/** A member's bookings still to come or running, soonest first. */
export async function memberBookingRows(db: Database, memberId: string, now: Date) {
  return bookingWithVessel(db)
    .select(bookingSummaryColumns)
    .where('booking.owner_id', '=', memberId)
    .where('booking.state', 'in', ['booked', 'in_use'])
    .where('booking.ends_at', '>', now)
    .orderBy('booking.starts_at')
    .limit(8)
    .execute();
}

/** A member's batches not yet packaged, newest first, each with its latest reading. */
export async function memberBatchRows(db: Database, memberId: string) {
  return batchesWithLastReading(db)
    .select(['batch.id', 'batch.name', 'batch.style', 'batch.status', 'last_reading.gravity_sg', 'last_reading.taken_at'])
    .where('batch.owner_id', '=', memberId)
    .where('batch.status', 'in', ['planned', 'fermenting', 'conditioning'])
    .orderBy('batch.created_at', 'desc')
    .limit(8)
    .execute();
}

/** Kegs out with a member, due soonest first. */
export async function memberKegRows(db: Database, memberId: string) {
  return db
    .selectFrom('keg_whereabouts')
    .innerJoin('equipment', 'equipment.id', 'keg_whereabouts.keg_id')
    .select(['equipment.id', 'equipment.code', 'keg_whereabouts.due_at'])
    .where('keg_whereabouts.member_id', '=', memberId)
    .where('keg_whereabouts.whereabouts', '=', 'with_member')
    .orderBy('keg_whereabouts.due_at')
    .orderBy('equipment.code')
    .execute();
}

/**
 * Fermenters and kegs whose state (a lapsed freshness window read as needs_cleaning) says they
 * need cleaning, unless a complete cycle ended after their last use and is still fresh (clean and
 * sanitized since; the state will catch up): the count, and the ten needed soonest.
 */
export async function vesselsToClean(db: Database, now: Date) {
  const state = effectiveStateSql(sql.ref('equipment.id'), sql.ref('equipment.state'), now);
  const nextBooking = sql<Date | null>`(select min(b.starts_at) from booking b
    where b.equipment_id = equipment.id and b.state = 'booked' and b.starts_at > ${now})`;
  const lastUse = sql<Date | null>`(select max(sc.at) from equipment_state_change sc
    where sc.equipment_id = equipment.id and sc.to_state = 'needs_cleaning')`;
  const dirty = db
    .selectFrom('equipment')
    .where(state, 'in', ['needs_cleaning', 'cleaned'])
    .where('equipment.kind', 'in', ['fermenter', 'keg'])
    .where(
      sql<boolean>`not exists (select 1 from sanitation_cycle c where c.equipment_id = equipment.id and c.complete
        and c.fresh_until > ${now} and c.completed_at >= coalesce(${lastUse}, '-infinity'::timestamptz))`,
    );
  const [{ n }, items] = await Promise.all([
    dirty.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    dirty
      .select(['equipment.id', 'equipment.code', 'equipment.name', state.as('state'), nextBooking.as('next_booking_at')])
      .orderBy(sql`next_booking_at`, (ob) => ob.asc().nullsLast())
      .orderBy('equipment.code')
      .limit(10)
      .execute(),
  ]);
  return { total: n, items };
}

/** Kegs out with members past their due time: the count, and the ten overdue longest. */
export async function overdueKegs(db: Database, now: Date) {
  const overdue = db
    .selectFrom('keg_whereabouts')
    .innerJoin('equipment', 'equipment.id', 'keg_whereabouts.keg_id')
    .leftJoin('app_user', 'app_user.id', 'keg_whereabouts.member_id')
    .where('keg_whereabouts.whereabouts', '=', 'with_member')
    .where('keg_whereabouts.due_at', '<', now);
  const [{ n }, items] = await Promise.all([
    overdue.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    overdue.select(['equipment.id', 'equipment.code', 'app_user.name', 'keg_whereabouts.due_at']).orderBy('keg_whereabouts.due_at').limit(10).execute(),
  ]);
  return { total: n, items };
}

/** Batches in a fermenter whose booking ends before `soon`: the beer must be out by then. */
export async function transfersDueRows(db: Database, soon: Date) {
  return bookingWithVessel(db)
    .innerJoin('batch', 'batch.id', 'booking.batch_id')
    .innerJoin('app_user', 'app_user.id', 'batch.owner_id')
    .select(['batch.id', 'batch.name', 'app_user.name as owner_name', 'equipment.id as fermenter_id', 'equipment.code', 'booking.ends_at'])
    .where('equipment.kind', '=', 'fermenter')
    .where('batch.status', 'in', ['fermenting', 'conditioning'])
    .where('booking.state', 'in', ['booked', 'in_use'])
    .where('booking.ends_at', '<', soon)
    .orderBy('booking.ends_at')
    .limit(10)
    .execute();
}

/** Bookings of fermenters and kegs that start in [now, until), with the vessel's state now. */
export async function handoverRows(db: Database, now: Date, until: Date) {
  const state = effectiveStateSql(sql.ref('equipment.id'), sql.ref('equipment.state'), now);
  return bookingWithVessel(db)
    .select(['booking.id', 'equipment.id as equipment_id', 'equipment.code', 'booking.starts_at', state.as('state')])
    .where('booking.state', '=', 'booked')
    .where('booking.starts_at', '>=', now)
    .where('booking.starts_at', '<', until)
    .where('equipment.kind', 'in', ['fermenter', 'keg'])
    .orderBy('booking.starts_at')
    .limit(20)
    .execute();
}

/** Kegs still holding beer with a best-before up to `until` (of one member's kegs out, when given): the count, and the first `limit` by best-before. */
export async function bestBeforeRows(db: Database, until: Date, o: { memberId?: string | undefined; limit: number }) {
  let base = kegFillsWithWhereabouts(db).innerJoin('batch as b', 'b.id', 'kf.batch_id').where('kf.emptied_at', 'is', null).where('kf.best_before', '<=', until);
  if (o.memberId) base = base.where('kw.member_id', '=', o.memberId).where('kw.whereabouts', '=', 'with_member');
  const [{ n }, items] = await Promise.all([
    base.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    base
      .select([
        'e.id',
        'e.code',
        'b.id as batch_id',
        'b.name as batch_name',
        'kf.best_before',
        sql<string>`coalesce(kw.whereabouts, 'cellar')`.as('whereabouts'),
        'tap.code as tap_code',
        'm.name as member_name',
      ])
      .orderBy('kf.best_before')
      .orderBy('e.code')
      .limit(o.limit)
      .execute(),
  ]);
  return { total: n, items };
}
