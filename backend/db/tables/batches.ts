import type { ColumnType, Generated } from 'kysely';
import type { Json, Numeric, Timestamp } from './types.ts';

export const batchStatuses = ['planned', 'fermenting', 'conditioning', 'packaged', 'discarded'] as const;
export type BatchStatus = (typeof batchStatuses)[number];
export type GravityUnit = 'sg' | 'plato' | 'brix';
export type ReadingSource = 'manual' | 'import';
export type ImportPhase = 'reading' | 'checking' | 'writing' | 'done' | 'failed';

export interface BatchTable {
  id: Generated<string>;
  owner_id: string;
  name: string;
  style: Generated<string>;
  volume_liters: Numeric;
  target_og: Numeric | null;
  target_fg: Numeric | null;
  status: Generated<BatchStatus>;
  packaged_at: Timestamp | null;
  packaged_liters: Numeric | null;
  /** Set when the batch is discarded (its beer dumped); null otherwise. */
  discarded_at: Timestamp | null;
  notes: Generated<string>;
  /** Allergen notes as the owner wrote them (e.g. "gluten (barley)", "lactose (milk)"). */
  allergens: Generated<string[]>;
  /** Overrides the co-op's shelf life for this batch's fills. */
  shelf_life_days: ColumnType<number | null, number | null | undefined, number | null>;
  created_by: string | null;
  created_at: Generated<Date>;
  updated_at: Generated<Date>;
}

export interface ReadingTable {
  id: Generated<string>;
  batch_id: string;
  taken_at: Timestamp;
  gravity_sg: Numeric;
  entered_value: Numeric;
  entered_unit: GravityUnit;
  temperature_c: Numeric | null;
  corrected: Generated<boolean>;
  raw_sg: Numeric | null;
  /** How a Brix reading was converted; null for SG and °P. */
  method: Generated<'wort' | 'alcohol_corrected' | null>;
  source: Generated<ReadingSource>;
  note: Generated<string>;
  created_by: string | null;
  created_at: Generated<Date>;
}

export interface ReadingImportMappingTable {
  user_id: string;
  mapping: Json;
  headers: string[];
  updated_at: Generated<Date>;
}

export interface ReadingImportProgressTable {
  id: string;
  user_id: string;
  batch_id: string;
  phase: ImportPhase;
  rows_done: Generated<number>;
  rows_total: number | null;
  message: Generated<string>;
  started_at: Generated<Date>;
  updated_at: Generated<Date>;
}

/** A view: one row per packaging event (see the batches migration). */
export interface ProductionPackagingView {
  batch_id: string;
  packaged_at: Date;
  liters: number;
}

export interface BatchTables {
  batch: BatchTable;
  reading: ReadingTable;
  reading_import_mapping: ReadingImportMappingTable;
  reading_import_progress: ReadingImportProgressTable;
  production_packaging: ProductionPackagingView;
}
