import { sql } from 'kysely';
import type { InspectionKind, MaintenanceListQuery, MaintenanceStatus } from '../../../shared/schemas/inspections.ts';
import type { Database } from '../../db/database.ts';
import { containsPattern, paginate } from '../../lib/paginate.ts';
import { stateChangeRows } from './equipment.repository.ts';

/**
 * One row per item and inspection kind on record: the latest inspection (passed or failed) and
 * when the next is due. A cylinder's hydrostatic test is due on its registry date
 * (`attributes.hydroTestDue`, through the end of that day in the co-op's time zone), which a passing
 * test moves on; a cylinder with that date and no test on record has a row too.
 */
function duesSql(timeZone: string) {
  return sql`
    with latest as (
      select distinct on (i.equipment_id, i.kind) i.equipment_id, i.kind, i.at, i.passed, i.next_due_at
      from equipment_inspection i
      order by i.equipment_id, i.kind, i.at desc, i.created_at desc
    ), cylinder_due as (
      select e.id, ((((e.attributes->>'hydroTestDue')::date) + 1)::timestamp at time zone ${timeZone}) as due_at
      from equipment e
      where e.kind = 'co2_cylinder' and (e.attributes->>'hydroTestDue') ~ '^\\d{4}-\\d{2}-\\d{2}$'
    )
    select l.equipment_id, l.kind, l.at as last_at, not l.passed as failed,
      coalesce(case when l.kind = 'hydrostatic_test' then cd.due_at end, l.next_due_at) as due_at
    from latest l left join cylinder_due cd on cd.id = l.equipment_id
    union all
    select cd.id, 'hydrostatic_test', null, false, cd.due_at
    from cylinder_due cd
    where not exists (select 1 from latest l where l.equipment_id = cd.id and l.kind = 'hydrostatic_test')`;
}

export interface DueRow {
  equipment_id: string;
  kind: InspectionKind;
  last_at: Date | null;
  failed: boolean;
  due_at: Date | null;
}

/** The due rows of the given items, by item and kind. */
export async function dueRowsOf(db: Database, timeZone: string, ids: string[]): Promise<DueRow[]> {
  const { rows } = await sql<DueRow>`select * from (${duesSql(timeZone)}) d where d.equipment_id = any(${ids}::uuid[]) order by d.equipment_id, d.kind`.execute(
    db,
  );
  return rows;
}

/** Idle items (ready, cleaned or waiting for cleaning) with an inspection failed or due by `now`. */
export async function idleItemsWithLapses(db: Database, timeZone: string, now: Date): Promise<string[]> {
  const { rows } = await sql<{ equipment_id: string }>`
    select distinct d.equipment_id from (${duesSql(timeZone)}) d join equipment e on e.id = d.equipment_id
    where e.state in ('ready', 'cleaned', 'needs_cleaning') and (d.failed or d.due_at <= ${now})`.execute(db);
  return rows.map((r) => r.equipment_id);
}

/** One page of inspections failed, past due or due before `soon`, with their items, and the count of all. */
export async function maintenancePage(db: Database, q: MaintenanceListQuery, timeZone: string, now: Date, soon: Date) {
  const dues = sql<DueRow & { status: MaintenanceStatus | null }>`(
      select d.*, case when d.failed then 'failed' when d.due_at <= ${now} then 'overdue' when d.due_at <= ${soon} then 'due_soon' end as status
      from (${duesSql(timeZone)}) d
    )`.as('d');
  let base = db.selectFrom(dues).innerJoin('equipment as e', 'e.id', 'd.equipment_id').where('d.status', 'is not', null);
  if (q.status) base = base.where('d.status', '=', q.status);
  if (q.equipmentKind) base = base.where('e.kind', '=', q.equipmentKind);
  if (q.q) {
    const like = containsPattern(q.q);
    base = base.where((eb) => eb.or([eb('e.code', 'ilike', like), eb('e.name', 'ilike', like)]));
  }
  const dir = q.order === 'desc' ? sql`desc` : sql`asc`;
  const order =
    q.sort === 'code'
      ? sql`split_part(e.code, '-', 1) ${dir}, nullif(split_part(e.code, '-', 2), '')::int ${dir}`
      : q.sort === 'kind'
        ? sql`d.kind ${dir}`
        : sql`d.due_at ${dir} nulls first`;
  return paginate(
    base,
    (qb) =>
      qb
        .select(['e.id', 'e.code', 'e.name', 'e.kind as equipment_kind', 'e.state', 'd.kind', 'd.due_at', 'd.status', 'd.last_at'])
        .orderBy(sql`${order}, d.due_at, split_part(e.code, '-', 1), nullif(split_part(e.code, '-', 2), '')::int, d.kind`),
    q,
  );
}

export async function inspectionRows(db: Database, equipmentId: string, limit: number) {
  return await db
    .selectFrom('equipment_inspection as i')
    .leftJoin('app_user as u', 'u.id', 'i.recorded_by')
    .select(['i.id', 'i.kind', 'i.at', 'i.passed', 'i.next_due_at', 'i.note', 'i.recorded_by', 'u.name as recorder_name'])
    .where('i.equipment_id', '=', equipmentId)
    .orderBy('i.at', 'desc')
    .orderBy('i.created_at', 'desc')
    .limit(limit)
    .execute();
}

/** An item as an inspection needs it, locked for the rest of the transaction. */
export async function lockItemForInspection(trx: Database, id: string) {
  return await trx.selectFrom('equipment').select(['id', 'code', 'kind', 'state', 'attributes']).where('id', '=', id).forUpdate().executeTakeFirstOrThrow();
}

export async function insertInspection(
  trx: Database,
  row: { equipmentId: string; kind: InspectionKind; at: Date; passed: boolean; nextDueAt: Date | null; note: string; recordedBy: string },
) {
  return await trx
    .insertInto('equipment_inspection')
    .values({
      equipment_id: row.equipmentId,
      kind: row.kind,
      at: row.at,
      passed: row.passed,
      next_due_at: row.nextDueAt,
      note: row.note,
      recorded_by: row.recordedBy,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
}

/** Moves a cylinder's registry test date (`attributes.hydroTestDue`, a calendar day). */
export async function setHydroTestDue(trx: Database, id: string, date: string, now: Date): Promise<void> {
  await trx
    .updateTable('equipment')
    .set({ attributes: sql`jsonb_set(attributes, '{hydroTestDue}', to_jsonb(${date}::text))`, updated_at: now })
    .where('id', '=', id)
    .execute();
}

/** The reason of an item's latest state change. */
export async function lastStateChangeReason(trx: Database, id: string): Promise<string | undefined> {
  return (await stateChangeRows(trx, id, 1))[0]?.reason;
}
