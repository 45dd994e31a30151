import { sql, type Insertable } from 'kysely';
import type { KegListQuery, KegHistoryEntry, KegWhereabouts } from '../../../shared/schemas/kegs.ts';
import { defaultShelfLifeSettings, type BestBeforeState } from '../../../shared/cellar/trace.ts';
import type { Database } from '../../db/database.ts';
import type { KegMovementTable } from '../../db/tables/cellar-operations.ts';
import { containsPattern, orderByAllowed, paginate } from '../../lib/paginate.ts';
import { conflict, notFound } from '../../lib/http-problem.ts';
import { effectiveStateSql, freshUntilSql } from '../equipment/vessel-state.ts';

export interface KegVisibility {
  /** Restrict to kegs this member has out or whose beer is theirs. */
  memberId?: string | undefined;
  /** Show who holds each keg. */
  showOwner: boolean;
}

/** Everything a keg row shows, one query: whereabouts, tap, holder, contents, carbonation. */
function kegBase(db: Database) {
  return db
    .selectFrom('equipment as e')
    .leftJoin('keg_whereabouts as kw', 'kw.keg_id', 'e.id')
    .leftJoin('equipment as tap', 'tap.id', 'kw.tap_id')
    .leftJoin('app_user as m', 'm.id', 'kw.member_id')
    .leftJoin('keg_fill as kf', (j) => j.onRef('kf.keg_id', '=', 'e.id').on('kf.emptied_at', 'is', null))
    .leftJoin('batch as b', 'b.id', 'kf.batch_id')
    .leftJoin('transfer as tr', 'tr.id', 'kf.transfer_id')
    .leftJoin('carbonation_plan as cp', (j) => j.onRef('cp.keg_id', '=', 'e.id').on('cp.state', '=', 'active'))
    .where('e.kind', '=', 'keg');
}
type KegBase = ReturnType<typeof kegBase>;

/** Where a keg is, by the aliases `kw` (its whereabouts), `tap` (the tap it is on) and `m` (the member holding it). */
export const kegWhereaboutsColumns = [
  sql<KegWhereabouts>`coalesce(kw.whereabouts, 'cellar')`.as('whereabouts'),
  'kw.tap_id',
  'tap.code as tap_code',
  'tap.name as tap_name',
  'tap.attributes as tap_attributes',
  'kw.member_id',
  'm.name as member_name',
  'kw.due_at',
] as const;

function selectKeg(q: KegBase, now: Date) {
  return q.select((eb) => [
    'e.id',
    'e.code',
    'e.name',
    'e.capacity_liters',
    'e.attributes',
    'e.state as stored_state',
    effectiveStateSql(eb.ref('e.id'), eb.ref('e.state'), now).as('state'),
    freshUntilSql(eb.ref('e.id')).as('fresh_until'),
    ...kegWhereaboutsColumns,
    'kw.since',
    'kw.checked_out_at',
    sql<boolean>`(kw.whereabouts = 'with_member' and kw.due_at < ${now})`.as('overdue'),
    // Reminders to bring it back, while it is out with the member reminded.
    sql<Date | null>`(select max(r.sent_at) from reminder r where r.keg_id = e.id and kw.whereabouts = 'with_member'
      and r.member_id = kw.member_id and r.sent_at >= kw.checked_out_at)`.as('last_reminded_at'),
    'kf.id as fill_id',
    'kf.batch_id',
    'b.name as batch_name',
    'b.style as batch_style',
    'b.owner_id as batch_owner_id',
    'kf.volume_liters',
    'kf.remaining_liters',
    'kf.og',
    'kf.fg',
    'kf.abv',
    'kf.filled_at',
    'kf.best_before',
    'kf.dissolved_oxygen_ppb',
    // Past, or within the co-op's warning days of it (Settings, shelf life).
    sql<BestBeforeState | null>`(case when kf.best_before is null then null when kf.best_before <= ${now} then 'past'
      when kf.best_before <= ${now}::timestamptz + make_interval(days => coalesce((select (s.value->>'nearDays')::int from setting s where s.key = 'shelf_life'), ${defaultShelfLifeSettings.nearDays})) then 'near'
      else 'ok' end)`.as('best_before_state'),
    'b.allergens',
    'tr.finings_kind',
    'tr.finings_amount',
    'tr.finings_unit',
    'cp.id as plan_id',
    'cp.method as plan_method',
    'cp.target_volumes',
    'cp.serving_pressure_kpa',
    'cp.fast_pressure_kpa',
    'cp.lower_pressure_at',
    'cp.pressure_lowered_at',
    'cp.ready_at',
  ]);
}
export type KegRow = Awaited<ReturnType<ReturnType<typeof selectKeg>['executeTakeFirstOrThrow']>>;

const kegSort = {
  code: 'e.code',
  state: 'state',
  whereabouts: 'whereabouts',
  dueAt: 'kw.due_at',
  remainingLiters: 'kf.remaining_liters',
} as const;

