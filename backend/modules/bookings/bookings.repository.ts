import { sql } from 'kysely';
import type { BookingListQuery } from '../../../shared/schemas/booking.ts';
import type { Database } from '../../db/database.ts';
import type { BookingState } from '../../db/tables/cellar.ts';
import { keptCount, orderByAllowed, paginate } from '../../lib/paginate.ts';

export const liveStates: BookingState[] = ['booked', 'in_use'];

const bookingColumns = [
  'b.id',
  'b.equipment_id',
  'b.owner_id',
  'b.batch_id',
  'b.starts_at',
  'b.ends_at',
  'b.blocked_until',
  'b.state',
  'b.notes',
  'b.created_at',
  'b.cancelled_at',
  'e.code as equipment_code',
  'e.name as equipment_name',
  'e.kind as equipment_kind',
  'u.name as owner_name',
  'u.email as owner_email',
] as const;

const bookingTable = (db: Database) => db.selectFrom('booking as b');
type BookingBase = ReturnType<typeof bookingTable>;
/** A booking's item and owner, joined only where a row is shown (a count needs neither: both are required). */
const withItemAndOwner = (qb: BookingBase) => qb.innerJoin('equipment as e', 'e.id', 'b.equipment_id').innerJoin('app_user as u', 'u.id', 'b.owner_id');
const bookingQuery = (db: Database) => withItemAndOwner(bookingTable(db)).select(bookingColumns);
export type BookingJoinedRow = Awaited<ReturnType<ReturnType<typeof bookingQuery>['executeTakeFirstOrThrow']>>;

/** The filters of a bookings list, once the service has checked the owners asked for (each must match). */
export type BookingFilters = Omit<BookingListQuery, 'mine' | 'ownerId'> & { ownerIds: string[] };

const overlaps = (from: Date | null, to: Date | null) =>
  sql<boolean>`tstzrange(b.starts_at, b.ends_at) && tstzrange(${from}::timestamptz, ${to}::timestamptz, '()')`;

/**
 * The bookings overlapping a window: `ends_at > from and starts_at < to`, asked as a range,
 * `tstzrange(starts_at, ends_at) && (from, to)` (the same rows), which `booking_period_idx` answers.
 * The page reads bookings in start order; no booking that ends after `from` starts before `from` minus the longest
 * booking on record (`booking_length_idx` gives it at once), so that bound keeps the walk to the window.
 */
function overlapping(qb: BookingBase, from: Date | null, to: Date | null) {
  let out = qb.where(overlaps(from, to));
  if (from) out = out.where(sql<boolean>`b.starts_at > ${from}::timestamptz - (select max(l.ends_at - l.starts_at) from booking l)`);
  if (to) out = out.where('b.starts_at', '<', to);
  return out;
}

/** A window with both ends at most this long (the calendar's months and weeks) is read whole, see `shortWindow`. */
const SHORT_WINDOW_MS = 92 * 24 * 3600_000;

/**
 * The bookings of a short window as `b`, read whole before any filter, join or order: the rows of `booking` that
 * `booking_period_idx` names, in one bitmap scan of the index and of the few table pages they lie on, kept apart
 * (materialized) so that the page sorts those instead of walking start order from `from` minus the longest
 * booking on record, one table read per booking walked.
 */
function shortWindow(db: Database, from: Date, to: Date): BookingBase {
  return db
    .with(
      (cte) => cte('b').materialized(),
      (qb) => qb.selectFrom('booking as b').selectAll('b').where(overlaps(from, to)),
    )
    .selectFrom('b');
}

const sortColumns = {
  startsAt: 'b.starts_at',
  endsAt: 'b.ends_at',
  createdAt: 'b.created_at',
  state: 'b.state',
} as const;

/** The total of a list filtered by state alone, from the kept counts of bookings by state. */
function keptBookingTotal(db: Database, q: BookingFilters) {
  if (q.ownerIds.length || q.equipmentId || q.kind || q.from || q.to) return undefined;
  return () => keptCount(db, 'booking', q.state ? { in: [q.state] } : q.includeCancelled ? {} : { notIn: ['cancelled'] });
}

/** One page of bookings and the count of all that match (counted over `booking` alone, or kept). */
export async function bookingPage(db: Database, q: BookingFilters) {
  const from = q.from ? new Date(q.from) : null;
  const to = q.to ? new Date(q.to) : null;
  const window = from && to && to.getTime() - from.getTime() <= SHORT_WINDOW_MS ? shortWindow(db, from, to) : null;
  let base = window ?? bookingTable(db);
  for (const ownerId of q.ownerIds) base = base.where('b.owner_id', '=', ownerId);
  if (q.equipmentId) base = base.where('b.equipment_id', '=', q.equipmentId);
  if (q.kind) base = base.where('b.equipment_id', 'in', (eb) => eb.selectFrom('equipment').select('id').where('kind', '=', q.kind!));
  if (!window && (from || to)) base = overlapping(base, from, to);
  if (q.state) base = base.where('b.state', '=', q.state);
  else if (!q.includeCancelled) base = base.where('b.state', '<>', 'cancelled');
  // Same start: by item code, then by id, so pages never repeat or skip a booking.
  const rows = (qb: BookingBase) => orderByAllowed(withItemAndOwner(qb).select(bookingColumns), sortColumns, q, 'e.code').orderBy('b.id');
  return paginate(base, rows, q, keptBookingTotal(db, q));
}

