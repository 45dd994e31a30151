import { sql } from 'kysely';
import type { TodayCellarSection, TodayMemberSection } from '../../../shared/schemas/today.ts';
import type { Database } from '../../db/database.ts';
import { effectiveStateSql } from '../equipment/vessel-state.ts';
import { bestBeforeKegs } from './best-before.ts';

const DAY = 24 * 3600_000;

/** A member's own bookings, batches, kegs out with them; balance is added by the caller when allowed. */
export async function memberSection(db: Database, memberId: string, now: Date): Promise<Omit<TodayMemberSection, 'balance'>> {
  const [bookings, batches, kegs] = await Promise.all([
    db
      .selectFrom('booking')
      .innerJoin('equipment', 'equipment.id', 'booking.equipment_id')
      .select(['booking.id', 'booking.equipment_id', 'equipment.code', 'equipment.name', 'booking.starts_at', 'booking.ends_at', 'booking.state'])
      .where('booking.owner_id', '=', memberId)
      .where('booking.state', 'in', ['booked', 'in_use'])
      .where('booking.ends_at', '>', now)
      .orderBy('booking.starts_at')
      .limit(8)
      .execute(),
    db
      .selectFrom('batch')
      .leftJoinLateral(
        (eb) =>
          eb
            .selectFrom('reading')
            .select(['reading.gravity_sg', 'reading.taken_at'])
            .whereRef('reading.batch_id', '=', 'batch.id')
            .orderBy('reading.taken_at', 'desc')
            .limit(1)
            .as('latest'),
        (join) => join.onTrue(),
      )
      .select(['batch.id', 'batch.name', 'batch.style', 'batch.status', 'latest.gravity_sg', 'latest.taken_at'])
      .where('batch.owner_id', '=', memberId)
      .where('batch.status', 'in', ['planned', 'fermenting', 'conditioning'])
      .orderBy('batch.created_at', 'desc')
      .limit(8)
      .execute(),
    db
      .selectFrom('keg_whereabouts')
      .innerJoin('equipment', 'equipment.id', 'keg_whereabouts.keg_id')
      .select(['equipment.id', 'equipment.code', 'keg_whereabouts.due_at'])
      .where('keg_whereabouts.member_id', '=', memberId)
      .where('keg_whereabouts.whereabouts', '=', 'with_member')
      .orderBy('keg_whereabouts.due_at')
      .orderBy('equipment.code')
      .execute(),
  ]);
  const bestBefore = await bestBeforeKegs(db, now, { memberId, showOwners: true });
  return {
    bestBefore,
    bookings: bookings.map((b) => ({
      id: b.id,
      equipmentId: b.equipment_id,
      equipmentCode: b.code,
      equipmentName: b.name,
      startsAt: new Date(b.starts_at).toISOString(),
      endsAt: new Date(b.ends_at).toISOString(),
      state: b.state,
    })),
    batches: batches.map((b) => ({
      id: b.id,
      name: b.name,
      style: b.style,
      status: b.status,
      latestSg: b.gravity_sg ?? null,
      latestAt: b.taken_at ? new Date(b.taken_at).toISOString() : null,
    })),
    kegs: kegs.map((k) => ({
      id: k.id,
      code: k.code,
      dueAt: k.due_at ? new Date(k.due_at).toISOString() : null,
      overdue: k.due_at ? new Date(k.due_at) < now : false,
    })),
  };
}

