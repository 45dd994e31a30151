import { z } from 'zod';
import { closedSet, labelsOf } from './labelled-enum.ts';
import { allergenListSchema } from '../cellar/trace.ts';
import { queryBooleanSchema, searchTextSchema, sortableListQuerySchema } from './pagination.ts';
import { isTimeZone } from './time-zone.ts';

/**
 * Batches, gravity readings, reading imports and production records: the shapes both the forms
 * and the routes parse. Volumes are litres, temperatures °C, gravities specific gravity unless a
 * field names its unit.
 */

export const batchStatusLabels = labelsOf({
  planned: 'Planned',
  fermenting: 'Fermenting',
  conditioning: 'Conditioning',
  packaged: 'Packaged',
  discarded: 'Discarded',
});
export const [batchStatuses, batchStatusSchema] = closedSet(batchStatusLabels);
export type BatchStatus = z.infer<typeof batchStatusSchema>;

/** Where a batch may go from each status (a packaged or discarded batch is closed). */
export const nextBatchStatuses: Record<BatchStatus, readonly BatchStatus[]> = {
  planned: ['fermenting', 'discarded'],
  fermenting: ['conditioning', 'packaged', 'discarded'],
  conditioning: ['fermenting', 'packaged', 'discarded'],
  packaged: [],
  discarded: [],
};

export const gravityUnits = ['sg', 'plato', 'brix'] as const;
export const gravityUnitSchema = z.enum(gravityUnits);
export type GravityUnit = z.infer<typeof gravityUnitSchema>;
export const gravityUnitLabels: Record<GravityUnit, string> = { sg: 'SG', plato: '°P', brix: '°Bx' };

const gravitySgSchema = z
  .number({ error: 'Enter a gravity like 1.050' })
  .min(0.98, 'A gravity must be from 0.980 to 1.200')
  .max(1.2, 'A gravity must be from 0.980 to 1.200');

const batchNameSchema = z.string().trim().min(1, 'Name the batch').max(120, 'Keep the name under 120 characters');
const styleSchema = z.string().trim().max(80, 'Keep the style under 80 characters');
const volumeSchema = z
  .number({ error: 'Enter the volume in litres' })
  .min(0.01, 'The volume must be above 0') // litres are kept to two decimals
  .max(10_000, 'The volume must be at most 10,000 L');
const notesSchema = z.string().max(4000, 'Keep the notes under 4,000 characters');
const idSchema = z.uuid('Not a valid id');
/** Days a fill of this batch keeps; null: the co-op's shelf life for its style. */
const shelfLifeSchema = z.number({ error: 'Enter the shelf life in days' }).int('Whole days').min(1, 'At least 1 day').max(3650, 'At most 10 years');

const targetsRefine = (b: { targetOg?: number | null; targetFg?: number | null }) => b.targetOg == null || b.targetFg == null || b.targetFg < b.targetOg;

/** Body of `POST /api/batches`. */
export const createBatchSchema = z
  .object({
    name: batchNameSchema,
    style: styleSchema.default(''),
    volumeLiters: volumeSchema,
    targetOg: gravitySgSchema.nullish(),
    targetFg: gravitySgSchema.nullish(),
    notes: notesSchema.default(''),
    /** Allergen notes (free list, e.g. "gluten (barley)", "lactose (milk)"); finings add theirs. */
    allergens: allergenListSchema.default([]),
    shelfLifeDays: shelfLifeSchema.nullish(),
    /** A fermenter booking of the batch's owner that will hold it. */
    bookingId: idSchema.nullish(),
    /** Admin only: create the batch for another member. */
    ownerId: idSchema.optional(),
  })
  .refine(targetsRefine, { message: 'The target FG must be below the target OG', path: ['targetFg'] });
export type CreateBatchInput = z.input<typeof createBatchSchema>;

