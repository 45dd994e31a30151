import type { Selectable } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import type { KegWhereaboutsTable } from '../../backend/db/tables/cellar-operations.ts';
import { writeStateChange } from '../../backend/modules/equipment/vessel-state.ts';
import { type At, inTransaction, toDate } from './common.ts';

export type KegWhereaboutsRow = Selectable<KegWhereaboutsTable>;

export interface KegCheckoutOverrides {
  kegId: string;
  memberId: string;
  /** When the member took it. */
  at: At;
  /** When it is due back (may be before a test's "now", for an overdue keg). */
  dueAt: At;
  actorId?: string | null;
  note?: string;
}

/**
 * A keg out with a member, as the kegs service records a check-out: its whereabouts row and a
 * `checked_out` movement at `at` (a keg on a tap leaves the tap needing cleaning).
 */
export async function createKegCheckout(db: Database, o: KegCheckoutOverrides): Promise<KegWhereaboutsRow> {
  const at = toDate(o.at, 'at');
  const due = toDate(o.dueAt, 'dueAt');
  return inTransaction(db, async (trx) => {
    const keg = await trx
      .selectFrom('equipment as e')
      .leftJoin('keg_whereabouts as kw', 'kw.keg_id', 'e.id')
      .select(['e.id', 'e.code', 'e.kind', 'kw.whereabouts', 'kw.tap_id'])
      .where('e.id', '=', o.kegId)
      .forUpdate('e')
      .executeTakeFirstOrThrow();
    if (keg.kind !== 'keg') throw new Error(`createKegCheckout: ${keg.code} is not a keg`);
    const values = {
      whereabouts: 'with_member' as const,
      tap_id: null,
      member_id: o.memberId,
      checked_out_at: at,
      due_at: due,
      since: at,
      updated_by: o.actorId ?? null,
    };
    const row = await trx
      .insertInto('keg_whereabouts')
      .values({ keg_id: keg.id, ...values })
      .onConflict((oc) => oc.column('keg_id').doUpdateSet(values))
      .returningAll()
      .executeTakeFirstOrThrow();
    if (keg.tap_id) {
      const tap = await trx.selectFrom('equipment').select('state').where('id', '=', keg.tap_id).forUpdate().executeTakeFirstOrThrow();
      if (tap.state !== 'needs_cleaning')
        await writeStateChange(trx, keg.tap_id, tap.state, 'needs_cleaning', `${keg.code} disconnected and checked out; clean the line`, o.actorId ?? null, at);
    }
    await trx
      .insertInto('keg_movement')
      .values({
        keg_id: keg.id,
        action: 'checked_out',
        from_whereabouts: keg.whereabouts ?? 'cellar',
        to_whereabouts: 'with_member',
        member_id: o.memberId,
        due_at: due,
        tap_id: keg.tap_id ?? null,
        note: o.note ?? '',
        actor_id: o.actorId ?? null,
        at,
      })
      .execute();
    return row;
  });
}
