import type { TodayCellarSection, TodayMemberSection } from '../../../shared/schemas/today.ts';
import type { Database } from '../../db/database.ts';
import { toBookingSummary } from '../calendar/calendar-feed.repository.ts';
import { bestBeforeKegs } from './best-before.ts';
import { handoverRows, memberBatchRows, memberBookingRows, memberKegRows, overdueKegs, transfersDueRows, vesselsToClean } from './today.repository.ts';

const DAY = 24 * 3600_000;

/** A member's own bookings, batches, kegs out with them; balance is added by the caller when allowed. */
export async function memberSection(db: Database, memberId: string, now: Date): Promise<Omit<TodayMemberSection, 'balance'>> {
  const [bookings, batches, kegs] = await Promise.all([memberBookingRows(db, memberId, now), memberBatchRows(db, memberId), memberKegRows(db, memberId)]);
  const bestBefore = await bestBeforeKegs(db, now, { memberId, showOwners: true });
  return {
    bestBefore,
    bookings: bookings.map(toBookingSummary),
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
  const [dirty, overdue, transfers, handovers] = await Promise.all([
    vesselsToClean(db, now),
    overdueKegs(db, now),
    // Beer must be out of a fermenter before its booking ends.
    transfersDueRows(db, soon),
    // Bookings that start within a day: the vessel must be ready for its next user.
    handoverRows(db, now, tomorrow),
  ]);
  const bestBefore = await bestBeforeKegs(db, now, { showOwners });
  return {
    bestBefore,
    needsCleaning: {
      total: dirty.total,
      items: dirty.items.map((e) => ({
        id: e.id,
        code: e.code,
        name: e.name,
        state: e.state,
        nextBookingAt: e.next_booking_at ? new Date(e.next_booking_at).toISOString() : null,
      })),
    },
    overdueKegs: {
      total: overdue.total,
      items: overdue.items.map((k) => ({ id: k.id, code: k.code, memberName: showOwners ? (k.name ?? null) : null, dueAt: new Date(k.due_at!).toISOString() })),
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