/** Body of `PATCH /api/batches/:id`. */
export const updateBatchSchema = z
  .object({
    name: batchNameSchema.optional(),
    style: styleSchema.optional(),
    volumeLiters: volumeSchema.optional(),
    targetOg: gravitySgSchema.nullish(),
    targetFg: gravitySgSchema.nullish(),
    notes: notesSchema.optional(),
    allergens: allergenListSchema.optional(),
    /** Applies to fills made from now on; a fill keeps the best-before it was given. */
    shelfLifeDays: shelfLifeSchema.nullish(),
    status: batchStatusSchema.optional(),
    /** Volume packaged, L (recorded when the batch is packaged). */
    packagedLiters: z.number().min(0, 'The packaged volume cannot be negative').max(10_000).nullish(),
    packagedAt: z.iso.datetime({ offset: true, error: 'Give a time like 2026-10-03T14:05:00+02:00' }).nullish(),
    /** Link a fermenter booking (null unlinks every booking of this batch). */
    bookingId: idSchema.nullish(),
  })
  .refine(targetsRefine, { message: 'The target FG must be below the target OG', path: ['targetFg'] })
  .refine((b) => Object.values(b).some((v) => v !== undefined), 'Nothing to change');
export type UpdateBatchInput = z.input<typeof updateBatchSchema>;

export const batchSortFields = ['name', 'style', 'status', 'createdAt', 'volumeLiters', 'lastReadingAt', 'owner'] as const;
export type BatchSortField = (typeof batchSortFields)[number];

/** `GET /api/batches?page&pageSize&sort&order&q&status&mine`. */
export const batchListQuerySchema = sortableListQuerySchema(batchSortFields, 'createdAt').extend({
  q: searchTextSchema,
  status: batchStatusSchema.optional(),
  mine: z
    .enum(['1', '0', 'true', 'false'])
    .transform((v) => v === '1' || v === 'true')
    .optional(),
  ownerId: idSchema.optional(),
});
export type BatchListQuery = z.infer<typeof batchListQuerySchema>;

/** One row of the batches list. */
export interface BatchListItem {
  id: string;
  name: string;
  style: string;
  status: BatchStatus;
  volumeLiters: number;
  targetOg: number | null;
  targetFg: number | null;
  ownerId: string;
  ownerName: string;
  readingsCount: number;
  og: number | null;
  currentGravity: number | null;
  lastReadingAt: string | null;
  createdAt: string;
}

export interface GravityPointDto {
  takenAt: string;
  sg: number;
}

/** `GET /api/batches/:id`: the batch and what its readings say. */
export interface BatchDetail extends BatchListItem {
  notes: string;
  allergens: string[];
  /** The batch's own shelf life, or null for the co-op's. */
  shelfLifeDays: number | null;
  packagedAt: string | null;
  packagedLiters: number | null;
  updatedAt: string;
  firstReadingAt: string | null;
  /** First reading's gravity. */
  og: number | null;
  /** Final gravity: the latest reading once the gravity is stable (or the batch is conditioning or packaged), else null. */
  fg: number | null;
  /** Whether abv and the attenuations use fg or, before it is known, the current gravity. */
  figuresFrom: 'fg' | 'current' | null;
  abv: number | null;
  apparentAttenuation: number | null;
  realAttenuation: number | null;
  stable: { stable: boolean; since: string | null; toleranceSg: number; spanDays: number };
  forecast: {
    /** The decay fitted to a bending curve, or the trend of readings still falling on a straight line. */
    model: 'exponential-decay' | 'linear-trend';
    predictedFg: number;
    readyAt: string;
    decayPerDay: number;
    targetReachedAt: string | null;
    curve: GravityPointDto[];
  } | null;
  /** The gravity curve for the chart (all readings, or bucket means when there are more than 400). */
  series: GravityPointDto[];
  bookings: { id: string; equipmentId: string; equipmentCode: string; equipmentName: string; startsAt: string; endsAt: string; state: string }[];
  can: { update: boolean; addReading: boolean; importReadings: boolean; deleteReading: boolean };
  /** The co-op's correction settings, so the reading form shows the same correction the server applies. */
  corrections: { hydrometerCalibrationC: number; wortCorrectionFactor: number };
}