/** The brewer-on-duty's round: vessels to clean (soonest needed first), overdue kegs, transfers due, hand-overs. */
export async function cellarSection(db: Database, now: Date, showOwners: boolean): Promise<TodayCellarSection> {
  const soon = new Date(now.getTime() + 3 * DAY);
  const tomorrow = new Date(now.getTime() + DAY);
  const nextBooking = sql<Date | null>`(select min(b.starts_at) from booking b
    where b.equipment_id = equipment.id and b.state = 'booked' and b.starts_at > ${now})`;
  // One query for the count and the list: a vessel whose state (a lapsed freshness window read as
  // needs_cleaning) says it needs cleaning, unless a complete cycle ended after its last use and is
  // still fresh (it is clean and sanitized since; the state will catch up).
  const state = effectiveStateSql(sql.ref('equipment.id'), sql.ref('equipment.state'), now);
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
  const overdue = db
    .selectFrom('keg_whereabouts')
    .innerJoin('equipment', 'equipment.id', 'keg_whereabouts.keg_id')
    .leftJoin('app_user', 'app_user.id', 'keg_whereabouts.member_id')
    .where('keg_whereabouts.whereabouts', '=', 'with_member')
    .where('keg_whereabouts.due_at', '<', now);
  const [dirtyTotal, dirtyItems, overdueTotal, overdueItems, transfers, handovers] = await Promise.all([
    dirty.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    dirty
      .select(['equipment.id', 'equipment.code', 'equipment.name', state.as('state'), nextBooking.as('next_booking_at')])
      .orderBy(sql`next_booking_at`, (ob) => ob.asc().nullsLast())
      .orderBy('equipment.code')
      .limit(10)
      .execute(),
    overdue.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    overdue.select(['equipment.id', 'equipment.code', 'app_user.name', 'keg_whereabouts.due_at']).orderBy('keg_whereabouts.due_at').limit(10).execute(),
    // Beer must be out of a fermenter before its booking ends.
    db
      .selectFrom('batch')
      .innerJoin('booking', 'booking.batch_id', 'batch.id')
      .innerJoin('equipment', 'equipment.id', 'booking.equipment_id')
      .innerJoin('app_user', 'app_user.id', 'batch.owner_id')
      .select(['batch.id', 'batch.name', 'app_user.name as owner_name', 'equipment.id as fermenter_id', 'equipment.code', 'booking.ends_at'])
      .where('equipment.kind', '=', 'fermenter')
      .where('batch.status', 'in', ['fermenting', 'conditioning'])
      .where('booking.state', 'in', ['booked', 'in_use'])
      .where('booking.ends_at', '<', soon)
      .orderBy('booking.ends_at')
      .limit(10)
      .execute(),
    // Bookings that start within a day: the vessel must be ready for its next user.
    db
      .selectFrom('booking')
      .innerJoin('equipment', 'equipment.id', 'booking.equipment_id')
      .select(['booking.id', 'equipment.id as equipment_id', 'equipment.code', 'booking.starts_at', state.as('state')])
      .where('booking.state', '=', 'booked')
      .where('booking.starts_at', '>=', now)
      .where('booking.starts_at', '<', tomorrow)
      .where('equipment.kind', 'in', ['fermenter', 'keg'])
      .orderBy('booking.starts_at')
      .limit(20)
      .execute(),
  ]);
  const bestBefore = await bestBeforeKegs(db, now, { showOwners });
  return {
    bestBefore,
    needsCleaning: {
      total: dirtyTotal.n,
      items: dirtyItems.map((e) => ({
        id: e.id,
        code: e.code,
        name: e.name,
        state: e.state,
        nextBookingAt: e.next_booking_at ? new Date(e.next_booking_at).toISOString() : null,
      })),
    },
    overdueKegs: {
      total: overdueTotal.n,
      items: overdueItems.map((k) => ({ id: k.id, code: k.code, memberName: showOwners ? (k.name ?? null) : null, dueAt: new Date(k.due_at!).toISOString() })),
    },
    transfersDue: transfers.map((t) => ({
      batchId: t.id,
      batchName: t.name,
      ownerName: t.owner_name,
      fermenterId: t.fermenter_id,
      fermenterCode: t.code,
      bookingEndsAt: new Date(t.ends_at).toISOString(),
    })),
    handovers: handovers.map((h) => ({
      bookingId: h.id,
      equipmentId: h.equipment_id,
      equipmentCode: h.code,
      startsAt: new Date(h.starts_at).toISOString(),
      equipmentState: h.state,
      ready: h.state === 'ready',
    })),
  };
}
