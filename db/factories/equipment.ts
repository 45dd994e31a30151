import { sql, type Selectable } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import type { EquipmentTable, EquipmentKind, VesselState } from '../../backend/db/tables/cellar.ts';
import { nextEquipmentCode } from '../../backend/modules/equipment/equipment.service.ts';
import { writeStateChange } from '../../backend/modules/equipment/vessel-state.ts';
import {
  attributesSchemaByKind,
  type Co2CylinderAttributes,
  type FermenterAttributes,
  type KegAttributes,
  type TapAttributes,
} from '../../shared/schemas/equipment.ts';
import { type At, inTransaction, LONG_AGO, nextSeq, toDate } from './common.ts';

export type EquipmentRow = Selectable<EquipmentTable>;

interface AttributesByKind {
  fermenter: FermenterAttributes;
  keg: KegAttributes;
  tap: TapAttributes;
  co2_cylinder: Co2CylinderAttributes;
}

export interface EquipmentOverrides<K extends EquipmentKind = EquipmentKind> {
  id?: string;
  /** Default: the next free code of the kind, as the add form suggests it (`F-05`, `K-013`, `T-5`, `C-3`). */
  code?: string;
  name?: string;
  /** Litres; default 30 for a fermenter, 19 for a keg, none for taps and cylinders. */
  capacityLiters?: number | null;
  /** Merged onto the kind's defaults, then checked with the kind's schema (shared/schemas/equipment.ts). */
  attributes?: Partial<AttributesByKind[K]>;
  /**
   * Default: `needs_cleaning` for fermenters and kegs (no sanitation cycle on record yet: make
   * them ready with createSanitationCycle), `ready` for taps and CO2 cylinders.
   */
  state?: VesselState;
  notes?: string;
  /** When it was registered (and its state set). Default: LONG_AGO. */
  at?: At;
  /** Who registered it (the history row's actor). */
  actorId?: string | null;
}

function defaultAttributes(kind: EquipmentKind, n: number, capacity: number | null): Record<string, unknown> {
  switch (kind) {
    case 'fermenter':
      return { style: capacity !== null && capacity >= 120 ? 'conical' : 'bucket', hasValve: true };
    case 'keg':
      return { serial: `LY19-T${String(n).padStart(5, '0')}`, lock: 'ball' };
    case 'tap':
      return { position: `Cold room, tap board, ${n}`, lineLengthM: 1.8, lineInsideDiameterMm: 4.8, riseM: 0.6, coldRoomTempC: 3 };
    case 'co2_cylinder':
      return { sizeKg: 6, fillPercent: 100, hydroTestDue: '2029-01-31' };
  }
}

const kindName: Record<EquipmentKind, (code: string, cap: number | null) => string> = {
  fermenter: (code, cap) => `${cap} L fermenter ${code}`,
  keg: (code, cap) => `${cap} L keg ${code}`,
  tap: (code) => `Tap position ${code}`,
  co2_cylinder: (code) => `CO2 cylinder ${code}`,
};

/** A piece of equipment of any kind, with its kind's details and its registry history row. */
export async function createEquipment<K extends EquipmentKind>(db: Database, kind: K, o: EquipmentOverrides<K> = {}): Promise<EquipmentRow> {
  const n = nextSeq();
  const capacity = o.capacityLiters !== undefined ? o.capacityLiters : kind === 'fermenter' ? 30 : kind === 'keg' ? 19 : null;
  const attributes = attributesSchemaByKind[kind].parse({ ...defaultAttributes(kind, n, capacity), ...(o.attributes ?? {}) });
  const state: VesselState = o.state ?? (kind === 'fermenter' || kind === 'keg' ? 'needs_cleaning' : 'ready');
  const at = toDate(o.at ?? LONG_AGO, 'at');
  return inTransaction(db, async (trx) => {
    const code = o.code ?? (await nextEquipmentCode(trx, kind));
    const row = await trx
      .insertInto('equipment')
      .values({
        ...(o.id ? { id: o.id } : {}),
        code,
        kind,
        name: o.name ?? kindName[kind](code, capacity),
        capacity_liters: capacity,
        state,
        attributes: sql`${JSON.stringify(attributes)}::jsonb`,
        notes: o.notes ?? '',
        state_changed_at: at,
        created_at: at,
        updated_at: at,
      })
      .returningAll()
      .executeTakeFirstOrThrow();
    await trx
      .insertInto('equipment_state_change')
      .values({ equipment_id: row.id, from_state: null, to_state: state, reason: 'Added to the registry', actor_id: o.actorId ?? null, at })
      .execute();
    return row;
  });
}

export const createFermenter = (db: Database, o: EquipmentOverrides<'fermenter'> = {}) => createEquipment(db, 'fermenter', o);
export const createKeg = (db: Database, o: EquipmentOverrides<'keg'> = {}) => createEquipment(db, 'keg', o);
export const createTap = (db: Database, o: EquipmentOverrides<'tap'> = {}) => createEquipment(db, 'tap', o);
export const createCo2Cylinder = (db: Database, o: EquipmentOverrides<'co2_cylinder'> = {}) => createEquipment(db, 'co2_cylinder', o);

/**
 * Moves an item to a state at a given time, with the history row, the way cellar operations do
 * (backend/modules/equipment/vessel-state.ts). No-op when it is already in that state.
 */
export async function setEquipmentState(
  db: Database,
  equipmentId: string,
  state: VesselState,
  o: { at: At; reason?: string; actorId?: string | null },
): Promise<EquipmentRow> {
  return inTransaction(db, async (trx) => {
    const row = await trx.selectFrom('equipment').select('state').where('id', '=', equipmentId).forUpdate().executeTakeFirstOrThrow();
    if (row.state !== state) {
      await writeStateChange(trx, equipmentId, row.state, state, o.reason ?? `Set to ${state.replace('_', ' ')}`, o.actorId ?? null, toDate(o.at, 'at'));
    }
    return trx.selectFrom('equipment').selectAll().where('id', '=', equipmentId).executeTakeFirstOrThrow();
  });
}
