import type { KegWhereabouts } from '../../../shared/schemas/kegs.ts';
import type { Database } from '../../db/database.ts';
import type { VesselState } from '../../db/tables/cellar.ts';
import type { KegUndoableAction } from '../../db/tables/cellar-operations.ts';

// ---------------------------------------------------------------------------------------------
// What an undo of a keg action reads and puts back.
// ---------------------------------------------------------------------------------------------

export interface UndoSnapshot {
  kegState: VesselState;
  whereabouts: {
    whereabouts: KegWhereabouts;
    tap_id: string | null;
    member_id: string | null;
    checked_out_at: Date | null;
    due_at: Date | null;
    since: Date | null;
  } | null;
  tapState: VesselState | null;
  fill: { id: string; remaining_liters: number } | null;
  planIds: string[];
}

/** The keg as it is before a return or an emptying: what an undo puts back. */
export async function undoSnapshot(trx: Database, kegId: string, kegState: VesselState): Promise<UndoSnapshot> {
  const [whereabouts, fill, plans] = await Promise.all([
    trx
      .selectFrom('keg_whereabouts')
      .select(['whereabouts', 'tap_id', 'member_id', 'checked_out_at', 'due_at', 'since'])
      .where('keg_id', '=', kegId)
      .executeTakeFirst(),
    trx.selectFrom('keg_fill').select(['id', 'remaining_liters']).where('keg_id', '=', kegId).where('emptied_at', 'is', null).executeTakeFirst(),
    trx.selectFrom('carbonation_plan').select('id').where('keg_id', '=', kegId).where('state', '=', 'active').execute(),
  ]);
  const tap = whereabouts?.tap_id ? await trx.selectFrom('equipment').select('state').where('id', '=', whereabouts.tap_id).executeTakeFirst() : undefined;
  return {
    kegState,
    whereabouts: whereabouts ?? null,
    tapState: tap?.state ?? null,
    fill: fill ? { id: fill.id, remaining_liters: Number(fill.remaining_liters) } : null,
    planIds: plans.map((p) => p.id),
  };
}

/** The id of an item's latest state change (null when none), as text. */
export const latestStateChange = (trx: Database, equipmentId: string) =>
  trx
    .selectFrom('equipment_state_change')
    .select((eb) => eb.fn.max('id').as('id'))
    .where('equipment_id', '=', equipmentId)
    .executeTakeFirst()
    .then((r) => (r?.id == null ? null : String(r.id)));

/** Stores what an undo of `action` puts back, with the latest state changes it must still find. */
export async function insertUndo(
  trx: Database,
  kegId: string,
  action: KegUndoableAction,
  b: UndoSnapshot,
  { movementId, actorId, now, until }: { movementId: string; actorId: string; now: Date; until: Date },
): Promise<string> {
  const tapId = b.whereabouts?.tap_id ?? null;
  const [kegChange, tapChange] = await Promise.all([latestStateChange(trx, kegId), tapId ? latestStateChange(trx, tapId) : Promise.resolve(null)]);
  const row = await trx
    .insertInto('keg_action_undo')
    .values({
      keg_id: kegId,
      action,
      movement_id: movementId,
      keg_state_change_id: kegChange,
      keg_state: b.kegState,
      whereabouts: b.whereabouts?.whereabouts ?? 'cellar',
      tap_id: tapId,
      tap_state: tapId ? b.tapState : null,
      tap_state_change_id: tapChange,
      member_id: b.whereabouts?.member_id ?? null,
      checked_out_at: b.whereabouts?.checked_out_at ?? null,
      due_at: b.whereabouts?.due_at ?? null,
      since: b.whereabouts?.since ?? null,
      fill_id: b.fill?.id ?? null,
      fill_remaining_liters: b.fill ? b.fill.remaining_liters : null,
      plan_ids: b.planIds,
      actor_id: actorId,
      at: now,
      undo_until: until,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return row.id;
}

/** The keg's latest undoable action, locked. */
export async function latestUndo(trx: Database, kegId: string) {
  return trx
    .selectFrom('keg_action_undo')
    .selectAll()
    .where('keg_id', '=', kegId)
    .orderBy('at', 'desc')
    .orderBy('movement_id', 'desc')
    .limit(1)
    .forUpdate()
    .executeTakeFirst();
}

/** What has happened to a keg: its latest movement and state change, an open fill, a cycle recorded since `after`. */
export async function kegSince(trx: Database, kegId: string, after: Date) {
  const [lastMovement, kegChange, fill, cycle] = await Promise.all([
    trx
      .selectFrom('keg_movement')
      .select((eb) => eb.fn.max('id').as('id'))
      .where('keg_id', '=', kegId)
      .executeTakeFirst(),
    latestStateChange(trx, kegId),
    trx.selectFrom('keg_fill').select('id').where('keg_id', '=', kegId).where('emptied_at', 'is', null).executeTakeFirst(),
    trx.selectFrom('sanitation_cycle').select('id').where('equipment_id', '=', kegId).where('created_at', '>', after).executeTakeFirst(),
  ]);
  return { lastMovementId: String(lastMovement?.id), kegChange, openFill: Boolean(fill), cycleSince: Boolean(cycle) };
}

/** A tap position, locked, with its latest state change and whether a keg is on it. */
export async function tapSince(trx: Database, tapId: string) {
  const tap = await trx.selectFrom('equipment').select(['code', 'state']).where('id', '=', tapId).forUpdate().executeTakeFirstOrThrow();
  const [tapChange, other] = await Promise.all([
    latestStateChange(trx, tapId),
    trx.selectFrom('keg_whereabouts').select('keg_id').where('tap_id', '=', tapId).executeTakeFirst(),
  ]);
  return { code: tap.code, tapChange, taken: Boolean(other) };
}

/** Reopens an emptied fill with the litres it held; undefined when it is not emptied. */
export async function reopenFill(trx: Database, fillId: string, remainingLiters: number) {
  return trx
    .updateTable('keg_fill')
    .set({ emptied_at: null, emptied_reason: null, remaining_liters: remainingLiters })
    .where('id', '=', fillId)
    .where('emptied_at', 'is not', null)
    .returning('remaining_liters')
    .executeTakeFirst();
}

/** Makes done plans active again; returns those it changed. */
export async function reactivatePlans(trx: Database, planIds: string[], now: Date) {
  if (!planIds.length) return [];
  return trx
    .updateTable('carbonation_plan')
    .set({ state: 'active', updated_at: now })
    .where('id', 'in', planIds)
    .where('state', '=', 'done')
    .returning('id')
    .execute();
}

export async function markUndone(trx: Database, undoId: string, actorId: string, now: Date): Promise<void> {
  await trx.updateTable('keg_action_undo').set({ undone_at: now, undone_by: actorId }).where('id', '=', undoId).execute();
}
