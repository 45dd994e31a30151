import type { Selectable } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import type { BookingState, BookingTable } from '../../backend/db/tables/cellar.ts';
import { getBookingRules } from '../../backend/modules/settings/settings.service.ts';
import { type At, HOUR, inTransaction, toDate } from './common.ts';
import { createFermenter } from './equipment.ts';
import { createMember } from './users.ts';

export type BookingRow = Selectable<BookingTable>;

export interface BookingOverrides {
  id?: string;
  /** Default: a new 30 L fermenter. */
  equipmentId?: string;
  /** Default: a new member. */
  ownerId?: string;
  batchId?: string | null;
  startsAt: At;
  endsAt: At;
  /**
   * Default: derived from `now` when given (before the start `booked`, until the end `in_use`,
   * after it `finished`), else `booked`.
   */
  state?: BookingState;
  /** The instant the state is derived from (and the default creation time). */
  now?: At;
  /** Default: the co-op's cleaning buffer (booking_rules). blocked_until = endsAt + buffer. */
  bufferHours?: number;
  notes?: string;
  /** Default: `now` when given, else startsAt. */
  createdAt?: At;
  /** For a cancelled booking; default createdAt. */
  cancelledAt?: At;
  createdBy?: string | null;
}

/** A booking of an item, written as the bookings service writes it (no state change of the item). */
export async function createBooking(db: Database, o: BookingOverrides): Promise<BookingRow> {
  const startsAt = toDate(o.startsAt, 'startsAt');
  const endsAt = toDate(o.endsAt, 'endsAt');
  if (endsAt <= startsAt) throw new Error('createBooking: endsAt must be after startsAt');
  return inTransaction(db, async (trx) => {
    const bufferHours = o.bufferHours ?? (await getBookingRules(trx)).cleaningBufferHours;
    const equipmentId = o.equipmentId ?? (await createFermenter(trx)).id;
    const ownerId = o.ownerId ?? (await createMember(trx)).id;
    const now = o.now === undefined ? null : toDate(o.now, 'now');
    const state: BookingState = o.state ?? (now === null ? 'booked' : now < startsAt ? 'booked' : now < endsAt ? 'in_use' : 'finished');
    const createdAt = toDate(o.createdAt ?? now ?? startsAt, 'createdAt');
    const cancelled = state === 'cancelled';
    return trx
      .insertInto('booking')
      .values({
        ...(o.id ? { id: o.id } : {}),
        equipment_id: equipmentId,
        owner_id: ownerId,
        batch_id: o.batchId ?? null,
        starts_at: startsAt,
        ends_at: endsAt,
        blocked_until: new Date(endsAt.getTime() + bufferHours * HOUR),
        state,
        notes: o.notes ?? '',
        created_by: o.createdBy === undefined ? ownerId : o.createdBy,
        cancelled_by: cancelled ? ownerId : null,
        cancelled_at: cancelled ? toDate(o.cancelledAt ?? createdAt, 'cancelledAt') : null,
        created_at: createdAt,
        updated_at: createdAt,
      })
      .returningAll()
      .executeTakeFirstOrThrow();
  });
}
