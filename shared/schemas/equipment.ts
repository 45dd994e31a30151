import { z } from 'zod';
import { closedSet, labelsOf } from './labelled-enum.ts';
import { lineMaterials } from '../brewing/index.ts';
import { idListSchema, searchTextSchema, sortableListQuerySchema } from './pagination.ts';

/** What the cellar holds: every item has a short label code, a kind and a vessel state. */
export const equipmentKindLabels = labelsOf({ fermenter: 'Fermenter', keg: 'Keg', tap: 'Tap position', co2_cylinder: 'CO2 cylinder' });
export const [equipmentKinds, equipmentKindSchema] = closedSet(equipmentKindLabels);
export type EquipmentKind = z.infer<typeof equipmentKindSchema>;

export const vesselStateLabels = labelsOf({
  ready: 'Ready',
  needs_cleaning: 'Needs cleaning',
  cleaned: 'Cleaned',
  holding: 'Holding',
  out_of_service: 'Out of service',
});
export const [vesselStates, vesselStateSchema] = closedSet(vesselStateLabels);
export type VesselState = z.infer<typeof vesselStateSchema>;

/** The code printed on an item's label: a letter or two, a dash, digits (`F-07`, `K-031`, `T-3`, `C-1`). */
export const equipmentCodeSchema = z
  .string()
  .trim()
  .toUpperCase()
  .regex(/^[A-Z]{1,3}-\d{1,4}$/, 'Use a code like F-07 or K-031');

/** The letter each kind's codes start with: F-07 fermenters, K-031 kegs, T-3 tap positions, C-1 CO2 cylinders. */
export const equipmentCodePrefixes: Record<EquipmentKind, string> = {
  fermenter: 'F',
  keg: 'K',
  tap: 'T',
  co2_cylinder: 'C',
};

/** `GET /api/equipment/next-code?kind=` (admin): the next free code for a kind, as a hint for the add form. */
export const nextCodeQuerySchema = z.object({ kind: equipmentKindSchema });

const nameSchema = z.string().trim().min(1, 'Enter a name').max(120, 'Keep the name under 120 characters');
const notesSchema = z.string().trim().max(2000, 'Keep notes under 2000 characters');
// At least the smallest amount the registry keeps (two decimals), so nothing rounds to 0 L.
const capacitySchema = z.number().min(0.01, 'Capacity must be more than 0 L').max(100_000);

export const fermenterAttributesSchema = z.object({
  style: z.enum(['bucket', 'conical']),
  hasValve: z.boolean(),
});
export const kegAttributesSchema = z.object({
  serial: z.string().trim().min(1, 'Enter the serial').max(60),
  lock: z.enum(['ball', 'pin']),
  /** Rated (maximum) working pressure stamped on the keg, kPa gauge; screens show psi beside it. */
  ratedPressureKpa: z.number().positive('More than 0 kPa').max(2000, 'At most 2000 kPa').nullable().optional(),
});
export const tapAttributesSchema = z.object({
  /** Where the tap sits in the cold room, e.g. "Cold room, left wall, 1". */
  position: z.string().trim().min(1, 'Enter the position').max(120),
  lineLengthM: z.number().positive().max(50),
  lineInsideDiameterMm: z.number().positive().max(20),
  /** What the line is made of (REFERENCE §6); vinyl when not given. Stainless sizes are outside diameters. */
  lineMaterial: z.enum(lineMaterials).nullable().optional(),
  /** Measured or maker's resistance, kPa/m; otherwise the default of the line type. */
  lineResistanceKpaPerM: z.number().positive().max(200).nullable().optional(),
  /** Height from keg to faucet, for line balancing (m, may be negative below the keg). */
  riseM: z.number().min(-5).max(10).optional(),
  coldRoomTempC: z.number().min(-5).max(20).optional(),
});
export const co2CylinderAttributesSchema = z.object({
  sizeKg: z.number().positive().max(100),
  fillPercent: z.number().min(0).max(100),
  /** The next hydrostatic test is due on this date (YYYY-MM-DD). */
  hydroTestDue: z.iso.date('Enter a date like 2027-05-31'),
});

