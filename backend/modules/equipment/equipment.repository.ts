import { sql } from 'kysely';
import type { EquipmentKind, EquipmentListQuery, VesselState } from '../../../shared/schemas/equipment.ts';
import type { Database } from '../../db/database.ts';
import { containsPattern, paginate } from '../../lib/paginate.ts';
import { effectiveStateSql } from './vessel-state.ts';

export const equipmentColumns = [
  'id',
  'code',
  'kind',
  'name',
  'capacity_liters',
  'state',
  'attributes',
  'notes',
  'state_changed_at',
  'created_at',
  'updated_at',
] as const;

const storedColumns = equipmentColumns.filter((c) => c !== 'state');
// The state a vessel has now: a lapsed freshness window reads as needs_cleaning at once, before the
// periodic job writes it down.
const currentState = (now: Date) => effectiveStateSql(sql.ref('equipment.id'), sql.ref('equipment.state'), now);
// Codes sort by their number within a prefix (K-2 before K-10).
const codePrefix = sql`split_part(code, '-', 1)`;
const codeNumber = sql`nullif(split_part(code, '-', 2), '')::int`;

export type EquipmentRow = Awaited<ReturnType<ReturnType<typeof selectEquipment>['executeTakeFirstOrThrow']>>;
export function selectEquipment(db: Database, now: Date) {
  return db.selectFrom('equipment').select([...storedColumns, currentState(now).as('state')]);
}

const sortColumns = {
  code: 'code',
  name: 'name',
  kind: 'kind',
  state: 'state',
  capacityLiters: 'capacity_liters',
  stateChangedAt: 'state_changed_at',
} as const;

/** One page of the registry, filtered by kind, state now and text, and the count of all that match. */
export async function equipmentPage(db: Database, q: EquipmentListQuery, now: Date) {
  let base = db.selectFrom('equipment');
  if (q.kind) base = base.where('kind', '=', q.kind);
  if (q.state) base = base.where(currentState(now), '=', q.state);
  if (q.q) {
    const like = containsPattern(q.q);
    base = base.where((eb) => eb.or([eb('code', 'ilike', like), eb('name', 'ilike', like), eb('notes', 'ilike', like)]));
  }
  const direction = q.order === 'desc' ? 'desc' : 'asc';
  return paginate(
    base,
    (qb) =>
      qb
        .select([...storedColumns, currentState(now).as('state')])
        // The code sorts by its number within a prefix, as the sort key itself and as the tie-break.
        .$if(q.sort === 'code', (b) => b.orderBy(codePrefix, direction).orderBy(codeNumber, direction))
        .orderBy(sortColumns[q.sort], (ob) => (q.order === 'desc' ? ob.desc().nullsLast() : ob.asc().nullsLast()))
        .orderBy(codePrefix)
        .orderBy(codeNumber)
        .orderBy('id'),
    q,
  );
}

export async function equipmentRowsByIds(db: Database, ids: string[], now: Date) {
  return await selectEquipment(db, now).where('id', 'in', ids).orderBy(codePrefix).orderBy(codeNumber).execute();
}

export async function stateChangeRows(db: Database, equipmentId: string, limit: number) {
  return await db
    .selectFrom('equipment_state_change as c')
    .leftJoin('app_user as u', 'u.id', 'c.actor_id')
    .select(['c.id', 'c.from_state', 'c.to_state', 'c.reason', 'c.at', 'c.actor_id', 'u.name as actor_name'])
    .where('c.equipment_id', '=', equipmentId)
    .orderBy('c.at', 'desc')
    .orderBy('c.id', 'desc')
    .limit(limit)
    .execute();
}

/** The highest number used under a code prefix and the widest number's length (both null when none). */
export async function highestCodeNumber(db: Database, prefix: string) {
  return await db
    .selectFrom('equipment')
    .select([sql<number | null>`max(${codeNumber})`.as('highest'), sql<number | null>`max(length(split_part(code, '-', 2)))`.as('width')])
    .where(sql<boolean>`${codePrefix} = ${prefix}`)
    .where(sql<boolean>`split_part(code, '-', 2) ~ '^[0-9]+$'`)
    .executeTakeFirst();
}

export interface NewEquipmentRow {
  code: string;
  kind: EquipmentKind;
  name: string;
  capacityLiters: number | null;
  state: VesselState;
  attributes: unknown;
  notes: string;
}

/** Adds an item with the first line of its state history. */
export async function insertEquipment(trx: Database, input: NewEquipmentRow, actorId: string | null, now: Date) {
  const row = await trx
    .insertInto('equipment')
    .values({
      code: input.code,
      kind: input.kind,
      name: input.name,
      capacity_liters: input.capacityLiters,
      state: input.state,
      attributes: sql`${JSON.stringify(input.attributes)}::jsonb`,
      notes: input.notes,
      state_changed_at: now,
    })
    .returning(equipmentColumns)
    .executeTakeFirstOrThrow();
  await trx
    .insertInto('equipment_state_change')
    .values({ equipment_id: row.id, from_state: null, to_state: input.state, reason: 'Added to the registry', actor_id: actorId, at: now })
    .execute();
  return row;
}

export interface EquipmentChanges {
  code?: string | undefined;
  name?: string | undefined;
  capacityLiters?: number | null | undefined;
  notes?: string | undefined;
  attributes?: unknown;
}

export async function updateEquipmentRow(trx: Database, id: string, input: EquipmentChanges, now: Date) {
  return await trx
    .updateTable('equipment')
    .set({
      ...(input.code !== undefined ? { code: input.code } : {}),
      ...(input.name !== undefined ? { name: input.name } : {}),
      ...(input.capacityLiters !== undefined ? { capacity_liters: input.capacityLiters } : {}),
      ...(input.notes !== undefined ? { notes: input.notes } : {}),
      ...(input.attributes !== undefined ? { attributes: sql`${JSON.stringify(input.attributes)}::jsonb` } : {}),
      updated_at: now,
    })
    .where('id', '=', id)
    .returning(equipmentColumns)
    .executeTakeFirstOrThrow();
}

/** An item's code and stored state, locked for the rest of the transaction. */
export async function lockEquipment(trx: Database, id: string) {
  return await trx.selectFrom('equipment').select(['id', 'code', 'state']).where('id', '=', id).forUpdate().executeTakeFirst();
}
