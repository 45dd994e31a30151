import type { AppAbility } from '../../../shared/permissions/ability.ts';
import { subject } from '../../../shared/permissions/ability.ts';
import type { Booking, BookingListQuery, CreateBookingInput } from '../../../shared/schemas/booking.ts';
import { equipmentKindLabels } from '../../../shared/schemas/equipment.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import { bookingRuleLabels, type BookingRuleName, type BookingRules } from '../../../shared/schemas/settings.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { canAll } from '../../lib/authz.ts';
import { conflict, HttpProblem, notFound } from '../../lib/http-problem.ts';
import { assertInspected } from '../equipment/inspections.service.ts';
import { formatWhen } from '../mail/templates/parts.ts';
import { getBookingRules } from '../settings/settings.service.ts';
import {
  activeBookingCount,
  advanceStates,
  batchOwner,
  bookingPage,
  bookingRow,
  findClash,
  insertBooking,
  liveStates,
  lockBookableItem,
  lockBooking,
  lockBookingOwner,
  markCancelled,
  upcomingBookingRows,
  type BookingJoinedRow,
  type Clash,
} from './bookings.repository.ts';

/** Who is asking: their id and what the shared policy lets them do. */
export interface Viewer {
  id: string;
  ability: AppAbility;
}

const HOUR = 3600_000;
const DAY = 24 * HOUR;
/** A booking may start a few minutes in the past (the form was opened a little while ago). */
const START_GRACE_MS = 10 * 60_000;

export { liveStates };

/** The one place a booking row becomes what a person may see: owners' details only with `readOwner`. */
export function toBookingDto(row: BookingJoinedRow, viewer: Viewer): Booking {
  const dto: Booking = {
    id: row.id,
    equipmentId: row.equipment_id,
    equipment: { code: row.equipment_code, name: row.equipment_name, kind: row.equipment_kind },
    startsAt: row.starts_at.toISOString(),
    endsAt: row.ends_at.toISOString(),
    blockedUntil: row.blocked_until.toISOString(),
    state: row.state,
    mine: row.owner_id === viewer.id,
    createdAt: row.created_at.toISOString(),
    cancelledAt: row.cancelled_at?.toISOString() ?? null,
  };
  if (viewer.ability.can('readOwner', subject('Booking', { ownerId: row.owner_id }))) {
    dto.ownerId = row.owner_id;
    dto.owner = { id: row.owner_id, name: row.owner_name, email: row.owner_email };
    dto.batchId = row.batch_id;
    dto.notes = row.notes;
  }
  return dto;
}

export async function listBookings(db: Database, q: BookingListQuery, viewer: Viewer): Promise<Page<Booking>> {
  // The calendar is open to all who may read bookings; only the owner filter depends on who asks.
  // Filtering by someone else's id would reveal whose bookings those are.
  if (q.ownerId && q.ownerId !== viewer.id && !canAll(viewer.ability, 'readOwner', 'Booking')) {
    throw new HttpProblem(403, 'Forbidden', 'You may filter only by your own bookings (mine=1).');
  }
  const { mine, ...filters } = q;
  // Both owner filters hold when both are given (an ownerId that is not the viewer's then finds nothing).
  const ownerIds = [mine ? viewer.id : undefined, q.ownerId].filter((id): id is string => !!id);
  const { rows, total } = await bookingPage(db, { ...filters, ownerIds });
  return { items: rows.map((r) => toBookingDto(r, viewer)), total, page: q.page, pageSize: q.pageSize };
}

export async function findBooking(db: Database, id: string): Promise<BookingJoinedRow | undefined> {
  return bookingRow(db, id);
}

export async function upcomingBookingsFor(db: Database, equipmentId: string, viewer: Viewer, now: Date, limit = 20): Promise<Booking[]> {
  const rows = await upcomingBookingRows(db, equipmentId, now, limit);
  return rows.map((r) => toBookingDto(r, viewer));
}

/** Times in messages, in the co-op's time zone: "Thu 3 Dec 2026, 09:00". */
function ruleBroken(rule: BookingRuleName, detail: string, path: string): HttpProblem {
  return new HttpProblem(422, `Booking rule: ${bookingRuleLabels[rule]}`, detail, [{ path, message: detail }], 'about:blank', { rule });
}

function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

