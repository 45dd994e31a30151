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
import { pageOf } from '../../lib/paginate.ts';
import {
  equipmentPage,
  equipmentRowsByIds,
  highestCodeNumber,
  insertEquipment,
  lockEquipment,
  selectEquipment,
  stateChangeRows,
  updateEquipmentRow,
  type EquipmentRow,
} from './equipment.repository.ts';
import { writeStateChange } from './vessel-state.ts';

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

export async function listEquipment(db: Database, q: EquipmentListQuery, now: Date): Promise<Page<Equipment>> {
  return pageOf(await equipmentPage(db, q, now), toEquipmentDto, q);
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
  const rows = await stateChangeRows(db, equipmentId, limit);
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
  const row = await highestCodeNumber(db, prefix);
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
      const row = await insertEquipment(
        trx,
        {
          code: input.code,
          kind: input.kind,
          name: input.name,
          capacityLiters: input.capacityLiters ?? null,
          state: input.state ?? 'needs_cleaning',
          attributes: input.attributes,
          notes: input.notes ?? '',
        },
        actorId,
        now,
      );
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
      const row = await updateEquipmentRow(trx, current.id, { ...input, attributes }, now);
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
  const current = await lockEquipment(trx, change.equipmentId);
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
  const rows = await equipmentRowsByIds(db, ids, now);
  return rows.map(toEquipmentDto);
}