/** Body of `POST /api/batches/:id/readings`. */
export const createReadingSchema = z.object({
  takenAt: z.iso.datetime({ offset: true, error: 'Give a time like 2026-10-03T14:05:00+02:00' }),
  gravity: z.number({ error: 'Enter the gravity' }).finite(),
  unit: gravityUnitSchema,
  temperatureC: z.number().min(-10, 'The temperature must be from −10 to 100 °C').max(100, 'The temperature must be from −10 to 100 °C').nullish(),
  /** Correct a hydrometer reading (SG or °P) to the calibration temperature; default yes when a temperature is given. */
  correctTemperature: z.boolean().default(true),
  note: z.string().trim().max(500, 'Keep the note under 500 characters').default(''),
  /** Brix only: `wort` (no alcohol yet) or `alcohol_corrected`; default wort for a batch's first reading, alcohol-corrected after. */
  method: z.enum(['wort', 'alcohol_corrected'], { error: 'The method is wort or alcohol_corrected' }).nullish(),
  /** Store a reading beyond the plausible apparent attenuation anyway. */
  confirm: z.boolean().default(false),
});
export type CreateReadingInput = z.input<typeof createReadingSchema>;

export interface ReadingDto {
  id: string;
  takenAt: string;
  gravitySg: number;
  enteredValue: number;
  enteredUnit: GravityUnit;
  temperatureC: number | null;
  corrected: boolean;
  rawSg: number | null;
  /** How a Brix reading was converted to a gravity; null for SG and °P. */
  method: 'wort' | 'alcohol_corrected' | null;
  source: 'manual' | 'import';
  note: string;
  createdBy: string | null;
  createdByName: string | null;
  createdAt: string;
}

export const readingSortFields = ['takenAt', 'gravitySg', 'temperatureC', 'createdAt'] as const;
export const readingListQuerySchema = sortableListQuerySchema(readingSortFields, 'takenAt').extend({
  source: z.enum(['manual', 'import']).optional(),
});

/** How the columns of an imported file map to a reading. Columns are named by their header text. */
export const importMappingSchema = z.object({
  takenAt: z.string().trim().min(1, 'Pick the column with the time of each reading'),
  gravity: z.string().trim().min(1, 'Pick the column with the gravity'),
  unit: z.string().trim().min(1).nullish(),
  temperature: z.string().trim().min(1).nullish(),
  note: z.string().trim().min(1).nullish(),
  /** The scale of the gravity column when there is no unit column (or its cell is blank). */
  gravityUnit: gravityUnitSchema.default('sg'),
  temperatureUnit: z.enum(['c', 'f']).default('c'),
  /** How to read dates like 03/10/2026; `auto` decides from the whole column. */
  dateOrder: z.enum(['auto', 'dmy', 'mdy', 'ymd']).default('auto'),
  /** Time zone for times without an offset (IANA name, e.g. Europe/Berlin); the co-op's when not given. */
  timeZone: z.string().trim().refine(isTimeZone, 'Unknown time zone').optional(),
  correctTemperature: z.boolean().default(true),
  /** A row at the same time as an existing reading: an error (default) or skipped. */
  onDuplicate: z.enum(['error', 'skip']).default('error'),
});
export type ImportMapping = z.infer<typeof importMappingSchema>;
export type ImportMappingInput = z.input<typeof importMappingSchema>;

/** `?dryRun=1` query of the import route. */
export const importQuerySchema = z.object({
  dryRun: z
    .enum(['1', '0', 'true', 'false'])
    .transform((v) => v === '1' || v === 'true')
    .default(false),
});

export interface ImportRowProblem {
  row: number;
  column: string;
  path: string;
  message: string;
}

export interface ImportPreviewRow {
  row: number;
  values: Record<string, string>;
  takenAt: string | null;
  gravity: number | null;
  unit: GravityUnit | null;
  gravitySg: number | null;
  temperatureC: number | null;
  corrected: boolean;
  note: string;
  status: 'ok' | 'error' | 'duplicate-skipped' | 'blank';
  problems: ImportRowProblem[];
}

export interface ImportPreview {
  fileType: 'csv' | 'xlsx';
  delimiter: string | null;
  headers: string[];
  mapping: ImportMapping;
  mappingSource: 'given' | 'remembered' | 'proposed';
  totalRows: number;
  validRows: number;
  rows: ImportPreviewRow[];
  errors: ImportRowProblem[];
  errorCount: number;
}

export interface ImportResult {
  imported: number;
  skipped: number;
  preview?: ImportPreview;
}

