import { sql } from 'kysely';
import type { Database } from '../../db/database.ts';

/** Litres packaged per month (in the co-op's time zone) and batch in [start, end), from the `production_packaging` view. */
export async function packagedByMonth(db: Database, period: { start: Date; end: Date }, timeZone: string, ownerId?: string) {
  return db
    .selectFrom('production_packaging as p')
    .innerJoin('batch as b', 'b.id', 'p.batch_id')
    .innerJoin('app_user as u', 'u.id', 'b.owner_id')
    .select([
      sql<string>`to_char(p.packaged_at at time zone ${timeZone}, 'YYYY-MM')`.as('month'),
      'b.id as batch_id',
      'b.name',
      'b.style',
      'u.name as owner_name',
      sql<number>`sum(p.liters)::float8`.as('liters'),
      sql<number>`count(*)::int`.as('packagings'),
    ])
    .where('p.packaged_at', '>=', period.start)
    .where('p.packaged_at', '<', period.end)
    .$if(Boolean(ownerId), (qb) => qb.where('b.owner_id', '=', ownerId!))
    .groupBy([sql`1`, 'b.id', 'b.name', 'b.style', 'u.name'])
    .orderBy(sql`1`)
    .orderBy('b.name')
    .execute();
}

/** Each batch's first and last gravity and its count of readings. */
export async function firstAndLastGravity(db: Database, batchIds: string[]) {
  const rows = await sql<{ batch_id: string; og: string; fg: string; n: number }>`
      select batch_id,
             (array_agg(gravity_sg order by taken_at asc))[1] as og,
             (array_agg(gravity_sg order by taken_at desc))[1] as fg,
             count(*)::int as n
      from reading where batch_id = any(${batchIds}::uuid[]) group by batch_id`.execute(db);
  return rows.rows;
}

/** Batches past planning (of one owner, when given), each with the time of its first reading. */
export async function ledgerBatches(db: Database, ownerId?: string) {
  return db
    .selectFrom('batch as b')
    .select([
      'b.id',
      'b.volume_liters',
      'b.status',
      'b.created_at',
      'b.packaged_at',
      'b.packaged_liters',
      'b.discarded_at',
      'b.updated_at',
      (eb) =>
        eb
          .selectFrom('reading as r')
          .select((e) => e.fn.min('r.taken_at').as('t'))
          .whereRef('r.batch_id', '=', 'b.id')
          .as('first_reading_at'),
    ])
    .where('b.status', '<>', 'planned')
    .$if(Boolean(ownerId), (qb) => qb.where('b.owner_id', '=', ownerId!))
    .execute();
}

/** The transfers of these batches, oldest first. */
export async function ledgerTransfers(db: Database, batchIds: string[]) {
  return db
    .selectFrom('transfer')
    .select(['id', 'batch_id', 'transferred_at', 'volume_liters', 'loss_liters'])
    .where('batch_id', 'in', batchIds)
    .orderBy('transferred_at')
    .orderBy('id')
    .execute();
}

/** The keg fills these batches' transfers made, each with the first check-out of the keg while it held the fill. */
export async function ledgerFills(db: Database, batchIds: string[]) {
  return db
    .selectFrom('keg_fill as kf')
    .select([
      'kf.batch_id',
      'kf.volume_liters',
      'kf.filled_at',
      'kf.emptied_at',
      'kf.emptied_reason',
      sql<Date | null>`(select min(m.at) from keg_movement m where m.keg_id = kf.keg_id and m.action = 'checked_out'
          and m.at >= kf.filled_at and (kf.emptied_at is null or m.at <= kf.emptied_at))`.as('checked_out_at'),
    ])
    .where('kf.batch_id', 'in', batchIds)
    .where('kf.transfer_id', 'is not', null)
    .execute();
}
