import {
  inspectionKindLabels,
  inspectionKindsByEquipment,
  type CreateInspectionInput,
  type InspectionBlock,
  type InspectionDue,
  type InspectionView,
  type MaintenanceItem,
  type MaintenanceListQuery,
  type PressureSafetySettings,
} from '../../../shared/schemas/inspections.ts';
import type { Equipment, VesselState } from '../../../shared/schemas/equipment.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, unprocessable } from '../../lib/http-problem.ts';
import { coopTimeZone } from '../billing/billing-profile.service.ts';
import { getSetting } from '../settings/settings.service.ts';
import { pageOf } from '../../lib/paginate.ts';
import { lockEquipment } from './equipment.repository.ts';
import {
  dueRowsOf,
  idleItemsWithLapses,
  inspectionRows,
  insertInspection,
  lastStateChangeReason,
  lockItemForInspection,
  maintenancePage,
  setHydroTestDue,
  type DueRow,
} from './inspections.repository.ts';
import { writeStateChange } from './vessel-state.ts';

const FUTURE_SLACK_MS = 10 * 60_000;
const DAY = 24 * 3600_000;
/** The reason a failed inspection writes on the state change; a later passing one looks for it to put the item back. */
const FAILED_REASON = 'Inspection failed';
/** The reason the periodic pass writes when an idle item's inspection has come due. */
const OVERDUE_REASON = 'Inspection past due';

export async function pressureSafetySettings(db: Database): Promise<PressureSafetySettings> {
  return (await getSetting(db, 'pressure_safety')).value;
}

const addMonths = (d: Date, months: number) => {
  const out = new Date(d);
  out.setUTCMonth(out.getUTCMonth() + months);
  return out;
};

async function dueRows(db: Database, ids: string[]): Promise<DueRow[]> {
  if (!ids.length) return [];
  return dueRowsOf(db, await coopTimeZone(db), ids);
}

const iso = (d: Date | string | null) => (d ? new Date(d).toISOString() : null);

/** `inspectionsDue` of an item: each kind on record with its due time, failed and overdue flags. */
export async function inspectionsDue(db: Database, equipmentId: string, now: Date): Promise<InspectionDue[]> {
  return (await dueRows(db, [equipmentId])).map((r) => ({
    kind: r.kind,
    dueAt: iso(r.due_at),
    failed: r.failed,
    overdue: r.due_at !== null && new Date(r.due_at).getTime() <= now.getTime(),
  }));
}

/** What stops each item from being filled, carbonated, booked or connected at `now` (items without a block are absent). */
export async function inspectionBlocks(db: Database, ids: string[], now: Date): Promise<Map<string, InspectionBlock[]>> {
  const out = new Map<string, InspectionBlock[]>();
  for (const r of await dueRows(db, ids)) {
    let reason: InspectionBlock['reason'] | null = null;
    if (r.failed) reason = 'failed';
    else if (r.due_at !== null && new Date(r.due_at).getTime() <= now.getTime()) reason = 'overdue';
    if (!reason) continue;
    const list = out.get(r.equipment_id) ?? [];
    list.push({ kind: r.kind, reason, dueAt: iso(r.due_at) });
    out.set(r.equipment_id, list);
  }
  return out;
}

/** "pressure test due 2026-11-01" / "relief-valve check failed", for 409 messages. */
export function describeBlocks(blocks: InspectionBlock[]): string {
  return blocks.map((b) => `${inspectionKindLabels[b.kind].toLowerCase()} ${b.reason === 'failed' ? 'failed' : `was due ${b.dueAt!.slice(0, 10)}`}`).join(', ');
}

/** Throws 409 when any of the items is blocked by an inspection; `what` says what was refused ("filled"). */
export async function assertInspected(db: Database, items: { id: string; code: string }[], what: string, now: Date): Promise<void> {
  const blocks = await inspectionBlocks(
    db,
    items.map((i) => i.id),
    now,
  );
  const refused = items.filter((i) => blocks.has(i.id));
  if (!refused.length) return;
  throw conflict(
    `Cannot be ${what}: ${refused.map((i) => `${i.code} (${describeBlocks(blocks.get(i.id)!)})`).join('; ')}. Record a passing inspection first.`,
    { title: 'Inspection due', blocked: refused.map((i) => ({ equipmentId: i.id, code: i.code, inspections: blocks.get(i.id) })) },
  );
}

/**
 * The periodic pass: an idle item (ready, cleaned or waiting for cleaning) whose inspection has
 * failed or come due by `now` goes out of service, with a history row saying which, so the registry
 * and the item's history show it as well as the refusals (which read the due dates themselves). An
 * item holding beer keeps its state until it is emptied; the next pass takes it then. A passing
 * inspection puts it back (see {@link recordInspection}). Returns how many items it took out.
 */
export async function applyInspectionLapses(db: Database, now: Date): Promise<number> {
  const ids = await idleItemsWithLapses(db, await coopTimeZone(db), now);
  let taken = 0;
  for (const id of ids) {
    // One transaction per item; inside a caller's transaction (the demo seed's), that one.
    const inOne = <T>(fn: (trx: Database) => Promise<T>) => (db.isTransaction ? fn(db) : db.transaction().execute(fn));
    taken += await inOne(async (trx) => {
      const item = await lockEquipment(trx, id);
      if (!item || !['ready', 'cleaned', 'needs_cleaning'].includes(item.state)) return 0;
      const blocks = (await inspectionBlocks(trx, [id], now)).get(id);
      if (!blocks?.length) return 0;
      const prefix = blocks.some((b) => b.reason === 'failed') ? FAILED_REASON : OVERDUE_REASON;
      await writeStateChange(trx, id, item.state, 'out_of_service', `${prefix}: ${describeBlocks(blocks)}`, null, now);
      return 1;
    });
  }
  return taken;
}