export const attributesSchemaByKind = {
  fermenter: fermenterAttributesSchema,
  keg: kegAttributesSchema,
  tap: tapAttributesSchema,
  co2_cylinder: co2CylinderAttributesSchema,
} as const;

export type FermenterAttributes = z.infer<typeof fermenterAttributesSchema>;
export type KegAttributes = z.infer<typeof kegAttributesSchema>;
export type TapAttributes = z.infer<typeof tapAttributesSchema>;
export type Co2CylinderAttributes = z.infer<typeof co2CylinderAttributesSchema>;
export type EquipmentAttributes = FermenterAttributes | KegAttributes | TapAttributes | Co2CylinderAttributes;

const baseFields = {
  code: equipmentCodeSchema,
  name: nameSchema,
  capacityLiters: capacitySchema.nullable().optional(),
  state: vesselStateSchema.optional(),
  notes: notesSchema.optional(),
};

/** Body of `POST /api/equipment` (admin): the kind decides which attributes it carries. */
export const createEquipmentSchema = z.discriminatedUnion('kind', [
  z.object({ ...baseFields, kind: z.literal('fermenter'), capacityLiters: capacitySchema, attributes: fermenterAttributesSchema }),
  z.object({ ...baseFields, kind: z.literal('keg'), capacityLiters: capacitySchema, attributes: kegAttributesSchema }),
  z.object({ ...baseFields, kind: z.literal('tap'), attributes: tapAttributesSchema }),
  z.object({ ...baseFields, kind: z.literal('co2_cylinder'), attributes: co2CylinderAttributesSchema }),
]);
export type CreateEquipmentInput = z.infer<typeof createEquipmentSchema>;

/** The fields of `PATCH /api/equipment/:id` (admin). The kind never changes; attributes are checked against it. */
export const updateEquipmentFieldsSchema = z.object({
  code: equipmentCodeSchema.optional(),
  name: nameSchema.optional(),
  capacityLiters: capacitySchema.nullable().optional(),
  notes: notesSchema.optional(),
  attributes: z.record(z.string(), z.unknown()).optional(),
});
export const updateEquipmentSchema = updateEquipmentFieldsSchema.refine((body) => Object.values(body).some((v) => v !== undefined), 'Nothing to change');
export type UpdateEquipmentInput = z.infer<typeof updateEquipmentSchema>;

/** Body of `POST /api/equipment/:id/state` (brewer on duty, admin). */
export const equipmentStateChangeSchema = z.object({
  state: vesselStateSchema,
  reason: z.string().trim().min(3, 'Say why, in a few words').max(500, 'Keep the reason under 500 characters'),
});
export type EquipmentStateChangeInput = z.infer<typeof equipmentStateChangeSchema>;

export const equipmentSortFields = ['code', 'name', 'kind', 'state', 'capacityLiters', 'stateChangedAt'] as const;
export type EquipmentSortField = (typeof equipmentSortFields)[number];

/** `GET /api/equipment?page&pageSize&sort&order&kind&state&q`. */
export const equipmentListQuerySchema = sortableListQuerySchema(equipmentSortFields, 'code').extend({
  kind: equipmentKindSchema.optional(),
  state: vesselStateSchema.optional(),
  q: searchTextSchema,
});
export type EquipmentListQuery = z.infer<typeof equipmentListQuerySchema>;

/** `GET /api/equipment/labels.pdf?ids=a,b,c` (or `ids` repeated); at most one sheet set of 240 labels. */
export const maxLabels = 240;
export const labelSheetQuerySchema = z.object({
  ids: idListSchema({
    each: 'Each id must be an equipment id',
    min: 1,
    tooFew: 'Pick at least one item',
    max: maxLabels,
    tooMany: `At most ${maxLabels} labels at once`,
  }),
});

/** One item as lists and pages show it. Times are ISO 8601 strings. */
export interface Equipment {
  id: string;
  code: string;
  kind: EquipmentKind;
  name: string;
  capacityLiters: number | null;
  state: VesselState;
  attributes: Record<string, unknown>;
  notes: string;
  stateChangedAt: string;
  createdAt: string;
  updatedAt: string;
}

export interface EquipmentStateChange {
  id: string;
  fromState: VesselState | null;
  toState: VesselState;
  reason: string;
  at: string;
  actor: { id: string; name: string } | null;
}
