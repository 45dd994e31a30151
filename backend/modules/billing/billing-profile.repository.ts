import type { BillingProfile } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { BILLING_PROFILE_KEY } from '../settings/settings.service.ts';

/** Stores the billing profile as its setting, made or replaced, marked with who changed it and when. */
export async function storeBillingProfile(trx: Database, profile: BillingProfile, actorId: string): Promise<void> {
  const value = JSON.stringify(profile);
  await trx
    .insertInto('setting')
    .values({ key: BILLING_PROFILE_KEY, value, updated_by: actorId, updated_at: new Date() })
    .onConflict((oc) => oc.column('key').doUpdateSet({ value, updated_by: actorId, updated_at: new Date() }))
    .execute();
}
