import { z } from 'zod';
import { searchTextSchema, sortableListQuerySchema } from './pagination.ts';
import { isoDateTimeSchema } from './sanitation.ts';

/**
 * The transfer checklist: the trade's steps from fermenter to keg. The screen asks for every
 * item; the API records what was confirmed and names what was not (a transfer that happened is
 * recorded either way — the keg's readiness is the one hard gate, refused with 409).
 */
export const drawMethods = ['bottom_valve', 'siphon'] as const;
export type DrawMethod = (typeof drawMethods)[number];

export interface ChecklistItem {
  key: string;
  label: string;
  help?: string;
  /** Only for this way of drawing beer from the fermenter. */
  method?: DrawMethod;
}

export const transferChecklistItems: readonly ChecklistItem[] = [
  { key: 'kegsSanitizedAndPurged', label: 'Every keg sanitized and purged with CO2', help: 'The app checks each keg is ready and its sanitation current.' },
  {
    key: 'airlockRemoved',
    label: 'Airlock removed before opening the bottom valve',
    help: 'So the fermenter does not suck air or sanitizer back in.',
    method: 'bottom_valve',
  },
  {
    key: 'siphonStartedMidDepth',
    label: 'Siphon started mid-depth, lowered as the level falls',
    help: 'Keeps the cane clear of the yeast cake.',
    method: 'siphon',
  },
  { key: 'tubeToKegBottom', label: 'Tube reaches the bottom of the keg: no splashing' },
  { key: 'fittingsTight', label: 'Fittings tight: no air drawn in at a loose barb', help: 'Note any oxygen pick-up seen (bubbles in the line).' },
  { key: 'finingsAdded', label: 'Finings added (or none planned)', help: 'Kind and dose below.' },
  { key: 'headspacePurged', label: 'Headspace purged with CO2' },
  { key: 'lidSealed', label: 'Lid o-ring and posts lubricated and seated' },
  { key: 'gasInPostIdentified', label: 'Gas-in post identified' },
  { key: 'leakChecked', label: 'Lid and posts leak-checked with sanitizer' },
];

export const transferChecklistSchema = z
  .object({
    drawMethod: z.enum(drawMethods).optional(),
    kegsSanitizedAndPurged: z.boolean().optional(),
    airlockRemoved: z.boolean().optional(),
    siphonStartedMidDepth: z.boolean().optional(),
    tubeToKegBottom: z.boolean().optional(),
    fittingsTight: z.boolean().optional(),
    /** What was seen at the fittings, e.g. "bubbles at the keg barb, tightened". */
    oxygenPickupNote: z.string().trim().max(500).optional(),
    finingsAdded: z.boolean().optional(),
    headspacePurged: z.boolean().optional(),
    lidSealed: z.boolean().optional(),
    gasInPostIdentified: z.boolean().optional(),
    leakChecked: z.boolean().optional(),
  })
  .catchall(z.union([z.boolean(), z.string().max(500), z.number()]));
export type TransferChecklist = z.infer<typeof transferChecklistSchema>;

export const finingsSchema = z
  .object({
    /** e.g. "silica finings", "gelatin". */
    kind: z.string().trim().min(2, 'Name the finings').max(60),
    amount: z.number().min(0.01, 'More than 0').max(10_000).optional(), // kept to two decimals
    /** Another name for amount. */
    dose: z.number().min(0.01, 'More than 0').max(10_000).optional(),
    unit: z.enum(['g', 'mL']).optional(),
  })
  .refine((f) => f.amount !== undefined || f.dose !== undefined, { message: 'Give the dose', path: ['amount'] });
export type FiningsInput = z.infer<typeof finingsSchema>;

export const finingsKinds = ['silica finings', 'gelatin', 'isinglass', 'other'] as const;

/** Dissolved oxygen, ppb: a meter reads 0 to a few thousand; above 10,000 ppb (10 ppm) is not a reading of beer. */
export const dissolvedOxygenSchema = z.number().min(0, 'At least 0 ppb').max(10_000, 'At most 10,000 ppb');

/** Longest a transfer may take, start to end. */
export const TRANSFER_MAX_HOURS = 24;

