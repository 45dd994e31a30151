import { sql } from 'kysely';
import {
  attributesSchemaByKind,
  equipmentCodePrefixes,
  type EquipmentKind,
  type CreateEquipmentInput,
  type Equipment,
  type EquipmentListQuery,
  type EquipmentStateChange,
  type UpdateEquipmentInput,
  type VesselState,
  vesselStateLabels,
} from '../../../shared/schemas/equipment.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound, unprocessable } from '../../lib/http-problem.ts';
import { effectiveStateSql, writeStateChange } from './vessel-state.ts';

const columns = ['id', 'code', 'kind', 'name', 'capacity_liters', 'state', 'attributes', 'notes', 'state_changed_at', 'created_at', 'updated_at'] as const;

const storedColumns = columns.filter((c) => c !== 'state');
// The state a vessel has now: a lapsed freshness window reads as needs_cleaning at once, before the
// periodic job writes it down.
const currentState = (now: Date) => effectiveStateSql(sql.ref('equipment.id'), sql.ref('equipment.state'), now);

type EquipmentRow = Awaited<ReturnType<ReturnType<typeof selectEquipment>['executeTakeFirstOrThrow']>>;
function selectEquipment(db: Database, now: Date) {
  return db.selectFrom('equipment').select([...storedColumns, currentState(now).as('state')]);
}

export function toEquipmentDto(row: EquipmentRow): Equipment {
  return {
    id: row.id,
    code: row.code,
    kind: row.kind,
    name: row.name,
    capacityLiters: row.capacity_liters,
    state: row.state,
    attributes: row.attributes ?? {},
    notes: row.notes,
    stateChangedAt: row.state_changed_at.toISOString(),
    createdAt: row.created_at.toISOString(),
    updatedAt: row.updated_at.toISOString(),
  };
}

const sortColumns = {
  code: 'code',
  name: 'name',
  kind: 'kind',
  state: 'state',
  capacityLiters: 'capacity_liters',
  stateChangedAt: 'state_changed_at',
} as const;

export async function listEquipment(db: Database, q: EquipmentListQuery, now: Date): Promise<Page<Equipment>> {
  let base = db.selectFrom('equipment');
  if (q.kind) base = base.where('kind', '=', q.kind);
  if (q.state) base = base.where(currentState(now), '=', q.state);
  if (q.q) {
    const like = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    base = base.where((eb) => eb.or([eb('code', 'ilike', like), eb('name', 'ilike', like), eb('notes', 'ilike', like)]));
  }
  const [{ total }, rows] = await Promise.all([
    base.select((eb) => eb.fn.countAll<number>().as('total')).executeTakeFirstOrThrow(),
    base
      .select([...storedColumns, currentState(now).as('state')])
      // Codes sort by their number within a prefix (K-2 before K-10), as the sort key itself and as the tie-break.
      .$if(q.sort === 'code', (qb) =>
        qb
          .orderBy(sql`split_part(code, '-', 1)`, (ob) => (q.order === 'desc' ? ob.desc() : ob.asc()))
          .orderBy(sql`nullif(split_part(code, '-', 2), '')::int`, (ob) => (q.order === 'desc' ? ob.desc() : ob.asc())),
      )
      .orderBy(sortColumns[q.sort], (ob) => (q.order === 'desc' ? ob.desc().nullsLast() : ob.asc().nullsLast()))
      .orderBy(sql`split_part(code, '-', 1)`)
      .orderBy(sql`nullif(split_part(code, '-', 2), '')::int`)
      .orderBy('id')
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize)
      .execute(),
  ]);
  return { items: rows.map(toEquipmentDto), total, page: q.page, pageSize: q.pageSize };
}

export async function findEquipment(db: Database, id: string, now: Date): Promise<Equipment | undefined> {
  const row = await selectEquipment(db, now).where('id', '=', id).executeTakeFirst();
  return row ? toEquipmentDto(row) : undefined;
}

export async function getEquipmentOrThrow(db: Database, id: string, now: Date): Promise<Equipment> {
  const item = await findEquipment(db, id, now);
  if (!item) throw notFound('Equipment');
  return item;
}

export async function equipmentHistory(db: Database, equipmentId: string, limit = 100): Promise<EquipmentStateChange[]> {
  const rows = await db
    .selectFrom('equipment_state_change as c')
    .leftJoin('app_user as u', 'u.id', 'c.actor_id')
    .select(['c.id', 'c.from_state', 'c.to_state', 'c.reason', 'c.at', 'c.actor_id', 'u.name as actor_name'])
    .where('c.equipment_id', '=', equipmentId)
    .orderBy('c.at', 'desc')
    .orderBy('c.id', 'desc')
    .limit(limit)
    .execute();
  return rows.map((r) => ({
    id: String(r.id),
    fromState: r.from_state,
    toState: r.to_state,
    reason: r.reason,
    at: r.at.toISOString(),
    actor: r.actor_id ? { id: r.actor_id, name: r.actor_name ?? '' } : null,
  }));
}

/**
 * The next free code for a kind: one past the highest number under the kind's letter, padded like the
 * registry's existing codes of that kind (K-060 → K-061, T-8 → T-9); the first of a kind is `X-1`.
 */