/** The co-op's rules, checked in the booking's own transaction. Throws a 422 naming the rule broken. */
export function checkRules(
  rules: BookingRules,
  input: { startsAt: Date; endsAt: Date; kind: keyof BookingRules['maxDays'] },
  activeCount: number,
  now: Date,
): void {
  if (input.startsAt.getTime() < now.getTime() - START_GRACE_MS) {
    throw new HttpProblem(
      422,
      'Booking in the past',
      'A booking cannot start in the past.',
      [{ path: 'startsAt', message: 'A booking cannot start in the past.' }],
      'about:blank',
      {
        rule: 'notInPast',
      },
    );
  }
  const latestStart = now.getTime() + rules.maxAdvanceDays * DAY;
  if (input.startsAt.getTime() > latestStart) {
    throw ruleBroken(
      'maxAdvanceDays',
      `Bookings may start at most ${plural(rules.maxAdvanceDays, 'day')} ahead (co-op rule "${bookingRuleLabels.maxAdvanceDays}").`,
      'startsAt',
    );
  }
  const maxDays = rules.maxDays[input.kind];
  const lengthMs = input.endsAt.getTime() - input.startsAt.getTime();
  if (lengthMs > maxDays * DAY) {
    const asked = Math.ceil((lengthMs / DAY) * 10) / 10;
    throw ruleBroken(
      'maxDays',
      `A ${equipmentKindLabels[input.kind].toLowerCase()} may be booked for at most ${plural(maxDays, 'day')} (co-op rule "${bookingRuleLabels.maxDays}"); this booking is ${asked} days.`,
      'endsAt',
    );
  }
  if (activeCount >= rules.maxActiveBookingsPerMember) {
    throw ruleBroken(
      'maxActiveBookingsPerMember',
      `A member may hold at most ${plural(rules.maxActiveBookingsPerMember, 'booking')} at once (co-op rule "${bookingRuleLabels.maxActiveBookingsPerMember}"); cancel one or wait until one ends.`,
      'equipmentId',
    );
  }
}

/** A 409 that names the item and the period it clashes with; the holder's name only for those who may see it. */
function clashProblem(
  item: { id: string; code: string },
  clash: Clash | undefined,
  wanted: { startsAt: Date; blockedUntil: Date },
  rules: BookingRules,
  viewer: Viewer,
): HttpProblem {
  const tz = rules.timeZone;
  if (!clash) {
    return conflict(`${item.code} is already taken in that period (cleaning buffer of ${rules.cleaningBufferHours} h included).`, {
      title: 'Slot taken',
      clash: { equipmentId: item.id, code: item.code },
    });
  }
  const seeOwner = viewer.ability.can('readOwner', subject('Booking', { ownerId: clash.owner_id }));
  const holder = seeOwner ? (clash.owner_id === viewer.id ? 'by you' : `by ${clash.owner_name}`) : '';
  const buffer = rules.cleaningBufferHours;
  const parts = [
    `${item.code} is taken${holder ? ` ${holder}` : ''} from ${formatWhen(clash.starts_at, tz)} until ${formatWhen(clash.ends_at, tz)}`,
    clash.blocked_until > clash.ends_at ? `, and kept free for cleaning until ${formatWhen(clash.blocked_until, tz)}` : '',
    `. Your booking, with its ${buffer} h cleaning buffer, would hold it from ${formatWhen(wanted.startsAt, tz)} until ${formatWhen(wanted.blockedUntil, tz)}.`,
  ];
  return new HttpProblem(409, 'Slot taken', parts.join(''), undefined, 'about:blank', {
    clash: {
      equipmentId: item.id,
      code: item.code,
      startsAt: clash.starts_at.toISOString(),
      endsAt: clash.ends_at.toISOString(),
      blockedUntil: clash.blocked_until.toISOString(),
      ...(seeOwner ? { bookingId: clash.id, owner: { id: clash.owner_id, name: clash.owner_name } } : {}),
    },
  });
}

export interface CreatedBooking {
  booking: Booking;
  owner: { id: string; name: string; email: string };
  rules: BookingRules;
}

/**
 * Books an item. One transaction: the item's row is locked (so concurrent requests for it queue
 * and each sees the others' bookings), then the owner's row (so their count of active bookings
 * is exact), the rules are checked, and the insert is guarded by the exclusion constraint
 * `booking_no_overlap` in any case.
 */
