import { z } from 'zod';
import { closedSet, labelsOf } from './labelled-enum.ts';
import type { EquipmentKind } from './equipment.ts';
import { searchTextSchema, sortableListQuerySchema } from './pagination.ts';

/**
 * Pressure-vessel and gas records: inspections of kegs and CO2 cylinders, when the next is due, and
 * the cylinders' contents. An item whose inspection of any kind is past due, or whose latest one of a
 * kind failed, is blocked: it cannot be filled, carbonated, booked or connected to the gas line until a
 * passing inspection is recorded.
 */
export const inspectionKindLabels = labelsOf({
  pressure_test: 'Pressure test',
  relief_valve: 'Relief-valve check',
  seals: 'O-rings and seals replaced',
  hydrostatic_test: 'Hydrostatic test',
});
export const [inspectionKinds, inspectionKindSchema] = closedSet(inspectionKindLabels);
export type InspectionKind = z.infer<typeof inspectionKindSchema>;

/** Which inspections each kind of equipment takes (taps take none). */
export const inspectionKindsByEquipment: Record<EquipmentKind, readonly InspectionKind[]> = {
  keg: ['pressure_test', 'relief_valve', 'seals'],
  fermenter: ['pressure_test', 'relief_valve', 'seals'],
  co2_cylinder: ['hydrostatic_test'],
  tap: [],
};

const isoDateTime = z.iso.datetime({ offset: true, message: 'Use an ISO 8601 time with offset, e.g. 2026-11-03T09:30:00+00:00' });

/** Body of `POST /api/equipment/:id/inspections` (brewer on duty, admin). */
export const createInspectionSchema = z.object({
  kind: inspectionKindSchema,
  at: isoDateTime,
  passed: z.boolean(),
  /** When the next one is due; the co-op's interval for the kind (Settings) when absent. */
  nextDueAt: isoDateTime.optional(),
  note: z.string().trim().max(1000, 'Keep the note under 1000 characters').optional(),
});
export type CreateInspectionInput = z.infer<typeof createInspectionSchema>;

/**
 * The Settings section `pressure_safety`: intervals between inspections when none is given, how far
 * ahead Today and the maintenance list warn, .
 * Intervals are common practice for refillable kegs (yearly checks of relief valves and seals, a
 * pressure test every two years); the five-year cylinder retest is from memory (US DOT rule for
 * steel CO2 cylinders; other countries may require ten years) and local rules decide.
 */
export const pressureSafetySettingsSchema = z.object({
  intervalMonths: z.object({
    pressure_test: z.number().int().min(1).max(120),
    relief_valve: z.number().int().min(1).max(120),
    seals: z.number().int().min(1).max(120),
    hydrostatic_test: z.number().int().min(1).max(180),
  }),
  dueSoonDays: z.number().int().min(0, 'At least 0 days').max(180, 'At most 180 days'),
});
export type PressureSafetySettings = z.infer<typeof pressureSafetySettingsSchema>;

export const defaultPressureSafetySettings: PressureSafetySettings = {
  intervalMonths: { pressure_test: 24, relief_valve: 12, seals: 12, hydrostatic_test: 60 },
  dueSoonDays: 30,
};

export interface InspectionView {
  id: string;
  kind: InspectionKind;
  at: string;
  passed: boolean;
  nextDueAt: string | null;
  note: string;
  recordedBy: { id: string; name: string } | null;
}

/** One due date per inspection kind on record (or, for a cylinder, its registry test date). */
export interface InspectionDue {
  kind: InspectionKind;
  dueAt: string | null;
  /** The latest inspection of this kind failed. */
  failed?: boolean;
  overdue?: boolean;
}

/** Why an item may not be filled, carbonated, booked or connected now (empty when it may). */
export interface InspectionBlock {
  kind: InspectionKind;
  reason: 'failed' | 'overdue';
  dueAt: string | null;
}

export interface CylinderView {
  sizeKg: number;
  remainingKg: number;
  connected: boolean;
  connectedAt: string | null;
  log: {
    id: string;
    action: 'connected' | 'disconnected' | 'refilled' | 'drawn';
    kg: number;
    remainingKg: number;
    replacedCylinder: { id: string; code: string } | null;
    note: string;
    at: string;
  }[];
}

export const maintenanceStatuses = ['failed', 'overdue', 'due_soon'] as const;
export type MaintenanceStatus = (typeof maintenanceStatuses)[number];

/** `GET /api/equipment/maintenance?page&pageSize&sort&order&status&kind&q`: inspections failed, past due or due soon. */
export const maintenanceListQuerySchema = sortableListQuerySchema(['dueAt', 'code', 'kind'] as const, 'dueAt').extend({
  status: z.enum(maintenanceStatuses).optional(),
  equipmentKind: z.enum(['keg', 'fermenter', 'co2_cylinder']).optional(),
  q: searchTextSchema,
});
export type MaintenanceListQuery = z.infer<typeof maintenanceListQuerySchema>;

export interface MaintenanceItem {
  equipment: { id: string; code: string; name: string; kind: EquipmentKind; state: string };
  kind: InspectionKind;
  dueAt: string | null;
  status: MaintenanceStatus;
  lastAt: string | null;
}

/** `POST /api/equipment/:id/connect`: this cylinder now supplies the gas line (the one on it comes off). */
export const connectCylinderSchema = z.object({ note: z.string().trim().max(500).optional() });
/** `POST /api/equipment/:id/refill`: the cylinder came back full (or with `remainingKg` in it). */
export const refillCylinderSchema = z.object({ remainingKg: z.number().min(0).max(100).optional(), note: z.string().trim().max(500).optional() });

/** Gauge pressures: kPa in the API, psi beside it on screens. 1 psi = 6.894757 kPa. */
export const KPA_PER_PSI = 6.894757293;