export async function nextEquipmentCode(db: Database, kind: EquipmentKind): Promise<string> {
  const prefix = equipmentCodePrefixes[kind];
  const row = await db
    .selectFrom('equipment')
    .select([
      sql<number | null>`max(nullif(split_part(code, '-', 2), '')::int)`.as('highest'),
      sql<number | null>`max(length(split_part(code, '-', 2)))`.as('width'),
    ])
    .where(sql<boolean>`split_part(code, '-', 1) = ${prefix}`)
    .where(sql<boolean>`split_part(code, '-', 2) ~ '^[0-9]+$'`)
    .executeTakeFirst();
  const next = Number(row?.highest ?? 0) + 1;
  const width = Number(row?.width ?? 1);
  return `${prefix}-${String(next).padStart(width, '0')}`;
}

function isUniqueViolation(err: unknown): boolean {
  return (err as { code?: string }).code === '23505';
}

export async function createEquipment(db: Database, input: CreateEquipmentInput, actorId: string, now: Date): Promise<Equipment> {
  try {
    return await db.transaction().execute(async (trx) => {
      const state = input.state ?? 'needs_cleaning';
      const row = await trx
        .insertInto('equipment')
        .values({
          code: input.code,
          kind: input.kind,
          name: input.name,
          capacity_liters: input.capacityLiters ?? null,
          state,
          attributes: sql`${JSON.stringify(input.attributes)}::jsonb`,
          notes: input.notes ?? '',
          state_changed_at: now,
        })
        .returning(columns)
        .executeTakeFirstOrThrow();
      await trx
        .insertInto('equipment_state_change')
        .values({ equipment_id: row.id, from_state: null, to_state: state, reason: 'Added to the registry', actor_id: actorId, at: now })
        .execute();
      await audit(trx, actorId, 'created', 'Equipment', row.id, { code: row.code, kind: row.kind });
      return toEquipmentDto(row);
    });
  } catch (err) {
    if (isUniqueViolation(err)) throw conflict(`The code ${input.code} is already on another item.`, { title: 'Code taken' });
    throw err;
  }
}

export async function updateEquipment(db: Database, current: Equipment, input: UpdateEquipmentInput, actorId: string, now: Date): Promise<Equipment> {
  // Attributes are merged onto the current ones and must still fit the item's kind.
  const attributes = input.attributes !== undefined ? attributesSchemaByKind[current.kind].parse({ ...current.attributes, ...input.attributes }) : undefined;
  if ((current.kind === 'fermenter' || current.kind === 'keg') && input.capacityLiters === null) {
    throw unprocessable(`A ${current.kind} needs its capacity.`, [{ path: 'capacityLiters', message: 'Enter the capacity in litres' }]);
  }
  try {
    return await db.transaction().execute(async (trx) => {
      const row = await trx
        .updateTable('equipment')
        .set({
          ...(input.code !== undefined ? { code: input.code } : {}),
          ...(input.name !== undefined ? { name: input.name } : {}),
          ...(input.capacityLiters !== undefined ? { capacity_liters: input.capacityLiters } : {}),
          ...(input.notes !== undefined ? { notes: input.notes } : {}),
          ...(attributes !== undefined ? { attributes: sql`${JSON.stringify(attributes)}::jsonb` } : {}),
          updated_at: now,
        })
        .where('id', '=', current.id)
        .returning(columns)
        .executeTakeFirstOrThrow();
      await audit(trx, actorId, 'updated', 'Equipment', current.id, { ...input, ...(attributes ? { attributes } : {}) });
      return toEquipmentDto(row);
    });
  } catch (err) {
    if (isUniqueViolation(err)) throw conflict(`The code ${input.code} is already on another item.`, { title: 'Code taken' });
    throw err;
  }
}

/**
 * Changes an item's state and records who, when and why, inside the caller's transaction.
 * Other cellar work (sanitation cycles, transfers) calls this too, so every change lands in the history.
 */
export async function changeEquipmentState(
  trx: Database,
  change: { equipmentId: string; toState: VesselState; reason: string; actorId: string | null; at: Date },
): Promise<Equipment> {
  const current = await trx.selectFrom('equipment').select(['id', 'code', 'state']).where('id', '=', change.equipmentId).forUpdate().executeTakeFirst();
  if (!current) throw notFound('Equipment');
  if (current.state === change.toState) {
    throw conflict(`${current.code} is already "${vesselStateLabels[change.toState]}".`, { title: 'No change' });
  }
  await writeStateChange(trx, current.id, current.state, change.toState, change.reason, change.actorId, change.at);
  await audit(trx, change.actorId, 'state_changed', 'Equipment', current.id, {
    code: current.code,
    from: current.state,
    to: change.toState,
    reason: change.reason,
  });
  return toEquipmentDto(await selectEquipment(trx, change.at).where('id', '=', current.id).executeTakeFirstOrThrow());
}

/** A state change asked for by a person (the brewer on duty), in its own transaction. */
export async function setEquipmentState(
  db: Database,
  change: { equipmentId: string; toState: VesselState; reason: string; actorId: string | null; at: Date },
): Promise<Equipment> {
  return db.transaction().execute((trx) => changeEquipmentState(trx, change));
}

export async function equipmentByIds(db: Database, ids: string[], now: Date): Promise<Equipment[]> {
  if (!ids.length) return [];
  const rows = await selectEquipment(db, now)
    .where('id', 'in', ids)
    .orderBy(sql`split_part(code, '-', 1)`)
    .orderBy(sql`nullif(split_part(code, '-', 2), '')::int`)
    .execute();
  return rows.map(toEquipmentDto);
}
