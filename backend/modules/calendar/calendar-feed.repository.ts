import { sql } from 'kysely';
import type { Database } from '../../db/database.ts';
import type { CalendarFeedKind } from '../../db/tables/reminders.ts';
import type { BookingState } from '../../db/tables/cellar.ts';

/** A person's live feeds of these kinds. */
export async function liveFeeds(db: Database, ownerId: string, kinds: CalendarFeedKind[]) {
  return db
    .selectFrom('calendar_feed')
    .select(['id', 'kind', 'created_at'])
    .where('owner_id', '=', ownerId)
    .where('revoked_at', 'is', null)
    .where('kind', 'in', kinds)
    .execute();
}

/** Locks the person's account row: one renewal at a time per person. */
export async function lockFeedOwner(trx: Database, ownerId: string): Promise<void> {
  await trx.selectFrom('app_user').select('id').where('id', '=', ownerId).forUpdate().executeTakeFirstOrThrow();
}

/** Revokes the person's live feed of this kind at `at`; how many were revoked. */
export async function revokeFeeds(trx: Database, ownerId: string, kind: CalendarFeedKind, at: Date): Promise<number> {
  const revoked = await trx
    .updateTable('calendar_feed')
    .set({ revoked_at: at })
    .where('owner_id', '=', ownerId)
    .where('kind', '=', kind)
    .where('revoked_at', 'is', null)
    .returning('id')
    .execute();
  return revoked.length;
}

export async function insertFeed(
  trx: Database,
  values: { id: string; owner_id: string; kind: CalendarFeedKind; token_hash: string; created_at: Date },
): Promise<Date> {
  return (await trx.insertInto('calendar_feed').values(values).returning('created_at').executeTakeFirstOrThrow()).created_at;
}

/** The live feed with this token hash, with its owner. */
export async function feedByTokenHash(db: Database, tokenHash: string) {
  return db
    .selectFrom('calendar_feed')
    .innerJoin('app_user', 'app_user.id', 'calendar_feed.owner_id')
    .select(['calendar_feed.id', 'calendar_feed.kind', 'calendar_feed.owner_id', 'app_user.name', 'app_user.roles', 'app_user.is_active'])
    .where('calendar_feed.token_hash', '=', tokenHash)
    .where('calendar_feed.revoked_at', 'is', null)
    .executeTakeFirst();
}

/** Bookings with the vessel booked: what every read of a booking in the cellar's calendar starts from. */
export function bookingWithVessel(db: Database) {
  return db.selectFrom('booking').innerJoin('equipment', 'equipment.id', 'booking.equipment_id');
}

/** What a short list of bookings shows (Today, a batch's page). */
export const bookingSummaryColumns = [
  'booking.id',
  'booking.equipment_id',
  'equipment.code',
  'equipment.name',
  'booking.starts_at',
  'booking.ends_at',
  'booking.state',
] as const;

/** A booking of the short lists as the API gives it. */
export function toBookingSummary(b: { id: string; equipment_id: string; code: string; name: string; starts_at: Date; ends_at: Date; state: BookingState }) {
  return {
    id: b.id,
    equipmentId: b.equipment_id,
    equipmentCode: b.code,
    equipmentName: b.name,
    startsAt: b.starts_at.toISOString(),
    endsAt: b.ends_at.toISOString(),
    state: b.state,
  };
}

/** A feed's window; `ownerId` limits it to one person's. */
export interface FeedScope {
  from: Date;
  to: Date;
  ownerId?: string | undefined;
}

/** Bookings not cancelled that overlap the window (their cleaning time included), with owner and batch. */
export async function feedBookings(db: Database, scope: FeedScope) {
  let q = bookingWithVessel(db)
    .innerJoin('app_user', 'app_user.id', 'booking.owner_id')
    .leftJoin('batch', 'batch.id', 'booking.batch_id')
    .select([
      ...bookingSummaryColumns,
      'booking.blocked_until',
      'equipment.kind',
      'app_user.name as owner_name',
      'batch.name as batch_name',
      'batch.status as batch_status',
    ])
    .where('booking.state', '<>', 'cancelled')
    .where('booking.blocked_until', '>', scope.from)
    .where('booking.starts_at', '<', scope.to)
    .orderBy('booking.starts_at');
  if (scope.ownerId) q = q.where('booking.owner_id', '=', scope.ownerId);
  return q.execute();
}

/** Kegs out with members and due back before the window ends. */
export async function feedKegsDue(db: Database, scope: FeedScope) {
  let q = db
    .selectFrom('keg_whereabouts as kw')
    .innerJoin('equipment as e', 'e.id', 'kw.keg_id')
    .innerJoin('app_user as m', 'm.id', 'kw.member_id')
    .select(['e.id', 'e.code', 'e.name', 'm.name as member_name', 'kw.due_at', 'kw.checked_out_at'])
    .where('kw.whereabouts', '=', 'with_member')
    .where('kw.due_at', 'is not', null)
    .where('kw.due_at', '<', scope.to)
    .orderBy('kw.due_at');
  if (scope.ownerId) q = q.where('kw.member_id', '=', scope.ownerId);
  return q.execute();
}

/** A member's issued invoices with a due day and something still due. */
export async function feedInvoicesDue(db: Database, memberId: string) {
  return db
    .selectFrom('invoice')
    .select(['id', 'number', 'due_on', 'currency', 'total_cents', 'paid_cents', 'credited_cents'])
    .where('member_id', '=', memberId)
    .where('status', '=', 'issued')
    .where('due_on', 'is not', null)
    .where(sql<boolean>`total_cents - paid_cents - credited_cents > 0`)
    .orderBy('due_on')
    .execute();
}
