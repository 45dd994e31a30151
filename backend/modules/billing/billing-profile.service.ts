import { todayIn } from '../../../shared/billing/dates.ts';
import { billingProfileSchema, defaultBillingProfile, type BillingProfile } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { getBookingRules } from '../settings/settings.service.ts';

/** The invoice header and payment instructions live in the `setting` table under this key. */
export const BILLING_PROFILE_KEY = 'billing_profile';

export async function getBillingProfile(db: Database): Promise<BillingProfile> {
  const row = await db.selectFrom('setting').select('value').where('key', '=', BILLING_PROFILE_KEY).executeTakeFirst();
  const stored = row?.value && typeof row.value === 'object' ? (row.value as Record<string, unknown>) : {};
  const parsed = billingProfileSchema.safeParse({ ...defaultBillingProfile, ...stored });
  return parsed.success ? parsed.data : defaultBillingProfile;
}

export async function putBillingProfile(trx: Database, profile: BillingProfile, actorId: string): Promise<BillingProfile> {
  const before = await getBillingProfile(trx);
  const value = JSON.stringify(profile);
  await trx
    .insertInto('setting')
    .values({ key: BILLING_PROFILE_KEY, value, updated_by: actorId, updated_at: new Date() })
    .onConflict((oc) => oc.column('key').doUpdateSet({ value, updated_by: actorId, updated_at: new Date() }))
    .execute();
  await audit(trx, actorId, 'updated', 'BillingProfile', BILLING_PROFILE_KEY, { before, after: profile });
  return profile;
}

/** The co-op's time zone (one for the whole co-op, kept with the booking rules): billing days and periods follow it. */
export async function coopTimeZone(db: Database): Promise<string> {
  return (await getBookingRules(db)).timeZone;
}

export async function coopToday(db: Database, now: Date): Promise<{ today: string; timeZone: string }> {
  const timeZone = await coopTimeZone(db);
  return { today: todayIn(timeZone, now), timeZone };
}

/** Replaces the billing profile, audited, in one transaction. */
export async function saveBillingProfile(db: Database, profile: BillingProfile, actorId: string): Promise<BillingProfile> {
  return db.transaction().execute((trx) => putBillingProfile(trx, profile, actorId));
}
