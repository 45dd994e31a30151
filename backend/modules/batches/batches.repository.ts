import { sql, type Insertable, type Updateable } from 'kysely';
import type { BatchListQuery } from '../../../shared/schemas/batches.ts';
import type { Database } from '../../db/database.ts';
import { containsPattern, orderByAllowed, paginate } from '../../lib/paginate.ts';
import type { BatchTable } from '../../db/tables/batches.ts';
import { bookingSummaryColumns, bookingWithVessel } from '../calendar/calendar-feed.repository.ts';

export const batchColumns = [
  'batch.id',
  'batch.owner_id',
  'batch.name',
  'batch.style',
  'batch.volume_liters',
  'batch.target_og',
  'batch.target_fg',
  'batch.status',
  'batch.packaged_at',
  'batch.packaged_liters',
  'batch.notes',
  'batch.allergens',
  'batch.shelf_life_days',
  'batch.created_at',
  'batch.updated_at',
] as const;

/** The same columns written back by `returning` (no table prefix). */
const returnedColumns = batchColumns.map((c) => c.replace('batch.', '')) as never;

export async function batchById(db: Database, id: string) {
  return db.selectFrom('batch').select(batchColumns).where('batch.id', '=', id).executeTakeFirst();
}

/** The latest reading (time and gravity) of the batch whose id is the column `batchId`, to join laterally as `last_reading`. */
function lastReadingOf(db: Database, batchId: string) {
  return db
    .selectFrom('reading')
    .select(['reading.taken_at', 'reading.gravity_sg'])
    .where('reading.batch_id', '=', sql.ref<string>(batchId))
    .orderBy('reading.taken_at', 'desc')
    .limit(1)
    .as('last_reading');
}

/** Batches, each with its latest reading as `last_reading` (time and gravity; null without readings). */
export function batchesWithLastReading(db: Database) {
  return db.selectFrom('batch').leftJoinLateral(lastReadingOf(db, 'batch.id'), (join) => join.onTrue());
}

export async function ownerName(db: Database, ownerId: string): Promise<string | undefined> {
  return (await db.selectFrom('app_user').select('name').where('id', '=', ownerId).executeTakeFirst())?.name;
}

export async function isActiveMember(trx: Database, id: string): Promise<boolean> {
  return Boolean(await trx.selectFrom('app_user').select('id').where('id', '=', id).where('is_active', '=', true).executeTakeFirst());
}

/** The bookings that hold this batch, oldest first. */
export async function batchBookingRows(db: Database, batchId: string) {
  return bookingWithVessel(db).select(bookingSummaryColumns).where('booking.batch_id', '=', batchId).orderBy('booking.starts_at').execute();
}

/** A booking with what linking a batch to it checks. */
export async function bookingToLink(trx: Database, bookingId: string) {
  return bookingWithVessel(trx)
    .select(['booking.id', 'booking.owner_id', 'booking.batch_id', 'booking.state', 'equipment.kind'])
    .where('booking.id', '=', bookingId)
    .executeTakeFirst();
}

/** Links the booking to the batch (`null`: the booking holds no batch). */
export async function setBookingBatch(trx: Database, bookingId: string, batchId: string, now: Date): Promise<void> {
  await trx.updateTable('booking').set({ batch_id: batchId, updated_at: now }).where('id', '=', bookingId).execute();
}

/** Unlinks every booking of the batch. */
export async function unlinkBatchBookings(trx: Database, batchId: string, now: Date): Promise<void> {
  await trx.updateTable('booking').set({ batch_id: null, updated_at: now }).where('batch_id', '=', batchId).execute();
}

export async function insertBatch(trx: Database, values: Insertable<BatchTable>) {
  return trx.insertInto('batch').values(values).returning(returnedColumns).executeTakeFirstOrThrow();
}

export async function updateBatchRow(trx: Database, id: string, values: Updateable<BatchTable>) {
  return trx.updateTable('batch').set(values).where('id', '=', id).returning(returnedColumns).executeTakeFirstOrThrow();
}

/** The columns a batches page may be sorted by, as the page's inner query names them (`lastReadingAt` is the lateral's). */
const pageSort = {
  name: 'name',
  style: 'style',
  status: 'status',
  createdAt: 'created_at',
  volumeLiters: 'volume_liters',
  owner: 'owner_name',
} as const;
const outerSort = {
  ...(Object.fromEntries(Object.entries(pageSort).map(([k, v]) => [k, `b.${v}`])) as { [K in keyof typeof pageSort]: string }),
  lastReadingAt: 'last_reading.taken_at',
};

/**
 * One page of batches (only `ownerId`'s when given) with their owner, first and latest gravity and count of readings.
 * The count reads `batch` alone. The page sorts batches with their owner in an inner query, so its order carries
 * through the lateral lookups and the limit stops them at the page: each reading figure is looked up only for the
 * batches shown, through `reading_batch_taken_at_key` (sorting by the latest reading needs it for every batch).
 */
export async function batchPage(db: Database, q: BatchListQuery, ownerId: string | undefined) {
  let base = db.selectFrom('batch');
  if (ownerId) base = base.where('batch.owner_id', '=', ownerId);
  if (q.ownerId) base = base.where('batch.owner_id', '=', q.ownerId);
  if (q.status) base = base.where('batch.status', '=', q.status);
  if (q.q) {
    const like = containsPattern(q.q);
    base = base.where((eb) =>
      eb.or([
        eb('batch.name', 'ilike', like),
        eb('batch.style', 'ilike', like),
        eb('batch.owner_id', 'in', eb.selectFrom('app_user').select('app_user.id').where('app_user.name', 'ilike', like)),
      ]),
    );
  }
  return paginate(
    base,
    (qb) => {
      let sorted = qb.innerJoin('app_user', 'app_user.id', 'batch.owner_id').select([...batchColumns, 'app_user.name as owner_name']);
      if (q.sort !== 'lastReadingAt') sorted = orderByAllowed(sorted, pageSort, { sort: q.sort, order: q.order });
      return orderByAllowed(
        db
          .selectFrom(sorted.as('b'))
          .leftJoinLateral(lastReadingOf(db, 'b.id'), (join) => join.onTrue())
          .selectAll('b')
          .select([
            'last_reading.taken_at as last_reading_at',
            'last_reading.gravity_sg as current_gravity',
            (eb) =>
              eb
                .selectFrom('reading')
                .select('reading.gravity_sg')
                .whereRef('reading.batch_id', '=', 'b.id')
                .orderBy('reading.taken_at', 'asc')
                .limit(1)
                .as('og'),
            (eb) =>
              eb
                .selectFrom('reading')
                .select((e) => e.fn.countAll<number>().as('n'))
                .whereRef('reading.batch_id', '=', 'b.id')
                .as('readings_count'),
          ]),
        outerSort,
        q,
        'b.id',
      );
    },
    q,
  );
}

/** What a batch's shelf life depends on: its style and its own shelf life, if set. */
export function batchShelfLifeRow(db: Database, id: string) {
  return db.selectFrom('batch').select(['style', 'shelf_life_days']).where('id', '=', id).executeTakeFirstOrThrow();
}

/** What a batch's gravity figures depend on besides its readings: its status and target FG. */
export function batchFiguresRow(db: Database, id: string) {
  return db.selectFrom('batch').select(['status', 'target_fg']).where('id', '=', id).executeTakeFirst();
}