export async function listInspections(db: Database, equipmentId: string, limit = 100): Promise<InspectionView[]> {
  const rows = await inspectionRows(db, equipmentId, limit);
  return rows.map((r) => ({
    id: r.id,
    kind: r.kind,
    at: r.at.toISOString(),
    passed: r.passed,
    nextDueAt: iso(r.next_due_at),
    note: r.note,
    recordedBy: r.recorded_by ? { id: r.recorded_by, name: r.recorder_name ?? '' } : null,
  }));
}

/**
 * Records an inspection in one transaction with its audit row. A failed one takes an idle item out
 * of service (with a history row); a passing one that leaves nothing failed or past due puts an
 * item taken out by a failed inspection back (kegs and fermenters to be cleaned, cylinders ready).
 * A passing hydrostatic test moves the cylinder's registry test date.
 */
export async function recordInspection(db: Database, item: Equipment, input: CreateInspectionInput, actorId: string, now: Date): Promise<InspectionView> {
  const allowed = inspectionKindsByEquipment[item.kind];
  if (!allowed.includes(input.kind)) {
    throw unprocessable(
      `A ${item.kind.replace('_', ' ')} takes ${allowed.length ? allowed.map((k) => inspectionKindLabels[k].toLowerCase()).join(', ') : 'no inspections'}.`,
      [{ path: 'kind', message: 'Not an inspection this item takes' }],
    );
  }
  const at = new Date(input.at);
  if (at.getTime() > now.getTime() + FUTURE_SLACK_MS)
    throw unprocessable('An inspection cannot be recorded in the future.', [{ path: 'at', message: 'This time is in the future' }]);
  const settings = await pressureSafetySettings(db);
  let nextDue: Date | null = input.nextDueAt ? new Date(input.nextDueAt) : null;
  if (nextDue && nextDue.getTime() <= at.getTime())
    throw unprocessable('The next inspection is due after this one.', [{ path: 'nextDueAt', message: 'Pick a time after the inspection' }]);
  if (input.passed && !nextDue) nextDue = addMonths(at, settings.intervalMonths[input.kind]);
  const timeZone = await coopTimeZone(db);

  const id = await db.transaction().execute(async (trx) => {
    const current = await lockItemForInspection(trx, item.id);
    const row = await insertInspection(trx, {
      equipmentId: item.id,
      kind: input.kind,
      at,
      passed: input.passed,
      nextDueAt: nextDue,
      note: input.note ?? '',
      recordedBy: actorId,
    });
    if (input.kind === 'hydrostatic_test' && input.passed && nextDue) {
      // The registry's test date is the last day the cylinder may be used.
      const lastDay = new Date(nextDue.getTime() - 1);
      const date = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(lastDay);
      await setHydroTestDue(trx, item.id, date, now);
    }
    const label = inspectionKindLabels[input.kind].toLowerCase();
    const idle: VesselState[] = ['ready', 'cleaned', 'needs_cleaning'];
    if (!input.passed && idle.includes(current.state)) {
      await writeStateChange(trx, item.id, current.state, 'out_of_service', `${FAILED_REASON}: ${label}${input.note ? ` (${input.note})` : ''}`, actorId, now);
    } else if (input.passed && current.state === 'out_of_service') {
      const lastReason = await lastStateChangeReason(trx, item.id);
      const stillBlocked = (await inspectionBlocks(trx, [item.id], now)).has(item.id);
      if ((lastReason?.startsWith(FAILED_REASON) || lastReason?.startsWith(OVERDUE_REASON)) && !stillBlocked) {
        const back: VesselState = current.kind === 'co2_cylinder' || current.kind === 'tap' ? 'ready' : 'needs_cleaning';
        await writeStateChange(trx, item.id, 'out_of_service', back, `Back in service: ${label} passed`, actorId, now);
      }
    }
    await audit(trx, actorId, 'inspected', 'Equipment', item.id, {
      code: current.code,
      kind: input.kind,
      passed: input.passed,
      at: at.toISOString(),
      nextDueAt: iso(nextDue),
    });
    return row.id;
  });
  return (await listInspections(db, item.id)).find((i) => i.id === id)!;
}

/** Inspections failed, past due or due within the co-op's warning days, sorted, filtered and paged in SQL. */
export async function listMaintenance(db: Database, q: MaintenanceListQuery, now: Date): Promise<Page<MaintenanceItem>> {
  const [tz, settings] = await Promise.all([coopTimeZone(db), pressureSafetySettings(db)]);
  const soon = new Date(now.getTime() + settings.dueSoonDays * DAY);
  const page = await maintenancePage(db, q, tz, now, soon);
  return pageOf(
    page,
    (r) => ({
      equipment: { id: r.id, code: r.code, name: r.name, kind: r.equipment_kind, state: r.state },
      kind: r.kind,
      dueAt: iso(r.due_at),
      status: r.status!,
      lastAt: iso(r.last_at),
    }),
    q,
  );
}
