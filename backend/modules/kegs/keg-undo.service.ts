import type { Database } from '../../db/database.ts';
import type { KegUndoableAction } from '../../db/tables/cellar-operations.ts';
import { audit } from '../../lib/audit.ts';
import { conflict } from '../../lib/http-problem.ts';
import { setVesselState } from '../equipment/vessel-state.ts';
import { insertUndo, kegSince, latestUndo, markUndone, reactivatePlans, reopenFill, tapSince, type UndoSnapshot } from './keg-undo.repository.ts';
import { addMovement, lockKeg, mapTapTaken, writeWhereabouts } from './kegs.repository.ts';

// ---------------------------------------------------------------------------------------------
// Undo of a return, an emptying or a dump: offered for KEG_UNDO_WINDOW_MS by the app's clock and
// only while nothing else has touched the keg (or the tap it came off) since.
// ---------------------------------------------------------------------------------------------

/** How long after a return, an emptying or a dump it can be undone (the app's clock). */
export const KEG_UNDO_WINDOW_MS = 10 * 60_000;

export interface KegUndoOffer {
  id: string;
  action: KegUndoableAction;
  until: string;
}

const undoTitles: Record<KegUndoableAction, string> = { returned: 'return', emptied: 'emptying', dumped: 'dump' };

/** The fields an audit row shows as "before" for a keg action that can be undone. */
export function auditState(b: UndoSnapshot) {
  return {
    state: b.kegState,
    whereabouts: b.whereabouts?.whereabouts ?? 'cellar',
    ...(b.whereabouts?.tap_id ? { tapId: b.whereabouts.tap_id } : {}),
    ...(b.whereabouts?.member_id ? { memberId: b.whereabouts.member_id } : {}),
    remainingLiters: b.fill ? b.fill.remaining_liters : null,
    ...(b.planIds.length ? { carbonationPlans: b.planIds.length } : {}),
  };
}

/** Offers an undo of the action just taken, for KEG_UNDO_WINDOW_MS. */
export async function recordUndo(
  trx: Database,
  kegId: string,
  action: KegUndoableAction,
  b: UndoSnapshot,
  movementId: string,
  actorId: string,
  now: Date,
): Promise<KegUndoOffer> {
  const until = new Date(now.getTime() + KEG_UNDO_WINDOW_MS);
  const id = await insertUndo(trx, kegId, action, b, { movementId, actorId, now, until });
  return { id, action, until: until.toISOString() };
}

/**
 * Undoes a keg's latest return, emptying or dump (or the one named by `actionId`, which must be that one):
 * the keg's state, whereabouts (the member who had it, the tap it came off), its fill with the litres it
 * held and the carbonation plans the action closed come back, in one transaction with a movement and an
 * audit row. 409 when there is nothing to undo, when the window has passed or when the keg or its tap was
 * touched since. `authorize` is asked with the action found before anything is written.
 */
export async function undoKegAction(
  db: Database,
  kegId: string,
  actionId: string | undefined,
  authorize: (action: KegUndoableAction) => void,
  actor: { id: string },
  now: Date,
): Promise<{ action: KegUndoableAction }> {
  return db.transaction().execute(async (trx) => {
    const keg = await lockKeg(trx, kegId);
    const latest = await latestUndo(trx, kegId);
    if (!latest || latest.undone_at || (actionId && latest.id !== actionId)) throw conflict(`Nothing to undo on ${keg.code}.`);
    authorize(latest.action);
    const what = undoTitles[latest.action];
    if (now.getTime() > new Date(latest.undo_until).getTime()) {
      throw conflict(`Too late to undo the ${what} of ${keg.code}: an undo is offered for ${KEG_UNDO_WINDOW_MS / 60_000} minutes.`);
    }
    const touched = () => conflict(`${keg.code} has changed since its ${what}, so it cannot be undone.`);
    const since = await kegSince(trx, kegId, latest.created_at);
    if (
      since.lastMovementId !== String(latest.movement_id) ||
      since.kegChange !== (latest.keg_state_change_id === null ? null : String(latest.keg_state_change_id)) ||
      since.openFill ||
      since.cycleSince
    ) {
      throw touched();
    }
    if (latest.tap_id) {
      const tap = await tapSince(trx, latest.tap_id);
      if (tap.taken || tap.tapChange !== (latest.tap_state_change_id === null ? null : String(latest.tap_state_change_id))) {
        throw conflict(`Tap ${tap.code} has changed since ${keg.code} came off it, so the ${what} cannot be undone.`);
      }
    }

    const fromWhere = keg.whereabouts;
    await writeWhereabouts(trx, kegId, {
      whereabouts: latest.whereabouts,
      tap_id: latest.tap_id,
      member_id: latest.member_id,
      checked_out_at: latest.checked_out_at,
      due_at: latest.due_at,
      since: latest.since ?? now,
      updated_by: actor.id,
    }).catch((e) => mapTapTaken(e, ''));
    let restoredLiters: number | null = null;
    if (latest.fill_id) {
      const fill = await reopenFill(trx, latest.fill_id, latest.fill_remaining_liters!);
      if (!fill) throw touched();
      restoredLiters = Number(fill.remaining_liters);
    }
    const plans = await reactivatePlans(trx, latest.plan_ids, now);
    await setVesselState(trx, kegId, latest.keg_state, `Undo of the ${what}: back as it was`, actor.id, now);
    if (latest.tap_id && latest.tap_state)
      await setVesselState(trx, latest.tap_id, latest.tap_state, `${keg.code} back on the line (undo of its ${what})`, actor.id, now);
    await addMovement(trx, {
      keg_id: kegId,
      action: 'undone',
      from_whereabouts: fromWhere,
      to_whereabouts: latest.whereabouts,
      tap_id: latest.tap_id,
      member_id: latest.member_id,
      due_at: latest.due_at,
      note: `Undid the ${what}`,
      actor_id: actor.id,
      at: now,
    });
    await markUndone(trx, latest.id, actor.id, now);
    await audit(trx, actor.id, 'undone', 'Keg', kegId, {
      code: keg.code,
      undid: latest.action,
      undoId: latest.id,
      before: { state: keg.state, whereabouts: fromWhere, remainingLiters: latest.fill_id ? 0 : null },
      after: {
        state: latest.keg_state,
        whereabouts: latest.whereabouts,
        ...(latest.tap_id ? { tapId: latest.tap_id } : {}),
        ...(latest.member_id ? { memberId: latest.member_id } : {}),
        remainingLiters: restoredLiters,
        ...(plans.length ? { carbonationPlans: plans.length } : {}),
      },
    });
    return { action: latest.action };
  });
}
