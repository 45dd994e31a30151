import type { BillingProfile } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { BILLING_PROFILE_KEY, getBillingProfile } from '../settings/settings.service.ts';
import { storeBillingProfile } from './billing-profile.repository.ts';

// The co-op's profile and time zone are read through the settings service; billing keeps its old import path.
export { BILLING_PROFILE_KEY, coopTimeZone, coopToday, getBillingProfile } from '../settings/settings.service.ts';

export async function putBillingProfile(trx: Database, profile: BillingProfile, actorId: string, now: Date): Promise<BillingProfile> {
  const before = await getBillingProfile(trx);
  await storeBillingProfile(trx, profile, actorId, now);
  await audit(trx, actorId, 'updated', 'BillingProfile', BILLING_PROFILE_KEY, { before, after: profile });
  return profile;
}
/** Replaces the billing profile at the clock's `now`, audited, in one transaction. */
export async function saveBillingProfile(db: Database, profile: BillingProfile, actorId: string, now: Date): Promise<BillingProfile> {
  return db.transaction().execute((trx) => putBillingProfile(trx, profile, actorId, now));
}
