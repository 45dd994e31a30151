import type { z } from 'zod';
import type { Database } from '../../backend/db/database.ts';
import { settingSections, type SettingKey } from '../../shared/schemas/settings.ts';
import { getSetting } from '../../backend/modules/settings/settings.service.ts';

type ValueOf<K extends SettingKey> = z.infer<(typeof settingSections)[K]['schema']>;

/**
 * Changes fields of a settings section (merged onto what is stored, completed from the defaults,
 * checked with the section's schema). No audit row: this is data set-up, not an admin's change.
 */
export async function setSetting<K extends SettingKey>(db: Database, key: K, patch: Partial<ValueOf<K>>): Promise<ValueOf<K>> {
  const current = (await getSetting(db, key)).value;
  const value = settingSections[key].schema.parse({ ...current, ...patch }) as ValueOf<K>;
  await db
    .insertInto('setting')
    .values({ key, value: JSON.stringify(value), updated_by: null })
    .onConflict((oc) => oc.column('key').doUpdateSet({ value: JSON.stringify(value) }))
    .execute();
  return value;
}
