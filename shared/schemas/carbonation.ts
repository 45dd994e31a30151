import { z } from 'zod';
import { lineMaterials } from '../brewing/index.ts';
import { carbonationMethods } from '../cellar/carbonation-planner.ts';
import { sortableListQuerySchema } from './pagination.ts';
import { isoDateTimeSchema } from './sanitation.ts';

export const lineInputSchema = z.object({
  lengthM: z.number().positive('More than 0 m').max(50),
  insideDiameterMm: z.number().positive().max(20),
  riseM: z.number().min(-5).max(10).default(0),
  /** What the line is made of; vinyl when not given. */
  material: z.enum(lineMaterials).optional(),
  /** Measured or maker's figure; otherwise the nominal value for the tubing. */
  resistanceKpaPerM: z.number().positive().max(200).optional(),
});
export type LineInput = z.infer<typeof lineInputSchema>;

const planFields = {
  targetVolumes: z.number().min(1, 'At least 1 volume').max(4.5, 'At most 4.5 volumes'),
  styleFamily: z.string().trim().max(60).optional(),
  temperatureC: z.number().min(-2, 'At least −2 °C').max(30, 'At most 30 °C').optional(),
  altitudeM: z.number().min(-500).max(5000).optional(),
  method: z.enum(carbonationMethods),
  startedAt: isoDateTimeSchema.optional(),
  holdDays: z.number().min(1).max(30).optional(),
  fastStartPressureKpa: z.number().positive().max(400).optional(),
  fastStartHours: z.number().positive().max(120).optional(),
  settleDays: z.number().min(0).max(14).optional(),
  /** The tap whose line to check; defaults to the tap the keg is on. */
  tapId: z.uuid().optional(),
  /** A line to check instead of a tap's. */
  line: lineInputSchema.optional(),
  notes: z.string().trim().max(2000).optional(),
};

/** Body of `POST /api/carbonation-plans`. */
export const createCarbonationPlanSchema = z.object({ kegId: z.uuid('Pick a keg'), ...planFields });
export type CreateCarbonationPlanInput = z.infer<typeof createCarbonationPlanSchema>;

/** Body of `POST /api/carbonation-plans/preview`: the same without saving (a keg is optional). */
export const previewCarbonationPlanSchema = z.object({ kegId: z.uuid().optional(), ...planFields });

/** Body of `PATCH /api/carbonation-plans/:id`. */
export const updateCarbonationPlanSchema = z.object({ state: z.enum(['done', 'cancelled']) });

export const carbonationPlanListQuerySchema = sortableListQuerySchema(['createdAt', 'readyAt', 'lowerPressureAt'] as const, 'createdAt').extend({
  order: z.enum(['asc', 'desc']).default('desc'),
  kegId: z.uuid().optional(),
  state: z.enum(['active', 'done', 'cancelled', 'superseded']).optional(),
  /** Only active fast starts whose pressure should be lowered by now. */
  lowerDue: z
    .enum(['true', 'false', '1', '0'])
    .transform((v) => v === 'true' || v === '1')
    .optional(),
});

export interface LineCheckView {
  tapId: string | null;
  lengthM: number;
  insideDiameterMm: number;
  riseM: number;
  material?: string | null;
  tubing?: string | null;
  resistanceKpaPerM: number | null;
  balancedLengthM: number | null;
  suits: boolean | null;
  verdict: string;
}

export interface CarbonationPlanView {
  id: string;
  keg: { id: string; code: string } | null;
  fillId: string | null;
  batchName: string | null;
  state: 'active' | 'done' | 'cancelled' | 'superseded';
  method: 'set_and_hold' | 'fast_start';
  styleFamily: string;
  targetVolumes: number;
  temperatureC: number;
  altitudeM: number;
  servingPressureKpa: number;
  fastPressureKpa: number | null;
  fastHours: number | null;
  holdDays: number | null;
  settleDays: number | null;
  startedAt: string;
  lowerPressureAt: string | null;
  pressureLoweredAt: string | null;
  reminderSentAt: string | null;
  readyAt: string;
  fastStartEquilibriumVolumes: number | null;
  warnings: string[];
  line: LineCheckView | null;
  notes: string;
  createdBy: { id: string; name: string } | null;
  createdAt: string;
}
