import { sql, type Insertable, type Updateable } from 'kysely';
import type { SanitationCycleTable, SanitationStepTable } from '../../db/tables/cellar-operations.ts';
import { jsonArrayFrom } from 'kysely/helpers/postgres';
import type { CycleEvaluation } from '../../../shared/cellar/sanitation-rules.ts';
import type { SanitationSettings } from '../../../shared/schemas/cellar-settings.ts';
import type { SanitationCycleListQuery, SanitationStepInput, SanitationStepView } from '../../../shared/schemas/sanitation.ts';
import type { Database } from '../../db/database.ts';
import { containsAny, keptCount, orderByAllowed, paginate } from '../../lib/paginate.ts';
import { effectiveStateSql, freshUntilSql, lapsedSql } from '../equipment/vessel-state.ts';

export type CycleRow = {
  id: string;
  equipment_id: string;
  code: string;
  name: string;
  kind: string;
  outcome: 'ready' | 'cleaned' | 'needs_cleaning';
  complete: boolean;
  issues: unknown;
  started_at: Date;
  completed_at: Date;
  fresh_until: Date | null;
  recorded_by: string | null;
  recorded_by_name: string | null;
  notes: string;
  created_at: Date;
  steps: {
    step: SanitationStepView['step'];
    chemical_id: string | null;
    chemical: string | null;
    concentration: number | string | null;
    concentration_unit: SanitationStepView['concentrationUnit'];
    contact_minutes: number | string | null;
    minimum_contact_minutes: number | string | null;
    purge_method: 'flush' | 'push_out' | null;
    co2_grams: number | string | null;
    solution_liters: number | string | null;
    at: string;
    performed_by: string | null;
    performed_by_name: string | null;
    ok: boolean;
    note: string;
    exception_reason: string | null;
    exception_rules: string[] | null;
    vented: boolean | null;
    pushed_into_equipment_id: string | null;
    pushed_into_code: string | null;
  }[];
};

function cycleQuery(db: Database) {
  return db
    .selectFrom('sanitation_cycle as c')
    .innerJoin('equipment as e', 'e.id', 'c.equipment_id')
    .leftJoin('app_user as r', 'r.id', 'c.recorded_by')
    .selectAll('c')
    .select((eb) => [
      'e.code',
      'e.name',
      'e.kind',
      'r.name as recorded_by_name',
      jsonArrayFrom(
        eb
          .selectFrom('sanitation_step as s')
          .leftJoin('app_user as p', 'p.id', 's.performed_by')
          .leftJoin('equipment as pk', 'pk.id', 's.pushed_into_equipment_id')
          .select([
            's.step',
            's.chemical_id',
            's.chemical',
            's.concentration',
            's.concentration_unit',
            's.contact_minutes',
            's.minimum_contact_minutes',
            's.purge_method',
            's.co2_grams',
            's.solution_liters',
            's.at',
            's.performed_by',
            'p.name as performed_by_name',
            's.ok',
            's.note',
            's.exception_reason',
            's.exception_rules',
            's.vented',
            's.pushed_into_equipment_id',
            'pk.code as pushed_into_code',
          ])
          .whereRef('s.cycle_id', '=', 'c.id')
          .orderBy('s.position'),
      ).as('steps'),
    ]);
}

export async function cycleRows(db: Database, ids: string[]): Promise<CycleRow[]> {
  return await cycleQuery(db).where('c.id', 'in', ids).execute();
}

const cycleSort = {
  completedAt: 'c.completed_at',
  startedAt: 'c.started_at',
  equipmentCode: 'e.code',
  outcome: 'c.outcome',
} as const;

/** The total of a list filtered by outcome alone, from the kept counts of cycles by outcome. */
function keptCycleTotal(db: Database, q: SanitationCycleListQuery, range: { from?: Date; to?: Date }) {
  if (q.equipmentId || q.kind || range.from || range.to || q.q) return undefined;
  return () => keptCount(db, 'sanitation_cycle', q.outcome ? { in: [q.outcome] } : {});
}