export async function bookingRow(db: Database, id: string): Promise<BookingJoinedRow | undefined> {
  return bookingQuery(db).where('b.id', '=', id).executeTakeFirst();
}

/** An item's live bookings that still hold it at `now`, soonest first. */
export async function upcomingBookingRows(db: Database, equipmentId: string, now: Date, limit: number): Promise<BookingJoinedRow[]> {
  return bookingQuery(db)
    .where('b.equipment_id', '=', equipmentId)
    .where('b.state', 'in', liveStates)
    .where('b.blocked_until', '>', now)
    .orderBy('b.starts_at')
    .limit(limit)
    .execute();
}

export interface Clash {
  id: string;
  owner_id: string;
  owner_name: string;
  starts_at: Date;
  ends_at: Date;
  blocked_until: Date;
}

/** The first booking of an item (not cancelled) whose period, cleaning buffer included, overlaps the one given. */
export async function findClash(db: Database, equipmentId: string, startsAt: Date, blockedUntil: Date): Promise<Clash | undefined> {
  return db
    .selectFrom('booking as b')
    .innerJoin('app_user as u', 'u.id', 'b.owner_id')
    .select(['b.id', 'b.owner_id', 'u.name as owner_name', 'b.starts_at', 'b.ends_at', 'b.blocked_until'])
    .where('b.equipment_id', '=', equipmentId)
    .where('b.state', '<>', 'cancelled')
    .where(sql<boolean>`tstzrange(b.starts_at, b.blocked_until, '[)') && tstzrange(${startsAt}, ${blockedUntil}, '[)')`)
    .orderBy('b.starts_at')
    .limit(1)
    .executeTakeFirst();
}

/** The item to book, locked for the rest of the transaction. */
export async function lockBookableItem(trx: Database, equipmentId: string) {
  return trx.selectFrom('equipment').select(['id', 'code', 'kind', 'name', 'state']).where('id', '=', equipmentId).forUpdate().executeTakeFirst();
}

/** The member a booking is for, locked so their count of live bookings stays exact until the commit. */
export async function lockBookingOwner(trx: Database, ownerId: string) {
  return trx.selectFrom('app_user').select(['id', 'name', 'email', 'is_active']).where('id', '=', ownerId).forUpdate().executeTakeFirst();
}

/** How many live bookings a member holds that have not ended at `now`. */
export async function activeBookingCount(trx: Database, ownerId: string, now: Date): Promise<number> {
  const { active } = await trx
    .selectFrom('booking')
    .select((eb) => eb.fn.countAll<number>().as('active'))
    .where('owner_id', '=', ownerId)
    .where('state', 'in', liveStates)
    .where('ends_at', '>', now)
    .executeTakeFirstOrThrow();
  return Number(active);
}

/** The owner of a batch, or null when batches are not kept yet; undefined when there is no such batch. */
export async function batchOwner(trx: Database, batchId: string): Promise<{ kept: boolean; ownerId?: string }> {
  const exists = await sql<{ t: string | null }>`select to_regclass('public.batch')::text as t`.execute(trx);
  if (!exists.rows[0]?.t) return { kept: false };
  const batch = await sql<{ owner_id: string }>`select owner_id from batch where id = ${batchId}`.execute(trx);
  return { kept: true, ownerId: batch.rows[0]?.owner_id };
}

export interface NewBookingRow {
  equipmentId: string;
  ownerId: string;
  batchId: string | null;
  startsAt: Date;
  endsAt: Date;
  blockedUntil: Date;
  state: BookingState;
  notes: string;
  createdBy: string;
}

export async function insertBooking(trx: Database, b: NewBookingRow): Promise<string> {
  const row = await trx
    .insertInto('booking')
    .values({
      equipment_id: b.equipmentId,
      owner_id: b.ownerId,
      batch_id: b.batchId,
      starts_at: b.startsAt,
      ends_at: b.endsAt,
      blocked_until: b.blockedUntil,
      state: b.state,
      notes: b.notes,
      created_by: b.createdBy,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return row.id;
}

/** A booking's owner, state and end, locked for the rest of the transaction. */
export async function lockBooking(trx: Database, id: string) {
  return trx.selectFrom('booking').select(['id', 'owner_id', 'state', 'ends_at']).where('id', '=', id).forUpdate().executeTakeFirst();
}

export async function markCancelled(trx: Database, id: string, actorId: string, now: Date): Promise<void> {
  await trx.updateTable('booking').set({ state: 'cancelled', cancelled_at: now, cancelled_by: actorId, updated_at: now }).where('id', '=', id).execute();
}

/** `booked` becomes `in_use` at its start and `finished` at its end; returns how many changed. */
export async function advanceStates(trx: Database, now: Date): Promise<number> {
  const finished = await trx
    .updateTable('booking')
    .set({ state: 'finished', updated_at: now })
    .where('state', 'in', liveStates)
    .where('ends_at', '<=', now)
    .executeTakeFirst();
  const started = await trx
    .updateTable('booking')
    .set({ state: 'in_use', updated_at: now })
    .where('state', '=', 'booked')
    .where('starts_at', '<=', now)
    .where('ends_at', '>', now)
    .executeTakeFirst();
  return Number(finished.numUpdatedRows) + Number(started.numUpdatedRows);
}
