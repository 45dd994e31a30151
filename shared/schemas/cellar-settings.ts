import { z } from 'zod';
import { closedSet, labelsOf } from './labelled-enum.ts';

/**
 * The co-op's cellar rules, two sections of the Settings screen: the sanitation rules (chemical
 * list, minimum contact times, freshness window) and the carbonation defaults (cold room,
 * altitude, presets by style family). Kept in the `setting` table under `sanitation` and
 * `carbonation`.
 */

export const sanitationStepLabels = labelsOf({ clean: 'Clean', rinse: 'Rinse', sanitize: 'Sanitize', purge: 'Purge with CO2' });
export const [sanitationSteps, sanitationStepSchema] = closedSet(sanitationStepLabels);
export type SanitationStep = z.infer<typeof sanitationStepSchema>;

/** Steps that use a chemical from the co-op's list. */
export const chemicalSteps = ['clean', 'sanitize'] as const;
export type ChemicalStep = (typeof chemicalSteps)[number];

export const concentrationUnits = ['%', 'g/L', 'mL/L', 'ppm'] as const;
export const concentrationUnitSchema = z.enum(concentrationUnits);
export type ConcentrationUnit = z.infer<typeof concentrationUnitSchema>;

const minutes = z
  .number()
  .min(0, 'At least 0 minutes')
  .max(24 * 60, 'At most a day');

export const chemicalSchema = z
  .object({
    /** Short stable id, e.g. `alkaline-cleaner`; steps record it with the name. */
    id: z
      .string()
      .trim()
      .min(2)
      .max(40)
      .regex(/^[a-z0-9-]+$/, 'Use lower-case letters, digits and dashes'),
    name: z.string().trim().min(2, 'Enter a name').max(80, 'Keep the name under 80 characters'),
    step: z.enum(chemicalSteps),
    defaultConcentration: z.number().positive('More than 0').max(100_000),
    unit: concentrationUnitSchema,
    /** The soak or contact time the form proposes. */
    recommendedContactMinutes: minutes,
    /** A stricter minimum for this chemical than the step's, if its label asks for one. */
    minimumContactMinutes: minutes.optional(),
    /** The working strength range, in `unit`: a step outside it is refused unless recorded as an exception. */
    minConcentration: z.number().positive('More than 0').max(100_000),
    maxConcentration: z.number().positive('More than 0').max(100_000),
    /** A caustic cleaner absorbs CO2: a clean with it needs the vessel vented first (see shared/cellar/sanitation-rules.ts). */
    caustic: z.boolean().default(false),
    active: z.boolean().default(true),
  })
  .refine((c) => c.minConcentration <= c.maxConcentration, { message: 'The lowest strength must not be above the highest', path: ['maxConcentration'] })
  .refine((c) => c.defaultConcentration >= c.minConcentration && c.defaultConcentration <= c.maxConcentration, {
    message: 'The usual strength must lie within the working range',
    path: ['defaultConcentration'],
  });
export type Chemical = z.infer<typeof chemicalSchema>;

export const sanitationSettingsSchema = z
  .object({
    /** A sanitized vessel stays `ready` this long; then it needs cleaning again. */
    freshnessDays: z.number().int('Whole days').min(1, 'At least 1 day').max(60, 'At most 60 days'),
    /** A vessel emptied or returned should be cleaned within this many days (later cycles are flagged). */
    cleanWithinDays: z.number().int('Whole days').min(1, 'At least 1 day').max(30, 'At most 30 days'),
    /** The co-op's minimum contact times; a shorter one leaves the vessel not ready. */
    minimumContactMinutes: z.object({ clean: minutes, sanitize: minutes }),
    /** A timed CO2 flush shorter than this is refused unless recorded as an exception (a push-out names the keg instead). */
    minimumPurgeSeconds: z.number().int('Whole seconds').min(0, 'At least 0 s').max(600, 'At most 10 minutes'),
    /** CO2 recorded for a purge when the brewer gives no figure (for billing). */
    co2GramsPerPurge: z.number().min(0).max(5000),
    /** CO2 recorded per keg filled in a transfer (headspace purge, push), for billing. */
    co2GramsPerKegFill: z.number().min(0).max(5000),
    chemicals: z.array(chemicalSchema).min(1, 'Keep at least one chemical').max(30),
  })
  .refine((s) => new Set(s.chemicals.map((c) => c.id)).size === s.chemicals.length, {
    message: 'Each chemical needs its own id',
    path: ['chemicals'],
  })
  .refine((s) => chemicalSteps.every((step) => s.chemicals.some((c) => c.step === step && c.active)), {
    message: 'Keep at least one active cleaner and one active sanitizer',
    path: ['chemicals'],
  });
export type SanitationSettings = z.infer<typeof sanitationSettingsSchema>;