export async function createBooking(db: Database, input: CreateBookingInput & { ownerId: string }, actor: Viewer, now: Date): Promise<CreatedBooking> {
  const startsAt = new Date(input.startsAt);
  const endsAt = new Date(input.endsAt);
  let context: { item: { id: string; code: string }; rules: BookingRules; blockedUntil: Date } | undefined;
  try {
    return await db.transaction().execute(async (trx) => {
      const item = await lockBookableItem(trx, input.equipmentId);
      if (!item) throw notFound('Equipment');
      const owner = await lockBookingOwner(trx, input.ownerId);
      if (!owner || !owner.is_active) {
        throw new HttpProblem(422, 'Validation failed', 'That member has no active account.', [
          { path: 'ownerId', message: 'That member has no active account.' },
        ]);
      }
      if (item.state === 'out_of_service') {
        throw conflict(`${item.code} is out of service and cannot be booked.`, { title: 'Out of service', clash: { equipmentId: item.id, code: item.code } });
      }
      // A CO2 cylinder past its hydrostatic test date (or failing it) may not be used.
      if (item.kind === 'co2_cylinder') await assertInspected(trx, [item], 'booked', now);
      const rules = await getBookingRules(trx);
      const active = await activeBookingCount(trx, owner.id, now);
      checkRules(rules, { startsAt, endsAt, kind: item.kind }, active, now);
      if (input.batchId) await checkBatch(trx, input.batchId, owner.id);

      const blockedUntil = new Date(endsAt.getTime() + rules.cleaningBufferHours * HOUR);
      context = { item, rules, blockedUntil };
      const clash = await findClash(trx, item.id, startsAt, blockedUntil);
      if (clash) throw clashProblem(item, clash, { startsAt, blockedUntil }, rules, actor);

      const id = await insertBooking(trx, {
        equipmentId: item.id,
        ownerId: owner.id,
        batchId: input.batchId ?? null,
        startsAt,
        endsAt,
        blockedUntil,
        state: startsAt.getTime() <= now.getTime() ? 'in_use' : 'booked',
        notes: input.notes ?? '',
        createdBy: actor.id,
      });
      await audit(trx, actor.id, 'booked', 'Booking', id, {
        equipmentId: item.id,
        code: item.code,
        ownerId: owner.id,
        startsAt: startsAt.toISOString(),
        endsAt: endsAt.toISOString(),
        blockedUntil: blockedUntil.toISOString(),
      });
      const created = await bookingRow(trx, id);
      return { booking: toBookingDto(created!, actor), owner: { id: owner.id, name: owner.name, email: owner.email }, rules };
    });
  } catch (err) {
    // The constraint is the guarantee: a booking that slipped past the check still cannot overlap.
    if ((err as { code?: string }).code === '23P01' && context) {
      const clash = await findClash(db, context.item.id, startsAt, context.blockedUntil);
      throw clashProblem(context.item, clash, { startsAt, blockedUntil: context.blockedUntil }, context.rules, actor);
    }
    throw err;
  }
}

/** A booking may name one of its owner's batches, once the batches capability keeps them. */
async function checkBatch(trx: Database, batchId: string, ownerId: string): Promise<void> {
  const batch = await batchOwner(trx, batchId);
  const problem = (message: string) => new HttpProblem(422, 'Validation failed', message, [{ path: 'batchId', message }]);
  if (!batch.kept) throw problem('Batches are not kept yet; leave the batch empty.');
  if (!batch.ownerId) throw problem('That batch does not exist.');
  if (batch.ownerId !== ownerId) throw problem('The batch must belong to the member the booking is for.');
}

export interface CancelledBooking {
  booking: Booking;
  owner: { id: string; name: string; email: string };
  cancelledBy: string;
}

/** Cancels a booking (frees its slot at once) in one transaction with an audit row. */
export async function cancelBooking(db: Database, id: string, actor: Viewer & { name: string }, now: Date): Promise<CancelledBooking> {
  return db.transaction().execute(async (trx) => {
    const row = await lockBooking(trx, id);
    if (!row) throw notFound('Booking');
    if (!actor.ability.can('cancel', subject('Booking', { ownerId: row.owner_id }))) {
      throw new HttpProblem(403, 'Forbidden', 'Only the member who holds a booking, or the admin, may cancel it.');
    }
    if (row.state === 'cancelled') throw conflict('This booking is already cancelled.');
    if (row.state === 'finished' || row.ends_at.getTime() <= now.getTime()) throw conflict('This booking has already ended and cannot be cancelled.');
    if (row.state === 'in_use' && !canAll(actor.ability, 'cancel', 'Booking')) {
      throw conflict('This booking is in use; ask the brewer on duty or the admin to end it.');
    }
    await markCancelled(trx, id, actor.id, now);
    await audit(trx, actor.id, 'cancelled', 'Booking', id, { previousState: row.state });
    const after = await bookingRow(trx, id);
    return {
      booking: toBookingDto(after!, actor),
      owner: { id: after!.owner_id, name: after!.owner_name, email: after!.owner_email },
      cancelledBy: actor.name,
    };
  });
}

/**
 * Moves bookings along with the clock: `booked` becomes `in_use` at its start and `finished` at
 * its end. Run by a scheduled job; returns how many changed.
 */
export async function advanceBookingStates(db: Database, now: Date): Promise<number> {
  return db.transaction().execute((trx) => advanceStates(trx, now));
}