/** Body of `POST /api/transfers`. */
export const createTransferSchema = z
  .object({
    batchId: z.uuid('Pick the batch'),
    fromEquipmentId: z.uuid('Pick the fermenter'),
    toKegIds: z
      .array(z.uuid())
      .min(1, 'Pick at least one keg')
      .max(12, 'At most 12 kegs in one transfer')
      .refine((ids) => new Set(ids).size === ids.length, 'Pick each keg once'),
    /** Drawn from the fermenter. */
    volumeLiters: z.number().min(0.01, 'More than 0 L').max(10_000), // litres are kept to two decimals
    checklist: transferChecklistSchema,
    finings: finingsSchema.nullable().optional(),
    /** Litres in each keg, in the order of toKegIds; without it the volume less the loss is shared evenly. */
    kegVolumesLiters: z.array(z.number().min(0.01, 'More than 0 L').max(1000)).optional(),
    /** Trub, samples and spills; worked out from kegVolumesLiters when those are given. */
    lossLiters: z.number().min(0).max(10_000).optional(),
    transferredAt: isoDateTimeSchema.optional(),
    /** When drawing began and ended; the end is the transfer's time (`transferredAt`); a start alone ends now. */
    startedAt: isoDateTimeSchema.optional(),
    endedAt: isoDateTimeSchema.optional(),
    /** Why the beer goes into kegs before its gravity is stable; without it such a transfer is refused (422). */
    unstableGravityReason: z.string().trim().min(3, 'Say why, in a few words').max(1000).optional(),
    /** Dissolved oxygen read at fill, ppb (where a meter exists). */
    dissolvedOxygenPpb: dissolvedOxygenSchema.optional(),
    /** Dissolved oxygen read in each keg, ppb, in the order of toKegIds (null where not read). */
    kegDissolvedOxygenPpb: z.array(dissolvedOxygenSchema.nullable()).optional(),
    co2Grams: z.number().min(0).max(10_000).optional(),
    notes: z.string().trim().max(2000).optional(),
  })
  .refine((b) => !b.kegVolumesLiters || b.kegVolumesLiters.length === b.toKegIds.length, {
    message: 'Give one volume per keg',
    path: ['kegVolumesLiters'],
  })
  .refine((b) => !b.kegDissolvedOxygenPpb || b.kegDissolvedOxygenPpb.length === b.toKegIds.length, {
    message: 'Give one reading (or none) per keg',
    path: ['kegDissolvedOxygenPpb'],
  })
  .refine((b) => b.endedAt === undefined || b.startedAt !== undefined, {
    message: 'Give the start too',
    path: ['startedAt'],
  })
  .refine((b) => !b.startedAt || !b.endedAt || new Date(b.endedAt).getTime() > new Date(b.startedAt).getTime(), {
    message: 'The end must be after the start',
    path: ['endedAt'],
  })
  .refine((b) => !b.startedAt || !b.endedAt || new Date(b.endedAt).getTime() - new Date(b.startedAt).getTime() <= TRANSFER_MAX_HOURS * 3_600_000, {
    message: `A transfer takes at most ${TRANSFER_MAX_HOURS} hours: check the dates`,
    path: ['startedAt'],
  })
  .refine((b) => !b.transferredAt || !b.endedAt || new Date(b.transferredAt).getTime() === new Date(b.endedAt).getTime(), {
    message: 'The transfer time is its end: give one or the other',
    path: ['transferredAt'],
  });
export type CreateTransferInput = z.infer<typeof createTransferSchema>;

/** `GET /api/transfers?batchId&fromEquipmentId&kegId&from&to&…`. */
export const transferListQuerySchema = sortableListQuerySchema(['transferredAt', 'volumeLiters'] as const, 'transferredAt').extend({
  order: z.enum(['asc', 'desc']).default('desc'),
  batchId: z.uuid().optional(),
  fromEquipmentId: z.uuid().optional(),
  kegId: z.uuid().optional(),
  from: z.iso
    .date()
    .or(z.iso.datetime({ offset: true }))
    .optional(),
  to: z.iso
    .date()
    .or(z.iso.datetime({ offset: true }))
    .optional(),
  q: searchTextSchema,
});
export type TransferListQuery = z.infer<typeof transferListQuerySchema>;

export interface TransferView {
  id: string;
  batch: { id: string; name: string; style: string; ownerId: string };
  fermenter: { id: string; code: string; name: string };
  volumeLiters: number;
  packagedLiters: number;
  lossLiters: number;
  drawMethod: DrawMethod;
  checklist: Record<string, unknown>;
  /** Checklist items that were not confirmed. */
  unconfirmed: string[];
  finings: { kind: string; amount: number; unit: 'g' | 'mL' } | null;
  co2Grams: number;
  og: number | null;
  fg: number | null;
  abv: number | null;
  /** The end of the transfer (its `endedAt` when times were recorded). */
  transferredAt: string;
  startedAt: string | null;
  endedAt: string | null;
  unstableGravityReason: string | null;
  dissolvedOxygenPpb: number | null;
  recordedBy: { id: string; name: string } | null;
  notes: string;
  kegs: { fillId: string; kegId: string; code: string; volumeLiters: number; sanitationCycleId: string | null; dissolvedOxygenPpb: number | null }[];
}

/** What the co-op's "finished" rule says of a batch's gravity (Settings, fermentation), for the transfer guard. */
export interface GravityStability {
  stable: boolean;
  /** First reading of the steady run, when stable. */
  since: string | null;
  toleranceSg: number;
  spanDays: number;
  /** Days the latest gravity has held within the tolerance (0 with fewer than two readings). */
  heldDays: number;
  /** The last readings, oldest first. */
  readings: { takenAt: string; sg: number }[];
}

/** A batch ready to go to kegs, as `GET /api/transfers/candidates` lists it. */
export interface TransferCandidate {
  batchId: string;
  name: string;
  style: string;
  status: string;
  ownerName: string;
  volumeLiters: number;
  fermenter: { id: string; code: string; name: string; state: string; hasValve: boolean } | null;
  /** The co-op's "finished" rule applied to its readings now. */
  gravity: GravityStability;
}
