import type { Database } from '../../db/database.ts';

/** A stored settings row with the name of who last saved it; `forUpdate` locks it for the transaction. */
export function findSettingRow(db: Database, key: string, opts: { forUpdate?: boolean | undefined } = {}) {
  let q = db
    .selectFrom('setting')
    .leftJoin('app_user', 'app_user.id', 'setting.updated_by')
    .select(['setting.value', 'setting.updated_at', 'setting.updated_by', 'app_user.name as updated_by_name'])
    .where('setting.key', '=', key);
  if (opts.forUpdate) q = q.forUpdate('setting');
  return q.executeTakeFirst();
}

/** Just the stored value of a setting, or undefined. */
export async function findSettingValue(db: Database, key: string): Promise<unknown> {
  const row = await db.selectFrom('setting').select('value').where('key', '=', key).executeTakeFirst();
  return row?.value;
}

/** Writes a setting, inserting or replacing it. */
export async function upsertSetting(db: Database, key: string, value: unknown, actorId: string, at: Date): Promise<void> {
  await db
    .insertInto('setting')
    .values({ key, value: JSON.stringify(value), updated_by: actorId, updated_at: at })
    .onConflict((oc) => oc.column('key').doUpdateSet({ value: JSON.stringify(value), updated_by: actorId, updated_at: at }))
    .execute();
}