export const defaultSanitationSettings: SanitationSettings = {
  freshnessDays: 7,
  cleanWithinDays: 2,
  minimumContactMinutes: { clean: 30, sanitize: 1 },
  // Common practice: 15–30 s of CO2 through a 19 L keg's headspace; 20 s is the co-op's floor.
  minimumPurgeSeconds: 20,
  co2GramsPerPurge: 15,
  co2GramsPerKegFill: 40,
  chemicals: [
    {
      id: 'alkaline-cleaner',
      name: 'Alkaline cleaner (oxygen-based powder)',
      step: 'clean',
      defaultConcentration: 1.5,
      unit: '%',
      recommendedContactMinutes: 60,
      minimumContactMinutes: 30,
      // Common practice: about 0.75–3 % (w/v) for soaking kegs and fermenters.
      minConcentration: 0.75,
      maxConcentration: 3,
      caustic: false,
      active: true,
    },
    {
      id: 'caustic-cleaner',
      name: 'Caustic cleaner (sodium hydroxide)',
      step: 'clean',
      defaultConcentration: 2,
      unit: '%',
      recommendedContactMinutes: 30,
      minimumContactMinutes: 20,
      // Common practice: 1–3 % sodium hydroxide for cleaning in place.
      minConcentration: 1,
      maxConcentration: 3,
      caustic: true,
      active: true,
    },
    {
      id: 'acid-sanitizer',
      name: 'Acid sanitizer (no-rinse, phosphoric)',
      step: 'sanitize',
      defaultConcentration: 1.6,
      unit: 'mL/L',
      recommendedContactMinutes: 2,
      minimumContactMinutes: 1,
      // Common practice: the label's no-rinse dose is about 1.6 mL/L (1 fl oz in 5 US gal); 1.2–2.0 around it.
      minConcentration: 1.2,
      maxConcentration: 2,
      caustic: false,
      active: true,
    },
    {
      id: 'peracetic-sanitizer',
      name: 'Peracetic acid sanitizer',
      step: 'sanitize',
      defaultConcentration: 150,
      unit: 'ppm',
      recommendedContactMinutes: 1,
      minimumContactMinutes: 1,
      // Common practice: 100–200 ppm peracetic acid for no-rinse sanitizing of clean surfaces.
      minConcentration: 100,
      maxConcentration: 200,
      caustic: false,
      active: true,
    },
  ],
};

export const stylePresetSchema = z.object({
  family: z.string().trim().min(2).max(60),
  volumes: z.number().min(1, 'At least 1 volume').max(4.5, 'At most 4.5 volumes'),
});
export type StylePreset = z.infer<typeof stylePresetSchema>;

export const carbonationSettingsSchema = z.object({
  /** The cold room's usual temperature, proposed by the planner. */
  coldRoomTempC: z.number().min(-2).max(15),
  /** The co-op's altitude above sea level (gauges read against the local atmosphere). */
  altitudeM: z.number().min(-500).max(5000),
  /** No plan may ask for more than this on the regulator (kegs, regulators and relief valves have ratings). */
  maxPlanPressureKpa: z.number().min(50).max(400),
  /** Set-and-hold: days at serving pressure until the beer is ready. */
  holdDays: z.number().int().min(3).max(30),
  /** Fast start: pressure and hours at it, then days at serving pressure. */
  fastStartPressureKpa: z.number().min(50).max(400),
  fastStartHours: z.number().int().min(6).max(120),
  settleDays: z.number().int().min(0).max(14),
  /** Faucet, shank and coupler allowance used in line balancing. */
  lineFixedKpa: z.number().min(0).max(50),
  stylePresets: z.array(stylePresetSchema).min(1).max(30),
});
export type CarbonationSettings = z.infer<typeof carbonationSettingsSchema>;

export const defaultCarbonationSettings: CarbonationSettings = {
  coldRoomTempC: 3,
  altitudeM: 0,
  maxPlanPressureKpa: 310,
  holdDays: 14,
  fastStartPressureKpa: 207,
  fastStartHours: 72,
  settleDays: 2,
  lineFixedKpa: 7,
  stylePresets: [
    { family: 'British and Irish ales', volumes: 1.8 },
    { family: 'Porters and stouts', volumes: 2.1 },
    { family: 'American ales and IPAs', volumes: 2.4 },
    { family: 'Lagers', volumes: 2.6 },
    { family: 'Belgian ales', volumes: 2.9 },
    { family: 'Wheat beers', volumes: 3.3 },
    { family: 'Sours and saisons', volumes: 3.0 },
  ],
};

/** A chemical the list knows, matched by id or (case-insensitive) name; brewers may type either. */
export function findChemical(settings: Pick<SanitationSettings, 'chemicals'>, idOrName: string | null | undefined): Chemical | undefined {
  if (!idOrName) return undefined;
  const key = idOrName.trim().toLowerCase();
  return settings.chemicals.find((c) => c.id === key || c.name.toLowerCase() === key);
}
