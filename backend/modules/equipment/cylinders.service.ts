import type { Equipment } from '../../../shared/schemas/equipment.ts';
import type { CylinderView } from '../../../shared/schemas/inspections.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, unprocessable } from '../../lib/http-problem.ts';
import {
  connectedSupply,
  cylinderCode,
  cylinderLog,
  insertCylinderEvent,
  lockEquipmentRow,
  lockSupply,
  setConnected,
  setRemaining,
  supplyOf,
} from './cylinders.repository.ts';
import { assertInspected, describeBlocks, inspectionBlocks } from './inspections.service.ts';

/**
 * CO2 cylinders: what is left in each (kg, never below zero: a check constraint), which one supplies
 * the co-op's gas line (at most one: a unique partial index), and a log of swaps, refills and draws.
 * CO2 recorded for a keg fill or a purge is drawn from the connected cylinder in the same
 * transaction; with no cylinder connected nothing is drawn (the amount is still billed).
 */

const round3 = (v: number) => Math.round(v * 1000) / 1000;
const num = (v: unknown) => Number(v ?? 0);

const sizeOf = (item: Pick<Equipment, 'attributes'>) => num((item.attributes as { sizeKg?: number }).sizeKg);

export async function cylinderView(db: Database, item: Equipment): Promise<CylinderView> {
  const [supply, log] = await Promise.all([supplyOf(db, item.id), cylinderLog(db, item.id)]);
  const a = item.attributes as { sizeKg?: number; fillPercent?: number };
  return {
    sizeKg: sizeOf(item),
    remainingKg: supply ? num(supply.remaining_kg) : round3((num(a.sizeKg) * (a.fillPercent ?? 100)) / 100),
    connected: supply?.connected ?? false,
    connectedAt: supply?.connected_at ? supply.connected_at.toISOString() : null,
    log: log.map((e) => ({
      id: String(e.id),
      action: e.action,
      kg: num(e.kg),
      remainingKg: num(e.remaining_kg),
      replacedCylinder: e.replaced_cylinder_id ? { id: e.replaced_cylinder_id, code: e.replaced_code ?? '' } : null,
      note: e.note,
      at: e.at.toISOString(),
    })),
  };
}

function assertCylinder(item: Equipment) {
  if (item.kind !== 'co2_cylinder') throw unprocessable('Only a CO2 cylinder supplies the gas line.', [{ path: '', message: 'Pick a CO2 cylinder' }]);
}

/**
 * Connects a cylinder to the gas line in place of the one on it (a swap, logged on both). A cylinder
 * past its test date, with a failed test, out of service or empty is refused (409).
 */
export async function connectCylinder(db: Database, item: Equipment, input: { note?: string | undefined }, actorId: string, now: Date): Promise<void> {
  assertCylinder(item);
  await db.transaction().execute(async (trx) => {
    const current = await lockEquipmentRow(trx, item.id);
    if (current.state === 'out_of_service') throw conflict(`${current.code} is out of service and cannot be connected.`);
    await assertInspected(trx, [current], 'connected', now);
    // Lock the line: whichever cylinder is on it now.
    const on = await connectedSupply(trx, { lock: true });
    if (on?.cylinder_id === item.id) throw conflict(`${current.code} is already connected.`, { title: 'No change' });
    const supply = await lockSupply(trx, item.id);
    if (num(supply.remaining_kg) <= 0) throw conflict(`${current.code} is empty; refill it first.`);
    const note = input.note ?? '';
    if (on) {
      await setConnected(trx, on.cylinder_id, false, now);
      await insertCylinderEvent(trx, { cylinder_id: on.cylinder_id, action: 'disconnected', remaining_kg: on.remaining_kg, note, actor_id: actorId, at: now });
    }
    await setConnected(trx, item.id, true, now);
    await insertCylinderEvent(trx, {
      cylinder_id: item.id,
      action: 'connected',
      remaining_kg: supply.remaining_kg,
      replaced_cylinder_id: on?.cylinder_id ?? null,
      note,
      actor_id: actorId,
      at: now,
    });
    await audit(trx, actorId, 'connected', 'Equipment', item.id, { code: current.code, replaced: on?.cylinder_id ?? null });
  });
}

/** Records a cylinder back from the gas supplier: full (its size) or with the kg given. */
export async function refillCylinder(
  db: Database,
  item: Equipment,
  input: { remainingKg?: number | undefined; note?: string | undefined },
  actorId: string,
  now: Date,
): Promise<void> {
  assertCylinder(item);
  const size = sizeOf(item);
  const kg = round3(input.remainingKg ?? size);
  if (kg > size) throw unprocessable(`${item.code} holds ${size} kg.`, [{ path: 'remainingKg', message: `At most ${size} kg` }]);
  await db.transaction().execute(async (trx) => {
    await lockEquipmentRow(trx, item.id);
    const supply = await lockSupply(trx, item.id);
    await setRemaining(trx, item.id, kg, now);
    await insertCylinderEvent(trx, {
      cylinder_id: item.id,
      action: 'refilled',
      kg: round3(Math.max(0, kg - num(supply.remaining_kg))),
      remaining_kg: kg,
      note: input.note ?? '',
      actor_id: actorId,
      at: now,
    });
    await audit(trx, actorId, 'refilled', 'Equipment', item.id, { code: item.code, remainingKg: kg });
  });
}

/**
 * Takes CO2 recorded for a fill or purge off the connected cylinder, inside the caller's transaction.
 * 409 when the connected cylinder is past its test (or failed it) or holds less than is drawn; nothing
 * is drawn when no cylinder is connected.
 */
export async function drawCo2(
  trx: Database,
  draw: { grams: number; sourceType: 'keg_fill' | 'sanitation_cycle'; sourceId: string; actorId: string | null; at: Date; now: Date },
): Promise<void> {
  if (!(draw.grams > 0)) return;
  const on = await connectedSupply(trx, { lock: false });
  if (!on) return;
  const cylinder = await cylinderCode(trx, on.cylinder_id);
  const blocks = (await inspectionBlocks(trx, [cylinder.id], draw.now)).get(cylinder.id);
  if (blocks)
    throw conflict(`The connected cylinder ${cylinder.code} may not be used (${describeBlocks(blocks)}); connect another cylinder. Nothing was recorded.`, {
      title: 'Inspection due',
    });
  const supply = await lockSupply(trx, cylinder.id);
  const kg = round3(draw.grams / 1000);
  const left = round3(num(supply.remaining_kg) - kg);
  if (left < 0) {
    throw conflict(
      `The connected cylinder ${cylinder.code} has ${num(supply.remaining_kg)} kg left, less than the ${kg} kg recorded; connect a full cylinder. Nothing was recorded.`,
      {
        title: 'Cylinder empty',
      },
    );
  }
  await setRemaining(trx, cylinder.id, left, draw.now);
  await insertCylinderEvent(trx, {
    cylinder_id: cylinder.id,
    action: 'drawn',
    kg,
    remaining_kg: left,
    source_type: draw.sourceType,
    source_id: draw.sourceId,
    actor_id: draw.actorId,
    at: draw.at,
  });
}

/** The CO2 of the purge steps entered (the co-op's usual figure where none is given), in grams. */
export function purgeGrams(steps: readonly { step: string; co2Grams?: number | undefined }[], co2GramsPerPurge: number): number {
  return steps.filter((s) => s.step === 'purge').reduce((sum, s) => sum + (s.co2Grams ?? co2GramsPerPurge), 0);
}
