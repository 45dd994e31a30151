import { z } from 'zod';
import { sanitationStepSchema, type ConcentrationUnit, type SanitationStep } from './cellar-settings.ts';
import { idListSchema, searchTextSchema, sortableListQuerySchema } from './pagination.ts';

/** A step time: ISO 8601 with an offset. */
export const isoDateTimeSchema = z.iso.datetime({ offset: true, message: 'Use an ISO 8601 time with offset, e.g. 2026-11-03T09:30:00+00:00' });

export const sanitationStepInputSchema = z.object({
  step: sanitationStepSchema,
  /** Chemical id or name from the co-op's list (or another name, recorded as given). */
  chemical: z.string().trim().min(1).max(80).optional(),
  /** Strength in the chemical's unit (%, g/L, mL/L or ppm as the co-op's list says). */
  concentration: z.number().min(0.001, 'More than 0').max(100_000).optional(), // kept to three decimals
  /** Soak or contact time; a purge may give seconds as a fraction of a minute. */
  contactMinutes: z
    .number()
    .min(0, 'At least 0')
    .max(24 * 60, 'At most a day')
    .optional(),
  at: isoDateTimeSchema,
  /** Purge only: a timed flush of the headspace, or a full push-out of sanitizer with CO2. */
  purgeMethod: z.enum(['flush', 'push_out']).optional(),
  /** Push-out purge only: the keg the sanitizer (or beer) was pushed into. */
  pushedIntoEquipmentId: z.uuid('Pick the keg it was pushed into').optional(),
  /** Clean with a caustic chemical: the vessel was vented to atmospheric pressure first (required then). */
  vented: z.boolean().optional(),
  /**
   * Why a step outside the co-op's rules (strength range, minimum contact, purge minimum, a chemical not
   * in the list) was done anyway: with it the step is recorded as an exception, without it it is refused.
   */
  exceptionReason: z.string().trim().max(500, 'Keep the reason under 500 characters').optional(),
  /** Purge only: CO2 used; the co-op's usual figure is recorded when absent. */
  co2Grams: z.number().min(0).max(5000).optional(),
  /** Litres of cleaning or sanitizing solution made up (for chemical use). */
  solutionLiters: z.number().min(0.01, 'More than 0 L').max(1000).optional(), // kept to two decimals
  /** Who did the step, when it was not the person recording it. */
  performedBy: z.uuid().optional(),
  note: z.string().trim().max(500).optional(),
});
export type SanitationStepInput = z.infer<typeof sanitationStepInputSchema>;

/** Body of `POST /api/sanitation-cycles`. */
export const createSanitationCycleSchema = z.object({
  equipmentId: z.uuid('Pick a vessel'),
  steps: z.array(sanitationStepInputSchema).min(1, 'Record at least one step').max(20, 'At most 20 steps'),
  notes: z.string().trim().max(2000).optional(),
});
export type CreateSanitationCycleInput = z.infer<typeof createSanitationCycleSchema>;

/** Body of `POST /api/sanitation-cycles/:id/steps`: the steps still to come of an incomplete cycle. */
export const continueSanitationCycleSchema = z.object({
  steps: z.array(sanitationStepInputSchema).min(1, 'Record at least one step').max(20, 'At most 20 steps'),
  notes: z.string().trim().max(2000).optional(),
});

export const cycleOutcomes = ['ready', 'cleaned', 'needs_cleaning'] as const;
export const cycleOutcomeSchema = z.enum(cycleOutcomes);

export const sanitationCycleSortFields = ['completedAt', 'startedAt', 'equipmentCode', 'outcome'] as const;

const queryDate = z.iso.datetime({ offset: true }).or(z.iso.date()).optional();

/** `GET /api/sanitation-cycles?page&pageSize&sort&order&equipmentId&kind&outcome&from&to&q`. */
export const sanitationCycleListQuerySchema = sortableListQuerySchema(sanitationCycleSortFields, 'completedAt').extend({
  order: z.enum(['asc', 'desc']).default('desc'),
  equipmentId: z.uuid().optional(),
  kind: z.enum(['fermenter', 'keg']).optional(),
  outcome: cycleOutcomeSchema.optional(),
  from: queryDate,
  to: queryDate,
  q: searchTextSchema,
});
export type SanitationCycleListQuery = z.infer<typeof sanitationCycleListQuerySchema>;

/** `GET /api/sanitation-status?kind&state&q&page…`: every vessel with its sanitation standing. */
export const sanitationStatusQuerySchema = sortableListQuerySchema(['code', 'state', 'freshUntil', 'lastCycleAt'] as const, 'code').extend({
  kind: z.enum(['fermenter', 'keg']).optional(),
  state: z.enum(['ready', 'needs_cleaning', 'cleaned', 'holding', 'out_of_service']).optional(),
  q: searchTextSchema,
});

const idList = idListSchema({ each: 'Each vessel must be an equipment id', max: 500 });

/** `GET /api/reports/sanitation-audit.pdf?from&to&equipmentId` (equipmentId may repeat or be a comma list; none means every vessel). */
export const sanitationAuditQuerySchema = z
  .object({
    from: z.iso.date('Give from as a date, e.g. 2026-09-01').or(z.iso.datetime({ offset: true })),
    to: z.iso.date('Give to as a date, e.g. 2026-11-30').or(z.iso.datetime({ offset: true })),
    equipmentId: idList.optional(),
    kind: z.enum(['fermenter', 'keg']).optional(),
  })
  .refine((q) => new Date(q.from) <= new Date(q.to), { message: 'from must not be after to', path: ['to'] });
export type SanitationAuditQuery = z.infer<typeof sanitationAuditQuerySchema>;

export interface SanitationStepView {
  step: SanitationStep;
  chemicalId: string | null;
  chemical: string | null;
  concentration: number | null;
  concentrationUnit: ConcentrationUnit | null;
  contactMinutes: number | null;
  minimumContactMinutes: number | null;
  purgeMethod: 'flush' | 'push_out' | null;
  co2Grams: number | null;
  solutionLiters: number | null;
  at: string;
  performedBy: { id: string; name: string } | null;
  ok: boolean;
  note: string;
  /** Set when the step broke an exceptable rule and was recorded with a reason. */
  exceptionReason: string | null;
  exceptionRules: string[];
  vented: boolean | null;
  pushedInto: { id: string; code: string } | null;
}

export interface SanitationCycleView {
  id: string;
  equipment: { id: string; code: string; name: string; kind: 'fermenter' | 'keg' };
  outcome: 'ready' | 'cleaned' | 'needs_cleaning';
  complete: boolean;
  issues: { code: string; step: SanitationStep; message: string }[];
  startedAt: string;
  completedAt: string;
  freshUntil: string | null;
  recordedBy: { id: string; name: string } | null;
  notes: string;
  createdAt: string;
  steps: SanitationStepView[];
}

export interface VesselSanitationStatus {
  id: string;
  code: string;
  name: string;
  kind: 'fermenter' | 'keg';
  /** The state as the co-op should treat it now (a lapsed freshness window counts as needs_cleaning). */
  state: 'ready' | 'needs_cleaning' | 'cleaned' | 'holding' | 'out_of_service';
  storedState: string;
  stateReason: string | null;
  lastCycle: { id: string; outcome: string; completedAt: string; freshUntil: string | null } | null;
  freshUntil: string | null;
}