/** One page of kegs with the list's filters, and the count of all that match. */
export async function kegPage(db: Database, q: KegListQuery, vis: KegVisibility, now: Date): Promise<{ rows: KegRow[]; total: number }> {
  let base = kegBase(db);
  if (vis.memberId) {
    const me = vis.memberId;
    base = base.where((eb) => eb.or([eb('kw.member_id', '=', me), eb('b.owner_id', '=', me)]));
  }
  if (q.whereabouts === 'cellar') base = base.where((eb) => eb.or([eb('kw.whereabouts', 'is', null), eb('kw.whereabouts', '=', 'cellar')]));
  else if (q.whereabouts) base = base.where('kw.whereabouts', '=', q.whereabouts);
  if (q.state) base = base.where((eb) => eb(effectiveStateSql(eb.ref('e.id'), eb.ref('e.state'), now), '=', q.state!));
  if (q.overdue !== undefined) {
    base = q.overdue
      ? base.where('kw.whereabouts', '=', 'with_member').where('kw.due_at', '<', now)
      : base.where((eb) => eb.or([eb('kw.due_at', 'is', null), eb('kw.due_at', '>=', now)]));
  }
  if (q.memberId) base = base.where('kw.member_id', '=', q.memberId);
  if (q.q) {
    const like = containsPattern(q.q);
    base = base.where((eb) => eb.or([eb('e.code', 'ilike', like), eb('e.name', 'ilike', like), eb('b.name', 'ilike', like)]));
  }
  return paginate(base, (qb) => orderByAllowed(selectKeg(qb, now), kegSort, q, 'e.code'), q);
}

export async function kegRow(db: Database, id: string, now: Date): Promise<KegRow | undefined> {
  return selectKeg(kegBase(db).where('e.id', '=', id), now).executeTakeFirst();
}

/** Every tap position, and the kegs on taps. */
export async function tapRows(db: Database, now: Date) {
  return Promise.all([
    db.selectFrom('equipment').select(['id', 'code', 'name', 'state', 'attributes']).where('kind', '=', 'tap').orderBy('code').execute(),
    selectKeg(kegBase(db).where('kw.tap_id', 'is not', null), now).execute(),
  ]);
}

// ---------------------------------------------------------------------------------------------
// Inside a change's transaction.
// ---------------------------------------------------------------------------------------------

/** Locks a keg's row and reads where it is; 404 when the id names no keg. */
export async function lockKeg(trx: Database, id: string) {
  const keg = await trx
    .selectFrom('equipment as e')
    .leftJoin('keg_whereabouts as kw', 'kw.keg_id', 'e.id')
    .select(['e.id', 'e.code', 'e.kind', 'e.state', 'kw.whereabouts', 'kw.tap_id', 'kw.member_id', 'kw.due_at'])
    .where('e.id', '=', id)
    .forUpdate('e')
    .executeTakeFirst();
  if (!keg || keg.kind !== 'keg') throw notFound('Keg');
  return { ...keg, whereabouts: keg.whereabouts ?? 'cellar' };
}

export interface WhereaboutsValues {
  whereabouts: KegWhereabouts;
  tap_id: string | null;
  member_id: string | null;
  checked_out_at: Date | null;
  due_at: Date | null;
  since: Date;
  updated_by: string;
}

/** Writes where a keg is now (one row per keg). */
export async function writeWhereabouts(trx: Database, kegId: string, values: WhereaboutsValues): Promise<void> {
  await trx
    .insertInto('keg_whereabouts')
    .values({ keg_id: kegId, ...values })
    .onConflict((oc) => oc.column('keg_id').doUpdateSet(values))
    .execute();
}

export async function putWhereabouts(
  trx: Database,
  kegId: string,
  w: { whereabouts: KegWhereabouts; tapId?: string | null; memberId?: string | null; checkedOutAt?: Date | null; dueAt?: Date | null },
  actorId: string,
  now: Date,
) {
  await writeWhereabouts(trx, kegId, {
    whereabouts: w.whereabouts,
    tap_id: w.tapId ?? null,
    member_id: w.memberId ?? null,
    checked_out_at: w.checkedOutAt ?? null,
    due_at: w.dueAt ?? null,
    since: now,
    updated_by: actorId,
  });
}

/** A second keg on one tap breaks the tap's unique index: 409. */
export function mapTapTaken(err: unknown, tapCode: string): never {
  if ((err as { code?: string })?.code === '23505') throw conflict(`Tap ${tapCode} already has a keg on it.`);
  throw err;
}

/** Empties a keg's open fill and closes its active carbonation plans. */
export async function closeFill(trx: Database, kegId: string, reason: string, now: Date) {
  await trx
    .updateTable('keg_fill')
    .set({ emptied_at: now, emptied_reason: reason, remaining_liters: 0 })
    .where('keg_id', '=', kegId)
    .where('emptied_at', 'is', null)
    .execute();
  await trx.updateTable('carbonation_plan').set({ state: 'done', updated_at: now }).where('keg_id', '=', kegId).where('state', '=', 'active').execute();
}

/** Records a keg's movement; returns its id. */
export async function addMovement(trx: Database, values: Insertable<KegMovementTable>): Promise<string> {
  const row = await trx.insertInto('keg_movement').values(values).returning('id').executeTakeFirstOrThrow();
  return row.id;
}

