import { sql, type Insertable } from 'kysely';
import type { KegFillTable, TransferTable } from '../../db/tables/cellar-operations.ts';
import type { TransferListQuery } from '../../../shared/schemas/transfers.ts';
import type { Database } from '../../db/database.ts';
import { containsAny, orderByAllowed, paginate } from '../../lib/paginate.ts';

/** A batch's gravity readings taken up to `at`, oldest first. */
export async function gravityReadings(db: Database, batchId: string, at: Date) {
  return db.selectFrom('reading').select(['taken_at', 'gravity_sg']).where('batch_id', '=', batchId).where('taken_at', '<=', at).orderBy('taken_at').execute();
}

/** The batch's packaged litres are the sum of its transfers; it counts as packaged from its first transfer. */
export async function markBatchPackaged(trx: Database, batchId: string, at: Date, now: Date): Promise<void> {
  const totals = await trx
    .selectFrom('transfer')
    .select((eb) => eb.fn.sum<number>('packaged_liters').as('liters'))
    .where('batch_id', '=', batchId)
    .executeTakeFirstOrThrow();
  await trx
    .updateTable('batch')
    .set({ packaged_at: sql`coalesce(packaged_at, ${at})`, packaged_liters: Number(totals.liters), updated_at: now })
    .where('id', '=', batchId)
    .execute();
}

export async function lockBatch(trx: Database, id: string) {
  return trx.selectFrom('batch').select(['id', 'name', 'status', 'owner_id']).where('id', '=', id).forUpdate().executeTakeFirst();
}

export async function lockFermenter(trx: Database, id: string) {
  return trx.selectFrom('equipment').select(['id', 'code', 'kind', 'state', 'attributes']).where('id', '=', id).forUpdate().executeTakeFirst();
}

/** Locks the kegs in a fixed order (so two transfers never deadlock), each with its latest sanitation cycle's id. */
export async function lockKegsForFill(trx: Database, ids: string[]) {
  return trx
    .selectFrom('equipment as e')
    .leftJoin('keg_whereabouts as kw', 'kw.keg_id', 'e.id')
    .select((eb) => [
      'e.id',
      'e.code',
      'e.kind',
      'e.state',
      'e.capacity_liters',
      'kw.whereabouts',
      eb
        .selectFrom('sanitation_cycle as c')
        .select('c.id')
        .whereRef('c.equipment_id', '=', 'e.id')
        .orderBy('c.completed_at', 'desc')
        .limit(1)
        .as('last_cycle_id'),
    ])
    .where('e.id', 'in', ids)
    .orderBy('e.id')
    .forUpdate('e')
    .execute();
}

export async function cyclesByIds(trx: Database, ids: string[]) {
  if (!ids.length) return [];
  return trx.selectFrom('sanitation_cycle').select(['id', 'complete', 'fresh_until', 'completed_at']).where('id', 'in', ids).execute();
}

export async function setBatchPackagedStatus(trx: Database, batchId: string, now: Date): Promise<void> {
  await trx.updateTable('batch').set({ status: 'packaged', updated_at: now }).where('id', '=', batchId).execute();
}

export async function insertTransfer(trx: Database, values: Insertable<TransferTable>): Promise<string> {
  return (await trx.insertInto('transfer').values(values).returning('id').executeTakeFirstOrThrow()).id;
}

export async function insertKegFill(trx: Database, values: Insertable<KegFillTable>): Promise<string> {
  return (await trx.insertInto('keg_fill').values(values).returning('id').executeTakeFirstOrThrow()).id;
}

/** The gravity figures a transfer and each of its fills carry (ABV to two decimals). */
export interface FillFigures {
  og: number | null;
  fg: number | null;
  abv: number | null;
}

export function fillFigures(figures: { og: number | null; fg: number | null; abv: number | null } | null | undefined): FillFigures {
  const abv = figures?.abv ?? null;
  return { og: figures?.og ?? null, fg: figures?.fg ?? null, abv: abv !== null ? Math.round(abv * 100) / 100 : null };
}

/** A transfer row's finings, CO2 and gravity columns. */
export function transferFigureValues(
  finings: { kind: string; amount: number | null; unit: 'g' | 'mL' | null } | null | undefined,
  co2Grams: number,
  f: FillFigures,
) {
  return { finings_kind: finings?.kind ?? null, finings_amount: finings?.amount ?? null, finings_unit: finings?.unit ?? null, co2_grams: co2Grams, ...f };
}

/** What every keg filled at one transfer shares. */
export interface TransferFill extends FillFigures {
  transferId: string;
  batchId: string;
  co2Grams: number;
  at: Date;
  bestBefore: Date | null;
}

