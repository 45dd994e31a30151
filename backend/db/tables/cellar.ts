import type { Generated } from 'kysely';
import type { Json, Numeric, Timestamp } from './types.ts';

export const equipmentKinds = ['fermenter', 'keg', 'tap', 'co2_cylinder'] as const;
export type EquipmentKind = (typeof equipmentKinds)[number];
export const vesselStates = ['ready', 'needs_cleaning', 'cleaned', 'holding', 'out_of_service'] as const;
export type VesselState = (typeof vesselStates)[number];
export const bookingStates = ['booked', 'in_use', 'finished', 'cancelled'] as const;
export type BookingState = (typeof bookingStates)[number];

export interface EquipmentTable {
  id: Generated<string>;
  code: string;
  kind: EquipmentKind;
  name: string;
  capacity_liters: Numeric | null;
  state: Generated<VesselState>;
  /** Kind-specific facts: fermenter {style, hasValve}, keg {serial, lock}, tap {position, lineLengthM, lineInsideDiameterMm, riseM}, co2_cylinder {sizeKg, fillPercent, hydroTestDue}. */
  attributes: Generated<Json>;
  notes: Generated<string>;
  state_changed_at: Generated<Date>;
  created_at: Generated<Date>;
  updated_at: Generated<Date>;
}

export interface EquipmentStateChangeTable {
  id: Generated<string>;
  equipment_id: string;
  from_state: VesselState | null;
  to_state: VesselState;
  reason: string;
  actor_id: string | null;
  at: Generated<Date>;
}

export interface BookingTable {
  id: Generated<string>;
  equipment_id: string;
  owner_id: string;
  batch_id: string | null;
  starts_at: Timestamp;
  ends_at: Timestamp;
  /** ends_at plus the co-op's cleaning buffer at the time of booking; the exclusion constraint covers [starts_at, blocked_until). */
  blocked_until: Timestamp;
  state: Generated<BookingState>;
  notes: Generated<string>;
  created_by: string | null;
  cancelled_by: string | null;
  cancelled_at: Date | null;
  created_at: Generated<Date>;
  updated_at: Generated<Date>;
}

export interface CellarTables {
  equipment: EquipmentTable;
  equipment_state_change: EquipmentStateChangeTable;
  booking: BookingTable;
}
