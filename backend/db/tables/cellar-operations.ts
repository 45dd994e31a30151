import type { ColumnType, Generated } from 'kysely';
import type { VesselState } from './cellar.ts';
import type { Json, Numeric, Timestamp } from './types.ts';

/** A numeric or jsonb column with a database default (optional on insert). */
type NumericWithDefault = ColumnType<number, number | string | undefined, number | string>;
type JsonWithDefault = ColumnType<unknown, string | undefined, string>;

export type SanitationStepName = 'clean' | 'rinse' | 'sanitize' | 'purge';
export type CycleOutcome = 'ready' | 'cleaned' | 'needs_cleaning';
export type KegWhereabouts = 'cellar' | 'cold_room' | 'with_member' | 'missing';
export type KegMovementAction = 'checked_out' | 'returned' | 'moved' | 'tapped' | 'untapped' | 'marked_missing' | 'found' | 'level' | 'emptied' | 'undone';
export type CarbonationPlanState = 'active' | 'done' | 'cancelled' | 'superseded';

export interface SanitationCycleTable {
  id: Generated<string>;
  equipment_id: string;
  started_at: Timestamp;
  completed_at: Timestamp;
  outcome: CycleOutcome;
  complete: boolean;
  /** [{ code, step, message }] */
  issues: JsonWithDefault;
  freshness_days: number | null;
  fresh_until: Timestamp | null;
  recorded_by: string | null;
  notes: Generated<string>;
  created_at: Generated<Date>;
}

export interface SanitationStepTable {
  id: Generated<string>;
  cycle_id: string;
  position: number;
  step: SanitationStepName;
  chemical_id: string | null;
  chemical: string | null;
  concentration: Numeric | null;
  concentration_unit: '%' | 'g/L' | 'mL/L' | 'ppm' | null;
  contact_minutes: Numeric | null;
  minimum_contact_minutes: Numeric | null;
  purge_method: 'flush' | 'push_out' | null;
  co2_grams: Numeric | null;
  solution_liters: Numeric | null;
  performed_by: string | null;
  at: Timestamp;
  ok: boolean;
  note: Generated<string>;
  /** A step done against a rule, with the reason (shared/cellar/sanitation-rules.ts `checkSteps`). */
  exception_reason: string | null;
  exception_rules: Generated<string[]>;
  /** Caustic clean: the vessel was vented to atmospheric pressure first. */
  vented: boolean | null;
  /** Push-out purge: the keg the sanitizer was pushed into. */
  pushed_into_equipment_id: string | null;
}

export interface TransferTable {
  id: Generated<string>;
  batch_id: string;
  from_equipment_id: string;
  volume_liters: Numeric;
  packaged_liters: Numeric;
  loss_liters: Numeric;
  draw_method: 'bottom_valve' | 'siphon';
  checklist: Json;
  finings_kind: string | null;
  finings_amount: Numeric | null;
  finings_unit: 'g' | 'mL' | null;
  co2_grams: NumericWithDefault;
  og: Numeric | null;
  fg: Numeric | null;
  abv: Numeric | null;
  transferred_at: Timestamp;
  /** When drawing began and ended; `ended_at` equals `transferred_at`. Both null on transfers recorded without times. */
  started_at: Timestamp | null;
  ended_at: Timestamp | null;
  /** Why the transfer went ahead while the batch's gravity was not yet stable. */
  unstable_gravity_reason: string | null;
  /** Dissolved oxygen read at fill, ppb. */
  dissolved_oxygen_ppb: Numeric | null;
  recorded_by: string | null;
  notes: Generated<string>;
  created_at: Generated<Date>;
}

export interface KegFillTable {
  id: Generated<string>;
  transfer_id: string | null;
  keg_id: string;
  batch_id: string;
  volume_liters: Numeric;
  remaining_liters: Numeric;
  og: Numeric | null;
  fg: Numeric | null;
  abv: Numeric | null;
  sanitation_cycle_id: string | null;
  co2_grams: NumericWithDefault;
  filled_at: Timestamp;
  /** filled_at plus the batch's shelf life, stored when the keg is filled. */
  best_before: Timestamp | null;
  emptied_at: Timestamp | null;
  emptied_reason: string | null;
  /** Dissolved oxygen read in this keg at fill, ppb. */
  dissolved_oxygen_ppb: Numeric | null;
  created_at: Generated<Date>;
}

export interface KegWhereaboutsTable {
  keg_id: string;
  whereabouts: KegWhereabouts;
  tap_id: string | null;
  member_id: string | null;
  checked_out_at: Timestamp | null;
  due_at: Timestamp | null;
  since: Generated<Date>;
  updated_by: string | null;
}

export interface KegMovementTable {
  id: Generated<string>;
  keg_id: string;
  action: KegMovementAction;
  from_whereabouts: KegWhereabouts | null;
  to_whereabouts: KegWhereabouts;
  tap_id: string | null;
  member_id: string | null;
  due_at: Timestamp | null;
  note: Generated<string>;
  actor_id: string | null;
  at: Generated<Date>;
}

export interface CarbonationPlanTable {
  id: Generated<string>;
  keg_id: string;
  keg_fill_id: string | null;
  state: Generated<CarbonationPlanState>;
  method: 'set_and_hold' | 'fast_start';
  style_family: Generated<string>;
  target_volumes: Numeric;
  temperature_c: Numeric;
  altitude_m: NumericWithDefault;
  serving_pressure_kpa: Numeric;
  fast_pressure_kpa: Numeric | null;
  fast_hours: Numeric | null;
  hold_days: Numeric | null;
  settle_days: Numeric | null;
  started_at: Timestamp;
  lower_pressure_at: Timestamp | null;
  ready_at: Timestamp;
  pressure_lowered_at: Timestamp | null;
  reminder_sent_at: Timestamp | null;
  reminder_job_id: string | null;
  tap_id: string | null;
  line_length_m: Numeric | null;
  line_inside_diameter_mm: Numeric | null;
  line_rise_m: Numeric | null;
  line_material: string | null;
  line_resistance_kpa_per_m: Numeric | null;
  line_balanced_length_m: Numeric | null;
  notes: Generated<string>;
  created_by: string | null;
  created_at: Generated<Date>;
  updated_at: Generated<Date>;
}

export type KegUndoableAction = 'returned' | 'emptied' | 'dumped';

/** What undoing a keg's return, emptying or dump restores, and the rows that action wrote last. */
export interface KegActionUndoTable {
  id: Generated<string>;
  keg_id: string;
  action: KegUndoableAction;
  movement_id: string;
  keg_state_change_id: string | null;
  keg_state: VesselState;
  whereabouts: KegWhereabouts;
  tap_id: string | null;
  tap_state: VesselState | null;
  tap_state_change_id: string | null;
  member_id: string | null;
  checked_out_at: Timestamp | null;
  due_at: Timestamp | null;
  since: Timestamp | null;
  fill_id: string | null;
  fill_remaining_liters: Numeric | null;
  plan_ids: ColumnType<string[], string[] | undefined, string[]>;
  actor_id: string | null;
  at: Timestamp;
  undo_until: Timestamp;
  undone_at: Timestamp | null;
  undone_by: string | null;
  created_at: Generated<Date>;
}

export interface CellarOperationsTables {
  sanitation_cycle: SanitationCycleTable;
  sanitation_step: SanitationStepTable;
  transfer: TransferTable;
  keg_fill: KegFillTable;
  keg_whereabouts: KegWhereaboutsTable;
  keg_movement: KegMovementTable;
  carbonation_plan: CarbonationPlanTable;
  keg_action_undo: KegActionUndoTable;
}
