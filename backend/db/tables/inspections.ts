import type { ColumnType, Generated } from 'kysely';
import type { Numeric, Timestamp } from './types.ts';

type NumericWithDefault = ColumnType<number, number | string | undefined, number | string>;

export const inspectionKinds = ['pressure_test', 'relief_valve', 'seals', 'hydrostatic_test'] as const;
export type InspectionKind = (typeof inspectionKinds)[number];
export type CylinderAction = 'connected' | 'disconnected' | 'refilled' | 'drawn';

export interface EquipmentInspectionTable {
  id: Generated<string>;
  equipment_id: string;
  kind: InspectionKind;
  at: Timestamp;
  passed: boolean;
  /** Required when passed; a failed inspection may leave it empty (the item is blocked until one passes). */
  next_due_at: Timestamp | null;
  note: Generated<string>;
  recorded_by: string | null;
  created_at: Generated<Date>;
}

/** A cylinder's contents (kg of CO2 left, never below zero) and whether it supplies the gas line; made on first use. */
export interface Co2CylinderSupplyTable {
  cylinder_id: string;
  remaining_kg: Numeric;
  connected: Generated<boolean>;
  connected_at: Timestamp | null;
  updated_at: Generated<Date>;
}

export interface Co2CylinderEventTable {
  id: Generated<string>;
  cylinder_id: string;
  action: CylinderAction;
  kg: NumericWithDefault;
  remaining_kg: Numeric;
  /** On `connected`: the cylinder it replaced on the line. */
  replaced_cylinder_id: string | null;
  source_type: 'keg_fill' | 'sanitation_cycle' | null;
  source_id: string | null;
  note: Generated<string>;
  actor_id: string | null;
  at: Timestamp;
}

export interface InspectionTables {
  equipment_inspection: EquipmentInspectionTable;
  co2_cylinder_supply: Co2CylinderSupplyTable;
  co2_cylinder_event: Co2CylinderEventTable;
}
