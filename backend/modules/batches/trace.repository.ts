import type { Database } from '../../db/database.ts';
import { effectiveStateSql } from '../equipment/vessel-state.ts';
import { kegFillsWithWhereabouts } from '../kegs/keg-fills.repository.ts';
import { kegWhereaboutsColumns } from '../kegs/kegs.repository.ts';

/** Which fills a trace holds: of these batches, filled in [from, to) when given. */
export interface FillScope {
  batchIds: string[];
  from?: Date;
  to?: Date;
}

/** What the trace says of a fill: its keg, litres, best-before and its transfer's finings. */
const traceFillColumns = [
  'kf.id',
  'kf.batch_id',
  'kf.keg_id',
  'e.code',
  'kf.filled_at',
  'kf.volume_liters',
  'kf.remaining_liters',
  'kf.emptied_at',
  'kf.best_before',
  't.finings_kind',
  't.finings_amount',
  't.finings_unit',
] as const;

/** The fills in scope with their keg's state and whereabouts now and the finings of their transfer, oldest first. */
export async function traceFillRows(db: Database, scope: FillScope, now: Date) {
  let q = kegFillsWithWhereabouts(db)
    .leftJoin('transfer as t', 't.id', 'kf.transfer_id')
    .select((eb) => [...traceFillColumns, effectiveStateSql(eb.ref('e.id'), eb.ref('e.state'), now).as('state'), ...kegWhereaboutsColumns])
    .where('kf.batch_id', 'in', scope.batchIds);
  if (scope.from) q = q.where('kf.filled_at', '>=', scope.from);
  if (scope.to) q = q.where('kf.filled_at', '<', scope.to);
  return q.orderBy('kf.filled_at').orderBy('e.code').execute();
}

/** Every check-out and tapping of these kegs, with who took each out and which tap served it, oldest first. */
export async function kegOutings(db: Database, kegIds: string[]) {
  return db
    .selectFrom('keg_movement as km')
    .leftJoin('app_user as u', 'u.id', 'km.member_id')
    .leftJoin('equipment as tap', 'tap.id', 'km.tap_id')
    .select(['km.keg_id', 'km.action', 'km.at', 'km.member_id', 'u.name as member_name', 'km.due_at', 'km.tap_id', 'tap.code as tap_code'])
    .where('km.keg_id', 'in', kegIds)
    .where('km.action', 'in', ['checked_out', 'tapped'])
    .orderBy('km.at')
    .execute();
}

/** Batches with their owner's name: what a trace says of each batch. */
export function traceBatches(db: Database) {
  return db
    .selectFrom('batch as b')
    .innerJoin('app_user as o', 'o.id', 'b.owner_id')
    .select([
      'b.id',
      'b.name',
      'b.style',
      'b.status',
      'b.owner_id',
      'o.name as owner_name',
      'b.packaged_at',
      'b.packaged_liters',
      'b.shelf_life_days',
      'b.allergens',
    ]);
}

/** Every transfer of these batches that recorded finings, oldest first. */
export async function finingsRows(db: Database, batchIds: string[]) {
  return db
    .selectFrom('transfer')
    .select(['batch_id', 'finings_kind', 'finings_amount', 'finings_unit'])
    .where('batch_id', 'in', batchIds)
    .where('finings_kind', 'is not', null)
    .orderBy('transferred_at')
    .execute();
}

/** The batches (of one owner, when given) with a fill made in [from, to). */
export async function batchIdsFilledIn(db: Database, from: Date, to: Date, ownerId?: string): Promise<string[]> {
  let ids = db
    .selectFrom('keg_fill as kf')
    .innerJoin('batch as b', 'b.id', 'kf.batch_id')
    .select('kf.batch_id')
    .distinct()
    .where('kf.filled_at', '>=', from)
    .where('kf.filled_at', '<', to);
  if (ownerId) ids = ids.where('b.owner_id', '=', ownerId);
  return (await ids.execute()).map((r) => r.batch_id);
}