export interface ImportProgressDto {
  id: string;
  phase: 'reading' | 'checking' | 'writing' | 'done' | 'failed';
  rowsDone: number;
  rowsTotal: number | null;
  message: string;
  updatedAt: string;
}

/** The co-op's fermentation settings (setting key `fermentation`). */
export const fermentationSettingsSchema = z.object({
  /** Same gravity within this many SG points … (common practice 0.001). */
  stableToleranceSg: z.number().gt(0).max(0.01),
  /** … over this many days (common practice 2–3). */
  stableSpanDays: z.number().gt(0).max(60),
  hydrometerCalibrationC: z.number().min(0).max(60),
  wortCorrectionFactor: z.number().min(0.9).max(1.2),
});
export type FermentationSettings = z.infer<typeof fermentationSettingsSchema>;
export const defaultFermentationSettings: FermentationSettings = {
  stableToleranceSg: 0.001,
  stableSpanDays: 3,
  hydrometerCalibrationC: 20,
  wortCorrectionFactor: 1.04,
};

const monthOrDay = z
  .string()
  .trim()
  .regex(/^\d{4}-(0[1-9]|1[0-2])(-(0[1-9]|[12]\d|3[01]))?$/, 'Give a month like 2026-09 or a day like 2026-09-15');

/** `GET /api/production-records?from&to&format`. */
export const productionRecordsQuerySchema = z.object({
  from: monthOrDay.optional(),
  to: monthOrDay.optional(),
  format: z.enum(['json', 'csv', 'xlsx']).default('json'),
  mine: queryBooleanSchema,
});

export interface ProductionRecordRow {
  month: string;
  batchId: string;
  batchName: string;
  style: string;
  ownerName: string;
  packagedLiters: number;
  usBarrels: number;
  og: number | null;
  fg: number | null;
  abv: number | null;
  packagings: number;
}

/**
 * One month of the monthly production report, litres (and the same figures in US barrels): what
 * was at the co-op at the month's start, what was brewed, what left its control, what was lost,
 * and what was there at the month's end. `balanceLiters` is opening + produced − removals − losses
 * − closing: zero when every litre is accounted for. Packaging moves beer from fermenters into kegs
 * within the inventory, so it is shown but does not enter the balance.
 */
export interface ProductionMonth {
  month: string;
  openingLiters: number;
  /** Batches brewed: their volume, counted the day of their first reading. */
  producedLiters: number;
  /** Into the co-op's kegs by transfers (and by hand, as recorded on the batch). */
  packagedLiters: number;
  removals: {
    /** Kegs checked out to members: the whole fill, when it went out. */
    checkedOutLiters: number;
    /** Kegs emptied at the co-op (served on tap): the whole fill, when it was emptied. */
    servedLiters: number;
    /** Packaging recorded on a batch without a transfer (not into the co-op's kegs). */
    packagedOtherwiseLiters: number;
    totalLiters: number;
  };
  losses: {
    /** Trub, samples and spills recorded on transfers. */
    transferLiters: number;
    /** A batch's volume less what its transfers drew (yeast cake, dead space). */
    leftInFermenterLiters: number;
    /** Kegs emptied as dumped. */
    dumpedKegLiters: number;
    /** Batches discarded in the fermenter. */
    dumpedBatchLiters: number;
    totalLiters: number;
  };
  closing: { fermentersLiters: number; kegsLiters: number; totalLiters: number };
  balanceLiters: number;
  usBarrels: { opening: number; produced: number; packaged: number; removals: number; losses: number; closing: number };
}

export interface ProductionRecords {
  from: string;
  to: string;
  rows: ProductionRecordRow[];
  months: { month: string; batches: number; packagedLiters: number; usBarrels: number }[];
  totals: { batches: number; packagedLiters: number; usBarrels: number };
  /** Every month of the period, in order. */
  monthly: ProductionMonth[];
  note: string;
}

export const productionRecordsNote =
  'Local licensing and excise rules govern which production records must be kept, for how long and in which units, ' +
  'and decide what must be filed and how removals, losses and inventory are counted; ' +
  'these figures (volumes brewed and packaged, removals, losses and inventory, alcohol by volume by the ASBC/Balling method from the batch readings) support them and do not replace them.';
