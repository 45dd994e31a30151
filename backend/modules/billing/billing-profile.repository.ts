import type { BillingProfile } from '../../../shared/schemas/billing.ts';
import type { Database } from '../../db/database.ts';
import { upsertSetting } from '../settings/settings.repository.ts';
import { BILLING_PROFILE_KEY } from '../settings/settings.service.ts';

/** Stores the billing profile as its setting, made or replaced, marked with who changed it and when (`at`, the clock's time). */
export async function storeBillingProfile(trx: Database, profile: BillingProfile, actorId: string, at: Date): Promise<void> {
  await upsertSetting(trx, BILLING_PROFILE_KEY, profile, actorId, at);
}