export async function activeMember(trx: Database, id: string) {
  return trx.selectFrom('app_user').select(['id', 'name', 'roles', 'is_active']).where('id', '=', id).executeTakeFirst();
}

export async function userName(trx: Database, id: string): Promise<string | undefined> {
  return (await trx.selectFrom('app_user').select('name').where('id', '=', id).executeTakeFirst())?.name;
}

/** Locks a tap position's row. */
export async function lockTap(trx: Database, id: string) {
  return trx.selectFrom('equipment').select(['id', 'code', 'kind', 'state']).where('id', '=', id).forUpdate().executeTakeFirst();
}

/** The code of another keg on this tap, if any. */
export async function otherKegOnTap(trx: Database, tapId: string, kegId: string): Promise<string | undefined> {
  const other = await trx
    .selectFrom('keg_whereabouts as kw')
    .innerJoin('equipment as e', 'e.id', 'kw.keg_id')
    .select('e.code')
    .where('kw.tap_id', '=', tapId)
    .where('kw.keg_id', '<>', kegId)
    .executeTakeFirst();
  return other?.code;
}

export async function openFill(trx: Database, kegId: string) {
  return trx
    .selectFrom('keg_fill')
    .select(['id', 'volume_liters', 'remaining_liters'])
    .where('keg_id', '=', kegId)
    .where('emptied_at', 'is', null)
    .executeTakeFirst();
}

export async function setFillLevel(trx: Database, fillId: string, remainingLiters: number): Promise<void> {
  await trx.updateTable('keg_fill').set({ remaining_liters: remainingLiters }).where('id', '=', fillId).execute();
}

// ---------------------------------------------------------------------------------------------
// History.
// ---------------------------------------------------------------------------------------------

export interface KegHistoryRow {
  at: Date;
  kind: KegHistoryEntry['kind'];
  code: string;
  a: string | null;
  b: string | null;
  c: string | null;
  actor: string | null;
  ref_id: string | null;
}

/** A page of a keg's whole history, newest first: movements, state changes, cycles, fills, plans, one query. */
export async function kegHistoryRows(db: Database, kegId: string, page: number, pageSize: number): Promise<{ rows: KegHistoryRow[]; total: number }> {
  const events = sql<KegHistoryRow>`
    select km.at, 'movement' as kind, km.action as code, km.from_whereabouts as a, km.to_whereabouts as b,
      concat_ws(' · ', nullif(mu.name, ''), case when km.due_at is not null and km.action = 'checked_out' then 'due ' || to_char(km.due_at at time zone 'UTC', 'YYYY-MM-DD') end,
        t.code, nullif(km.note, '')) as c,
      au.name as actor, km.id::text as ref_id
    from keg_movement km left join app_user mu on mu.id = km.member_id left join app_user au on au.id = km.actor_id left join equipment t on t.id = km.tap_id
    where km.keg_id = ${kegId}
    union all
    select sc.at, 'state', sc.to_state, sc.from_state, sc.to_state, sc.reason, au.name, sc.id::text
    from equipment_state_change sc left join app_user au on au.id = sc.actor_id where sc.equipment_id = ${kegId}
    union all
    select c.completed_at, 'sanitation', c.outcome, null, null,
      (select string_agg(s.step || coalesce(' ' || s.chemical, '') || coalesce(' ' || trim_scale(s.contact_minutes)::text || ' min', ''), ', ' order by s.position) from sanitation_step s where s.cycle_id = c.id),
      au.name, c.id::text
    from sanitation_cycle c left join app_user au on au.id = c.recorded_by where c.equipment_id = ${kegId}
    union all
    select kf.filled_at, 'fill', null, b.name, kf.volume_liters::text,
      concat_ws(' · ', 'from ' || f.code, case when kf.abv is not null then kf.abv::text || ' % ABV' end), au.name, kf.id::text
    from keg_fill kf join batch b on b.id = kf.batch_id left join transfer t on t.id = kf.transfer_id
      left join equipment f on f.id = t.from_equipment_id left join app_user au on au.id = t.recorded_by
    where kf.keg_id = ${kegId}
    union all
    select kf.emptied_at, 'emptied', kf.emptied_reason, b.name, null, null, null, kf.id::text
    from keg_fill kf join batch b on b.id = kf.batch_id where kf.keg_id = ${kegId} and kf.emptied_at is not null
    union all
    select cp.created_at, 'carbonation', cp.method, cp.target_volumes::text, cp.serving_pressure_kpa::text, cp.state, au.name, cp.id::text
    from carbonation_plan cp left join app_user au on au.id = cp.created_by where cp.keg_id = ${kegId}`;
  const [count, rows] = await Promise.all([
    sql<{ total: number }>`select count(*)::int as total from (${events}) x`.execute(db),
    sql<KegHistoryRow>`
      select * from (${events}) x order by at desc, kind limit ${pageSize} offset ${(page - 1) * pageSize}`.execute(db),
  ]);
  return { rows: rows.rows, total: count.rows[0]?.total ?? 0 };
}