/** The ids of one page of cycles, and the count of all that match (or kept). */
export async function cyclePage(db: Database, q: SanitationCycleListQuery, range: { from?: Date; to?: Date }) {
  let base = db.selectFrom('sanitation_cycle as c').innerJoin('equipment as e', 'e.id', 'c.equipment_id');
  if (q.equipmentId) base = base.where('c.equipment_id', '=', q.equipmentId);
  if (q.kind) base = base.where('e.kind', '=', q.kind);
  if (q.outcome) base = base.where('c.outcome', '=', q.outcome);
  if (range.from) base = base.where('c.completed_at', '>=', range.from);
  if (range.to) base = base.where('c.completed_at', '<', range.to);
  if (q.q) base = base.where(containsAny(['e.code', 'e.name'], q.q));
  return paginate(base, (qb) => orderByAllowed(qb.select('c.id'), cycleSort, q, 'c.id'), q, keptCycleTotal(db, q, range));
}

const statusSortColumn = { code: 'v.code', state: 'v.effective_state', freshUntil: 'v.fresh_until', lastCycleAt: 'v.last_cycle_at' } as const;

export interface VesselStatusQuery {
  kind?: 'fermenter' | 'keg' | undefined;
  state?: string | undefined;
  q?: string | undefined;
  sort: keyof typeof statusSortColumn;
  order: 'asc' | 'desc';
  page: number;
  pageSize: number;
}

/** One page of fermenters and kegs with their sanitation standing (lapses applied), and their latest cycles. */
export async function vesselStatusPage(db: Database, q: VesselStatusQuery, now: Date) {
  const inner = db
    .selectFrom('equipment as e')
    .where('e.kind', 'in', ['fermenter', 'keg'])
    .select((eb) => [
      'e.id',
      'e.code',
      'e.name',
      'e.kind',
      'e.state',
      effectiveStateSql(eb.ref('e.id'), eb.ref('e.state'), now).as('effective_state'),
      lapsedSql(eb.ref('e.id'), eb.ref('e.state'), now).as('lapsed'),
      freshUntilSql(eb.ref('e.id')).as('fresh_until'),
      eb
        .selectFrom('equipment_state_change as sc')
        .select('sc.reason')
        .whereRef('sc.equipment_id', '=', 'e.id')
        .orderBy('sc.at', 'desc')
        .orderBy('sc.id', 'desc')
        .limit(1)
        .as('state_reason'),
      sql<string | null>`(select lc.id::text from sanitation_cycle lc where lc.equipment_id = e.id order by lc.completed_at desc limit 1)`.as('last_cycle_id'),
      sql<Date | null>`(select max(lc.completed_at) from sanitation_cycle lc where lc.equipment_id = e.id)`.as('last_cycle_at'),
    ]);
  let base = db.selectFrom(inner.as('v'));
  if (q.kind) base = base.where('v.kind', '=', q.kind);
  if (q.state) base = base.where('v.effective_state', '=', q.state as never);
  if (q.q) base = base.where(containsAny(['v.code', 'v.name'], q.q));
  const { rows, total } = await paginate(base, (qb) => orderByAllowed(qb.selectAll('v'), statusSortColumn, q, 'v.code'), q);
  const lastIds = rows.map((r) => r.last_cycle_id).filter((v): v is string => Boolean(v));
  const last = lastIds.length
    ? await db.selectFrom('sanitation_cycle').select(['id', 'outcome', 'completed_at', 'fresh_until']).where('id', 'in', lastIds).execute()
    : [];
  return { rows, total, last };
}

/** The columns of a step row that follow from how the co-op's rules judged the step. */
export function judgedStepValues(cycleId: string, position: number, st: CycleEvaluation['steps'][number]) {
  const { step, chemicalId, chemicalName, concentration, concentrationUnit, minimumContactMinutes, ok } = st;
  return {
    cycle_id: cycleId,
    position,
    step,
    chemical_id: chemicalId,
    chemical: chemicalName,
    concentration,
    concentration_unit: concentrationUnit,
    minimum_contact_minutes: minimumContactMinutes,
    ok,
  };
}

