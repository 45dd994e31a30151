import type { Insertable, Updateable } from 'kysely';
import type { CarbonationPlanTable } from '../../db/tables/cellar-operations.ts';
import type { Database } from '../../db/database.ts';
import { orderByAllowed, paginate, type PageRequest, type SortRequest } from '../../lib/paginate.ts';

/** A piece of equipment's kind (and, for a tap, the line recorded on it), or undefined when there is none. */
export async function equipmentWithAttributes(db: Database, id: string) {
  return db.selectFrom('equipment').select(['id', 'kind', 'attributes']).where('id', '=', id).executeTakeFirst();
}

/** The tap a keg is on, if any. */
export async function kegTapId(db: Database, kegId: string): Promise<string | null> {
  const kw = await db.selectFrom('keg_whereabouts').select('tap_id').where('keg_id', '=', kegId).executeTakeFirst();
  return kw?.tap_id ?? null;
}

/** A keg's registry attributes, undefined when there is no such keg. */
export async function kegAttributes(db: Database, kegId: string) {
  return (await db.selectFrom('equipment').select('attributes').where('id', '=', kegId).where('kind', '=', 'keg').executeTakeFirst())?.attributes;
}

export async function lockKeg(trx: Database, id: string) {
  return trx.selectFrom('equipment').select(['id', 'code', 'kind', 'state']).where('id', '=', id).forUpdate().executeTakeFirst();
}

/** The id of the fill a keg holds now, if any. */
export async function openFillId(trx: Database, kegId: string): Promise<string | null> {
  return (await trx.selectFrom('keg_fill').select('id').where('keg_id', '=', kegId).where('emptied_at', 'is', null).executeTakeFirst())?.id ?? null;
}

/** Marks a keg's active plans superseded; answers them with their queued reminders. */
export async function supersedeActivePlans(trx: Database, kegId: string, now: Date) {
  return trx
    .updateTable('carbonation_plan')
    .set({ state: 'superseded', updated_at: now })
    .where('keg_id', '=', kegId)
    .where('state', '=', 'active')
    .returning(['id', 'reminder_job_id'])
    .execute();
}

export async function insertPlan(trx: Database, values: Insertable<CarbonationPlanTable>): Promise<string> {
  return (await trx.insertInto('carbonation_plan').values(values).returning('id').executeTakeFirstOrThrow()).id;
}

export async function updatePlan(trx: Database, id: string, values: Updateable<CarbonationPlanTable>): Promise<void> {
  await trx.updateTable('carbonation_plan').set(values).where('id', '=', id).execute();
}

/** A plan locked for a change, with its keg's code and the code of the tap the keg is on. */
export async function lockPlan(trx: Database, id: string) {
  return trx
    .selectFrom('carbonation_plan as cp')
    .innerJoin('equipment as k', 'k.id', 'cp.keg_id')
    .leftJoin('keg_whereabouts as kw', 'kw.keg_id', 'cp.keg_id')
    .leftJoin('equipment as t', 't.id', 'kw.tap_id')
    .selectAll('cp')
    .select(['k.code', 't.code as tap_code'])
    .where('cp.id', '=', id)
    .forUpdate('cp')
    .executeTakeFirst();
}

/** Everyone on the brewer-on-duty rota who can sign in. */
export async function activeBrewers(db: Database) {
  return db
    .selectFrom('app_user')
    .select(['email', 'name'])
    .where('is_active', '=', true)
    .where((eb) => eb(eb.val('brewer_on_duty'), '=', eb.fn.any('roles')))
    .execute();
}

/** Active fast starts whose lowering was due by `before` and neither done nor reminded of. */
export async function unremindedPlanIds(db: Database, before: Date): Promise<string[]> {
  const rows = await db
    .selectFrom('carbonation_plan')
    .select('id')
    .where('state', '=', 'active')
    .where('method', '=', 'fast_start')
    .where('pressure_lowered_at', 'is', null)
    .where('reminder_sent_at', 'is', null)
    .where('lower_pressure_at', '<=', before)
    .execute();
  return rows.map((r) => r.id);
}

/** Plans by id with their keg's code, the batch of the fill and who made them. */
export async function planRows(db: Database, ids: string[]) {
  return db
    .selectFrom('carbonation_plan as cp')
    .innerJoin('equipment as k', 'k.id', 'cp.keg_id')
    .leftJoin('keg_fill as kf', 'kf.id', 'cp.keg_fill_id')
    .leftJoin('batch as b', 'b.id', 'kf.batch_id')
    .leftJoin('app_user as u', 'u.id', 'cp.created_by')
    .selectAll('cp')
    .select(['k.code as keg_code', 'b.name as batch_name', 'u.name as created_by_name'])
    .where('cp.id', 'in', ids)
    .execute();
}

/** Plans with where their keg is and the batch it holds: whose they are follows from either. */
function plansWithHolder(db: Database) {
  return db
    .selectFrom('carbonation_plan as cp')
    .leftJoin('keg_whereabouts as kw', 'kw.keg_id', 'cp.keg_id')
    .leftJoin('keg_fill as kf', 'kf.id', 'cp.keg_fill_id')
    .leftJoin('batch as b', 'b.id', 'kf.batch_id');
}

const planSort = { createdAt: 'cp.created_at', readyAt: 'cp.ready_at', lowerPressureAt: 'cp.lower_pressure_at' } as const;

export interface PlanListQuery extends PageRequest, SortRequest<keyof typeof planSort> {
  kegId?: string | undefined;
  state?: string | undefined;
  lowerDue?: boolean | undefined;
}

/** The ids of one page of plans (a member's: those on kegs they hold or of their batches), and the count of all that match. */
export async function planPage(db: Database, q: PlanListQuery, now: Date, memberId?: string) {
  let base = plansWithHolder(db);
  if (memberId) base = base.where((eb) => eb.or([eb('kw.member_id', '=', memberId), eb('b.owner_id', '=', memberId)]));
  if (q.kegId) base = base.where('cp.keg_id', '=', q.kegId);
  if (q.state) base = base.where('cp.state', '=', q.state as never);
  if (q.lowerDue) {
    base = base
      .where('cp.state', '=', 'active')
      .where('cp.method', '=', 'fast_start')
      .where('cp.pressure_lowered_at', 'is', null)
      .where('cp.lower_pressure_at', '<=', now);
  }
  return paginate(base, (qb) => orderByAllowed(qb.select('cp.id'), planSort, q, 'cp.id'), q);
}

/** The member a plan's keg is with, else the owner of the batch it holds (null for neither); undefined when there is no such plan. */
export async function planMemberId(db: Database, planId: string): Promise<string | null | undefined> {
  const r = await plansWithHolder(db).select(['cp.id', 'kw.member_id', 'b.owner_id']).where('cp.id', '=', planId).executeTakeFirst();
  if (!r) return undefined;
  return r.member_id ?? r.owner_id ?? null;
}
