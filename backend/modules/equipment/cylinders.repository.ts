import { sql, type Insertable } from 'kysely';
import type { Database } from '../../db/database.ts';
import type { Co2CylinderEventTable } from '../../db/tables/inspections.ts';

/** A cylinder's supply row, made on first use from its registry size and fill, locked for the caller's transaction. */
export async function lockSupply(trx: Database, cylinderId: string) {
  await sql`insert into co2_cylinder_supply (cylinder_id, remaining_kg)
    select e.id, round(coalesce((e.attributes->>'sizeKg')::numeric, 0) * coalesce((e.attributes->>'fillPercent')::numeric, 100) / 100, 3)
    from equipment e where e.id = ${cylinderId} and e.kind = 'co2_cylinder'
    on conflict (cylinder_id) do nothing`.execute(trx);
  return trx.selectFrom('co2_cylinder_supply').selectAll().where('cylinder_id', '=', cylinderId).forUpdate().executeTakeFirstOrThrow();
}

/** Writes the new contents and keeps the registry's fill percentage in step. */
export async function setRemaining(trx: Database, cylinderId: string, remainingKg: number, now: Date): Promise<void> {
  await trx.updateTable('co2_cylinder_supply').set({ remaining_kg: remainingKg, updated_at: now }).where('cylinder_id', '=', cylinderId).execute();
  await sql`update equipment set attributes = jsonb_set(attributes, '{fillPercent}',
      to_jsonb(least(100, round(${remainingKg}::numeric * 100 / nullif((attributes->>'sizeKg')::numeric, 0), 1))))
    where id = ${cylinderId} and (attributes->>'sizeKg')::numeric > 0`.execute(trx);
}

/** A cylinder's supply row (none before first use). */
export function supplyOf(db: Database, cylinderId: string) {
  return db.selectFrom('co2_cylinder_supply').selectAll().where('cylinder_id', '=', cylinderId).executeTakeFirst();
}

/** A cylinder's latest 50 log entries, newest first, with the code of the cylinder a swap replaced. */
export function cylinderLog(db: Database, cylinderId: string) {
  return db
    .selectFrom('co2_cylinder_event as ev')
    .leftJoin('equipment as r', 'r.id', 'ev.replaced_cylinder_id')
    .select(['ev.id', 'ev.action', 'ev.kg', 'ev.remaining_kg', 'ev.replaced_cylinder_id', 'r.code as replaced_code', 'ev.note', 'ev.at'])
    .where('ev.cylinder_id', '=', cylinderId)
    .orderBy('ev.at', 'desc')
    .orderBy('ev.id', 'desc')
    .limit(50)
    .execute();
}

/** Locks an equipment row for the caller's transaction and returns its code and state. */
export function lockEquipmentRow(trx: Database, id: string) {
  return trx.selectFrom('equipment').select(['id', 'code', 'state']).where('id', '=', id).forUpdate().executeTakeFirstOrThrow();
}

/** The supply row of the cylinder on the gas line, if any; `lock` holds it for the transaction. */
export function connectedSupply(trx: Database, opts: { lock: boolean }) {
  let q = trx.selectFrom('co2_cylinder_supply').select(['cylinder_id', 'remaining_kg']).where('connected', '=', true);
  if (opts.lock) q = q.forUpdate();
  return q.executeTakeFirst();
}

/** The id and code of a cylinder. */
export function cylinderCode(trx: Database, id: string) {
  return trx.selectFrom('equipment').select(['id', 'code']).where('id', '=', id).executeTakeFirstOrThrow();
}

/** Puts a cylinder on the gas line (`connected`) or takes it off. */
export async function setConnected(trx: Database, cylinderId: string, connected: boolean, now: Date): Promise<void> {
  await trx
    .updateTable('co2_cylinder_supply')
    .set({ connected, connected_at: connected ? now : null, updated_at: now })
    .where('cylinder_id', '=', cylinderId)
    .execute();
}

export async function insertCylinderEvent(trx: Database, values: Insertable<Co2CylinderEventTable>): Promise<void> {
  await trx.insertInto('co2_cylinder_event').values(values).execute();
}
