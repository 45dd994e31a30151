import { type Kysely, sql } from 'kysely';

/**
 * The bookings calendar asks for the bookings overlapping a window. Two indexes, found with EXPLAIN (ANALYZE,
 * BUFFERS) on the benchmark data set, let it read only that window instead of walking five years of bookings:
 * - `booking_period_idx`: the booking's period as a range, for `tstzrange(starts_at, ends_at) && window`
 *   (the count beside a page reads the window's rows from it);
 * - `booking_length_idx`: the longest booking on record is its last entry, so `starts_at > from − longest`
 *   gives the page, in start order, a lower bound on `starts_at` that holds whatever the rules were.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await sql`create index booking_period_idx on booking using gist (tstzrange(starts_at, ends_at))`.execute(db);
  await sql`create index booking_length_idx on booking ((ends_at - starts_at))`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop index if exists booking_length_idx`.execute(db);
  await sql`drop index if exists booking_period_idx`.execute(db);
}
