import type { z } from 'zod';
import { todayIn } from '../../../shared/billing/dates.ts';
import { billingProfileSchema, defaultBillingProfile, type BillingProfile } from '../../../shared/schemas/billing.ts';
import { settingSections, type BookingRules, type SettingKey, type SettingValue } from '../../../shared/schemas/settings.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { findSettingRow, findSettingValue, upsertSetting } from './settings.repository.ts';

type ValueOf<K extends SettingKey> = z.infer<(typeof settingSections)[K]['schema']>;

/**
 * Reads a settings section. A stored value missing newer fields is completed from the defaults;
 * one that no longer parses falls back to the defaults entirely rather than breaking the co-op.
 */
export async function getSetting<K extends SettingKey>(db: Database, key: K, opts: { forUpdate?: boolean } = {}): Promise<SettingValue<ValueOf<K>>> {
  const section = settingSections[key];
  const row = await findSettingRow(db, key, opts);
  const stored = row?.value && typeof row.value === 'object' ? (row.value as Record<string, unknown>) : {};
  const parsed = section.schema.safeParse({ ...section.defaults, ...stored });
  return {
    key,
    value: (parsed.success ? parsed.data : section.defaults) as ValueOf<K>,
    updatedAt: row ? row.updated_at.toISOString() : null,
    updatedBy: row?.updated_by ? { id: row.updated_by, name: row.updated_by_name ?? '' } : null,
  };
}

export async function getBookingRules(db: Database, opts: { forUpdate?: boolean } = {}): Promise<BookingRules> {
  return (await getSetting(db, 'booking_rules', opts)).value;
}

/** The invoice header and payment instructions live in the `setting` table under this key. */
export const BILLING_PROFILE_KEY = 'billing_profile';

/** The co-op's name, address, e-mail, currency and payment rules (Billing › Profile), completed from the defaults. */
export async function getBillingProfile(db: Database): Promise<BillingProfile> {
  const value = await findSettingValue(db, BILLING_PROFILE_KEY);
  const stored = value && typeof value === 'object' ? (value as Record<string, unknown>) : {};
  const parsed = billingProfileSchema.safeParse({ ...defaultBillingProfile, ...stored });
  return parsed.success ? parsed.data : defaultBillingProfile;
}

/** The co-op's time zone (one for the whole co-op, kept with the booking rules): days, periods and times in e-mails follow it. */
export async function coopTimeZone(db: Database): Promise<string> {
  return (await getBookingRules(db)).timeZone;
}

/** Today's date (YYYY-MM-DD) in the co-op's time zone. */
export async function coopToday(db: Database, now: Date): Promise<{ today: string; timeZone: string }> {
  const timeZone = await coopTimeZone(db);
  return { today: todayIn(timeZone, now), timeZone };
}

/** Everything that names the co-op: name, address, e-mail, currency and payment rules, and its time zone. */
export interface CoopProfile extends BillingProfile {
  timeZone: string;
}

/** The one way to read who the co-op is: e-mails, calendars and documents take its name and time zone from here. */
export async function coopProfile(db: Database): Promise<CoopProfile> {
  const [profile, timeZone] = await Promise.all([getBillingProfile(db), coopTimeZone(db)]);
  return { ...profile, timeZone };
}

/** Saves a section (already parsed by its schema) at the clock's `now` with an audit row; call inside a transaction. */
export async function putSetting<K extends SettingKey>(
  trx: Database,
  key: K,
  value: ValueOf<K>,
  actorId: string,
  now: Date,
): Promise<SettingValue<ValueOf<K>>> {
  const before = await getSetting(trx, key, { forUpdate: true });
  await upsertSetting(trx, key, value, actorId, now);
  await audit(trx, actorId, 'updated', 'Setting', key, { before: before.value, after: value });
  return getSetting(trx, key);
}

/** Saves a section in its own transaction. */
export function saveSetting<K extends SettingKey>(db: Database, key: K, value: ValueOf<K>, actorId: string, now: Date): Promise<SettingValue<ValueOf<K>>> {
  return db.transaction().execute((trx) => putSetting(trx, key, value, actorId, now));
}
