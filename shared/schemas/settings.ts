import { z } from 'zod';
import { equipmentKinds, type EquipmentKind } from './equipment.ts';
import { carbonationSettingsSchema, defaultCarbonationSettings, defaultSanitationSettings, sanitationSettingsSchema } from './cellar-settings.ts';
import { defaultFermentationSettings, fermentationSettingsSchema } from './batches.ts';
import { defaultShelfLifeSettings, shelfLifeSettingsSchema } from '../cellar/trace.ts';
import { defaultPressureSafetySettings, pressureSafetySettingsSchema } from './inspections.ts';
import { isTimeZone } from './time-zone.ts';

/**
 * The co-op's settings: one section per key in the `setting` table. Each section has a schema
 * (used by the Settings screen's form and by `PUT /api/settings/:key`) and defaults used until an
 * admin saves it. Another capability adds its section to `settingSections` below.
 */

const hours = z
  .number()
  .int('Whole hours')
  .min(0, 'At least 0 hours')
  .max(24 * 14, 'At most 14 days');
const days = z.number().int('Whole days').min(1, 'At least 1 day').max(366, 'At most a year');

export const bookingRulesSchema = z.object({
  /** Time kept free after every booking of an item, so it can be cleaned before the next user. */
  cleaningBufferHours: hours,
  /** The longest booking allowed, per kind of equipment. */
  maxDays: z.object(Object.fromEntries(equipmentKinds.map((k) => [k, days])) as Record<EquipmentKind, typeof days>),
  /** How far ahead a booking may start. */
  maxAdvanceDays: days,
  /** How many bookings a member may hold that have not yet ended (booked or in use). */
  maxActiveBookingsPerMember: z.number().int('A whole number').min(1, 'At least 1').max(200, 'At most 200'),
  /** The co-op's time zone: the calendar's days and the times in e-mails. */
  timeZone: z.string().trim().min(1).refine(isTimeZone, 'Use a time zone name like Europe/Dublin or UTC'),
});
export type BookingRules = z.infer<typeof bookingRulesSchema>;

export const defaultBookingRules: BookingRules = {
  cleaningBufferHours: 24,
  maxDays: { fermenter: 35, keg: 56, tap: 42, co2_cylinder: 56 },
  maxAdvanceDays: 90,
  maxActiveBookingsPerMember: 10,
  timeZone: 'UTC',
};

export const bookingRuleLabels = {
  cleaningBufferHours: 'Cleaning buffer',
  maxDays: 'Longest booking',
  maxAdvanceDays: 'How far ahead',
  maxActiveBookingsPerMember: 'Bookings at once per member',
  timeZone: 'Time zone',
} as const;
export type BookingRuleName = keyof typeof bookingRuleLabels;

export interface SettingSection<S extends z.ZodType = z.ZodType> {
  key: string;
  title: string;
  description: string;
  schema: S;
  defaults: z.infer<S>;
}

export const settingSections = {
  booking_rules: {
    key: 'booking_rules',
    title: 'Booking rules',
    description: 'How members may book fermenters, kegs, tap positions and CO2 cylinders. Checked on every new booking.',
    schema: bookingRulesSchema,
    defaults: defaultBookingRules,
  } satisfies SettingSection<typeof bookingRulesSchema>,
  sanitation: {
    key: 'sanitation',
    title: 'Sanitation rules',
    description:
      'The co-op’s cleaners and sanitizers with their usual strengths, the minimum contact times, how long a sanitized vessel stays ready, and the CO2 recorded for purges.',
    schema: sanitationSettingsSchema,
    defaults: defaultSanitationSettings,
  } satisfies SettingSection<typeof sanitationSettingsSchema>,
  carbonation: {
    key: 'carbonation',
    title: 'Carbonation defaults',
    description: 'What the carbonation planner proposes: cold-room temperature, altitude, pressure limit, times and CO2 volumes by style family.',
    schema: carbonationSettingsSchema,
    defaults: defaultCarbonationSettings,
  } satisfies SettingSection<typeof carbonationSettingsSchema>,
  fermentation: {
    key: 'fermentation',
    title: 'Fermentation',
    description:
      'When a batch counts as finished (the same gravity within a tolerance over a span of days; common practice is 0.001 over 2–3 days), the hydrometers’ calibration temperature and the refractometer wort correction factor.',
    schema: fermentationSettingsSchema,
    defaults: defaultFermentationSettings,
  } satisfies SettingSection<typeof fermentationSettingsSchema>,
  shelf_life: {
    key: 'shelf_life',
    title: 'Shelf life',
    description:
      'How long beer keeps in a keg: each fill gets a best-before of the day it was filled plus these days (a batch may set its own). Kegs within the warning days of it show on Today. Common practice for unpasteurised draught beer kept cold.',
    schema: shelfLifeSettingsSchema,
    defaults: defaultShelfLifeSettings,
  } satisfies SettingSection<typeof shelfLifeSettingsSchema>,
  pressure_safety: {
    key: 'pressure_safety',
    title: 'Pressure vessels and gas',
    description:
      'How often kegs and CO2 cylinders are inspected when a record gives no next date, and how far ahead Today warns. Local pressure-vessel rules and the makers decide; these are the co-op’s defaults.',
    schema: pressureSafetySettingsSchema,
    defaults: defaultPressureSafetySettings,
  } satisfies SettingSection<typeof pressureSafetySettingsSchema>,
} as const;
export type SettingKey = keyof typeof settingSections;
export const settingKeys = Object.keys(settingSections) as SettingKey[];
export const settingKeySchema = z.enum(settingKeys as [SettingKey, ...SettingKey[]]);

/** What `GET /api/settings/:key` returns. */
export interface SettingValue<T = unknown> {
  key: string;
  value: T;
  updatedAt: string | null;
  updatedBy: { id: string; name: string } | null;
}