/** The rows of a cycle's steps, as the co-op's rules judged them (`ev`), from the steps as entered (`raw`). */
export function stepRows(cycleId: string, ev: CycleEvaluation, raw: readonly SanitationStepInput[], settings: SanitationSettings, actorId: string | null) {
  return ev.steps.map((st, position) => {
    const entered = raw[st.index]!;
    return {
      ...judgedStepValues(cycleId, position, st),
      contact_minutes: entered.contactMinutes ?? null,
      purge_method: st.step === 'purge' ? (entered.purgeMethod ?? 'flush') : null,
      co2_grams: st.step === 'purge' ? (entered.co2Grams ?? settings.co2GramsPerPurge) : null,
      solution_liters: entered.solutionLiters ?? null,
      performed_by: entered.performedBy ?? actorId,
      at: entered.at,
      note: entered.note ?? '',
      exception_reason: st.exception ? st.exception.reason : null,
      exception_rules: st.exception ? st.exception.rules : [],
      vented: st.step === 'clean' ? (entered.vented ?? null) : null,
      pushed_into_equipment_id: st.step === 'purge' && entered.purgeMethod === 'push_out' ? (entered.pushedIntoEquipmentId ?? null) : null,
    };
  });
}

/** The fields of a cycle row that follow from its evaluation. */
export function cycleFields(ev: CycleEvaluation, settings: SanitationSettings) {
  return {
    started_at: ev.startedAt,
    completed_at: ev.completedAt,
    outcome: ev.outcome,
    complete: ev.complete,
    issues: JSON.stringify(ev.issues),
    freshness_days: ev.complete ? settings.freshnessDays : null,
    fresh_until: ev.freshUntil,
  };
}

export async function activePeople(db: Database, ids: string[]): Promise<string[]> {
  return (await db.selectFrom('app_user').select('id').where('id', 'in', ids).where('is_active', '=', true).execute()).map((r) => r.id);
}

export async function equipmentKinds(db: Database, ids: string[]) {
  return db.selectFrom('equipment').select(['id', 'kind']).where('id', 'in', ids).execute();
}

export async function lockVessel(trx: Database, id: string) {
  return trx.selectFrom('equipment').select(['id', 'code', 'kind', 'state']).where('id', '=', id).forUpdate().executeTakeFirst();
}

export async function vesselStateRow(db: Database, id: string) {
  return db.selectFrom('equipment').select(['id', 'code', 'state']).where('id', '=', id).executeTakeFirstOrThrow();
}

export async function lockCycle(trx: Database, id: string) {
  return trx.selectFrom('sanitation_cycle').selectAll().where('id', '=', id).forUpdate().executeTakeFirst();
}

/** The id of a vessel's latest cycle (by completion, then recording). */
export async function latestCycleId(trx: Database, equipmentId: string): Promise<string> {
  const latest = await trx
    .selectFrom('sanitation_cycle')
    .select('id')
    .where('equipment_id', '=', equipmentId)
    .orderBy('completed_at', 'desc')
    .orderBy('created_at', 'desc')
    .limit(1)
    .executeTakeFirstOrThrow();
  return latest.id;
}

export async function stepsOf(trx: Database, cycleId: string) {
  return trx.selectFrom('sanitation_step').selectAll().where('cycle_id', '=', cycleId).orderBy('position').execute();
}

export async function insertCycle(trx: Database, values: Insertable<SanitationCycleTable>): Promise<string> {
  return (await trx.insertInto('sanitation_cycle').values(values).returning('id').executeTakeFirstOrThrow()).id;
}

export async function updateCycle(trx: Database, id: string, values: Updateable<SanitationCycleTable>): Promise<void> {
  await trx.updateTable('sanitation_cycle').set(values).where('id', '=', id).execute();
}

/** Writes a cycle's steps, in place of any it had. */
export async function replaceSteps(trx: Database, cycleId: string, rows: Insertable<SanitationStepTable>[]): Promise<void> {
  await trx.deleteFrom('sanitation_step').where('cycle_id', '=', cycleId).execute();
  await trx.insertInto('sanitation_step').values(rows).execute();
}
