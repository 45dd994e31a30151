import type { Selectable } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import type { Co2CylinderSupplyTable, EquipmentInspectionTable, InspectionKind } from '../../backend/db/tables/inspections.ts';
import { type At, DAY, inTransaction, toDate } from './common.ts';

export type InspectionRow = Selectable<EquipmentInspectionTable>;

/**
 * An inspection of a keg, fermenter or cylinder at `at`. Passed by default, due again a year later
 * unless `nextDueAt` is given (null allowed for a failed one). No state change: tests that need one
 * use the API or setEquipmentState.
 */
export async function createInspection(
  db: Database,
  o: { equipmentId: string; kind: InspectionKind; at: At; passed?: boolean; nextDueAt?: At | null; note?: string; recordedBy?: string | null },
): Promise<InspectionRow> {
  const at = toDate(o.at, 'at');
  const passed = o.passed ?? true;
  const nextDueAt =
    o.nextDueAt === null ? null : o.nextDueAt !== undefined ? toDate(o.nextDueAt, 'nextDueAt') : passed ? new Date(at.getTime() + 365 * DAY) : null;
  return db
    .insertInto('equipment_inspection')
    .values({
      equipment_id: o.equipmentId,
      kind: o.kind,
      at,
      passed,
      next_due_at: nextDueAt,
      note: o.note ?? '',
      recorded_by: o.recordedBy ?? null,
      created_at: at,
    })
    .returningAll()
    .executeTakeFirstOrThrow();
}

/** A cylinder's contents (kg) and, with `connected`, the one on the gas line (any other is taken off). */
export async function setCylinderSupply(
  db: Database,
  o: { cylinderId: string; remainingKg: number; connected?: boolean; at: At },
): Promise<Selectable<Co2CylinderSupplyTable>> {
  const at = toDate(o.at, 'at');
  return inTransaction(db, async (trx) => {
    if (o.connected) await trx.updateTable('co2_cylinder_supply').set({ connected: false, connected_at: null }).where('connected', '=', true).execute();
    return trx
      .insertInto('co2_cylinder_supply')
      .values({
        cylinder_id: o.cylinderId,
        remaining_kg: o.remainingKg,
        connected: o.connected ?? false,
        connected_at: o.connected ? at : null,
        updated_at: at,
      })
      .onConflict((oc) =>
        oc
          .column('cylinder_id')
          .doUpdateSet({ remaining_kg: o.remainingKg, connected: o.connected ?? false, connected_at: o.connected ? at : null, updated_at: at }),
      )
      .returningAll()
      .executeTakeFirstOrThrow();
  });
}