/** A keg fill row: the transfer's share and the keg's own part. */
export function kegFillValues(
  fill: TransferFill,
  keg: { kegId: string; liters: number; cycleId: string | null; dissolvedOxygenPpb: number | null },
): Insertable<KegFillTable> {
  return {
    transfer_id: fill.transferId,
    keg_id: keg.kegId,
    batch_id: fill.batchId,
    volume_liters: keg.liters,
    remaining_liters: keg.liters,
    og: fill.og,
    fg: fill.fg,
    abv: fill.abv,
    sanitation_cycle_id: keg.cycleId,
    co2_grams: fill.co2Grams,
    filled_at: fill.at,
    best_before: fill.bestBefore,
    dissolved_oxygen_ppb: keg.dissolvedOxygenPpb,
  };
}

/** Transfers by id with their batch, fermenter and recorder, and the fills they made (by keg code). */
export async function transferRows(db: Database, ids: string[]) {
  return Promise.all([
    db
      .selectFrom('transfer as t')
      .innerJoin('batch as b', 'b.id', 't.batch_id')
      .innerJoin('equipment as f', 'f.id', 't.from_equipment_id')
      .leftJoin('app_user as u', 'u.id', 't.recorded_by')
      .selectAll('t')
      .select([
        'b.name as batch_name',
        'b.style as batch_style',
        'b.owner_id',
        'f.code as fermenter_code',
        'f.name as fermenter_name',
        'u.name as recorded_by_name',
      ])
      .where('t.id', 'in', ids)
      .execute(),
    db
      .selectFrom('keg_fill as kf')
      .innerJoin('equipment as k', 'k.id', 'kf.keg_id')
      .select(['kf.id', 'kf.transfer_id', 'kf.keg_id', 'k.code', 'kf.volume_liters', 'kf.sanitation_cycle_id', 'kf.dissolved_oxygen_ppb'])
      .where('kf.transfer_id', 'in', ids)
      .orderBy('k.code')
      .execute(),
  ]);
}

const transferSort = { transferredAt: 't.transferred_at', volumeLiters: 't.volume_liters' } as const;

/** The ids of one page of transfers, and the count of all that match. */
export async function transferPage(db: Database, q: TransferListQuery, range: { from?: Date; to?: Date }, ownerId?: string) {
  let base = db.selectFrom('transfer as t').innerJoin('batch as b', 'b.id', 't.batch_id').innerJoin('equipment as f', 'f.id', 't.from_equipment_id');
  if (ownerId) base = base.where('b.owner_id', '=', ownerId);
  if (q.batchId) base = base.where('t.batch_id', '=', q.batchId);
  if (q.fromEquipmentId) base = base.where('t.from_equipment_id', '=', q.fromEquipmentId);
  if (q.kegId)
    base = base.where((eb) =>
      eb.exists(eb.selectFrom('keg_fill as kf').select('kf.id').whereRef('kf.transfer_id', '=', 't.id').where('kf.keg_id', '=', q.kegId!)),
    );
  if (range.from) base = base.where('t.transferred_at', '>=', range.from);
  if (range.to) base = base.where('t.transferred_at', '<', range.to);
  if (q.q) base = base.where(containsAny(['b.name', 'f.code'], q.q));
  return paginate(base, (qb) => orderByAllowed(qb.select('t.id'), transferSort, q, 't.id'), q);
}

/** Batches still in a fermenter, each with the fermenter its latest booking holds it in. */
export async function candidateRows(db: Database) {
  return db
    .selectFrom('batch as b')
    .innerJoin('app_user as u', 'u.id', 'b.owner_id')
    .leftJoinLateral(
      (eb) =>
        eb
          .selectFrom('booking as bk')
          .innerJoin('equipment as f', 'f.id', 'bk.equipment_id')
          .select(['f.id', 'f.code', 'f.name', 'f.state', 'f.attributes'])
          .whereRef('bk.batch_id', '=', 'b.id')
          .where('f.kind', '=', 'fermenter')
          .where('bk.state', '<>', 'cancelled')
          .orderBy('bk.starts_at', 'desc')
          .limit(1)
          .as('f'),
      (join) => join.onTrue(),
    )
    .select([
      'b.id',
      'b.name',
      'b.style',
      'b.status',
      'b.volume_liters',
      'u.name as owner_name',
      'f.id as f_id',
      'f.code as f_code',
      'f.name as f_name',
      'f.state as f_state',
      'f.attributes as f_attributes',
    ])
    .where('b.status', 'in', ['fermenting', 'conditioning'])
    .orderBy('f.code')
    .orderBy('b.name')
    .execute();
}
