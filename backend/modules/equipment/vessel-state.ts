import { type Expression, sql } from 'kysely';
import type { VesselState } from '../../db/tables/cellar.ts';
import type { Database } from '../../db/database.ts';

/**
 * Vessel state changes made by cellar operations (sanitation, transfers, returns, lapses), each
 * with a history row saying why. Call inside the transaction of the operation.
 */
export async function setVesselState(
  trx: Database,
  equipmentId: string,
  toState: VesselState,
  reason: string,
  actorId: string | null,
  at: Date,
): Promise<{ from: VesselState; to: VesselState; changed: boolean }> {
  const row = await trx.selectFrom('equipment').select('state').where('id', '=', equipmentId).forUpdate().executeTakeFirstOrThrow();
  const from = row.state;
  if (from === toState) return { from, to: toState, changed: false };
  await writeStateChange(trx, equipmentId, from, toState, reason, actorId, at);
  return { from, to: toState, changed: true };
}

/**
 * Writes a vessel's new state and the history row saying why. The caller holds the row lock
 * (select … for update) and decides whether the change is allowed; every state change goes through here.
 */
export async function writeStateChange(
  trx: Database,
  equipmentId: string,
  fromState: VesselState,
  toState: VesselState,
  reason: string,
  actorId: string | null,
  at: Date,
): Promise<void> {
  await trx.updateTable('equipment').set({ state: toState, state_changed_at: at, updated_at: at }).where('id', '=', equipmentId).execute();
  await trx
    .insertInto('equipment_state_change')
    .values({ equipment_id: equipmentId, from_state: fromState, to_state: toState, reason: reason.slice(0, 500), actor_id: actorId, at })
    .execute();
}

/**
 * True when a vessel stored as `ready` has outlived its freshness window: it has complete
 * cycles on record and none of them is still fresh (every complete cycle has a window end, a check
 * constraint, so that is: the latest window end has passed). Reads use it so that a lapse shows at once,
 * before the periodic job writes it down. The latest end is one step back along `sanitation_cycle_fresh_idx`
 * per vessel, so a list of vessels costs an index probe each.
 */
export function lapsedSql(equipmentId: Expression<string>, state: Expression<string>, now: Date) {
  return sql<boolean>`(${state} = 'ready' and coalesce(${freshUntilSql(equipmentId)} <= ${now}, false))`;
}

/** The state the co-op should treat a vessel as having at `now`. */
export function effectiveStateSql(equipmentId: Expression<string>, state: Expression<string>, now: Date) {
  return sql<VesselState>`(case when ${lapsedSql(equipmentId, state, now)} then 'needs_cleaning' else ${state} end)`;
}

/** The freshest complete cycle's window end for a vessel (null when none on record). */
export function freshUntilSql(equipmentId: Expression<string>) {
  return sql<Date | null>`(select max(fc.fresh_until) from sanitation_cycle fc where fc.equipment_id = ${equipmentId} and fc.complete)`;
}

/**
 * Writes lapsed freshness windows down: every vessel stored `ready` whose windows have all
 * ended becomes `needs_cleaning`, with a history row. Run by the periodic queue job; safe to run
 * on any instance at any time (one statement, idempotent).
 */
export async function applyFreshnessLapses(db: Database, now: Date): Promise<number> {
  const result = await sql<{ id: string }>`
    with hit as (
      select e.id, ${freshUntilSql(sql.ref('e.id'))} as fresh_until
      from equipment e
      where e.state = 'ready' and e.kind in ('fermenter', 'keg')
    ), lapsed as (
      update equipment e set state = 'needs_cleaning', state_changed_at = ${now}, updated_at = ${now}
      from hit
      where e.id = hit.id and e.state = 'ready' and hit.fresh_until is not null and hit.fresh_until <= ${now}
      returning e.id, hit.fresh_until
    )
    insert into equipment_state_change (equipment_id, from_state, to_state, reason, actor_id, at)
    select id, 'ready', 'needs_cleaning',
      'Freshness window lapsed at ' || to_char(fresh_until at time zone 'UTC', 'YYYY-MM-DD HH24:MI') || ' UTC; clean and sanitize before use', null, ${now}
    from lapsed
    returning equipment_id as id`.execute(db);
  return result.rows.length;
}
