import type { KegCheckOutInput, KegHistoryEntry, KegListQuery, KegMoveInput, KegView, TapBoardEntry } from '../../../shared/schemas/kegs.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, unprocessable } from '../../lib/http-problem.ts';
import { setVesselState } from '../equipment/vessel-state.ts';
import { beerFacts } from '../../../shared/cellar/trace.ts';
import { undoSnapshot } from './keg-undo.repository.ts';
import { auditState, recordUndo, type KegUndoOffer } from './keg-undo.service.ts';
import {
  activeMember,
  addMovement,
  closeFill,
  kegHistoryRows,
  kegPage,
  kegRow,
  lockKeg,
  lockTap,
  mapTapTaken,
  openFill,
  otherKegOnTap,
  putWhereabouts,
  setFillLevel,
  tapRows,
  userName,
  type KegRow,
  type KegVisibility,
} from './kegs.repository.ts';

export { KEG_UNDO_WINDOW_MS, undoKegAction, type KegUndoOffer } from './keg-undo.service.ts';
export type { KegVisibility } from './kegs.repository.ts';

const iso = (d: Date | string | null | undefined) => (d ? new Date(d).toISOString() : null);
const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));
const attr = (a: unknown, k: string) => (a && typeof a === 'object' ? (a as Record<string, unknown>)[k] : undefined);
const attrNum = (a: unknown, k: string) => {
  const v = attr(a, k);
  return typeof v === 'number' ? v : null;
};
const attrStr = (a: unknown, k: string) => {
  const v = attr(a, k);
  return typeof v === 'string' ? v : null;
};

/** The member a keg "belongs to" for the permission policy: who has it out, else whose beer is in it. */
export function kegMemberId(r: Pick<KegRow, 'member_id' | 'batch_owner_id'>): string {
  return r.member_id ?? r.batch_owner_id ?? '';
}

function toKegView(r: KegRow, showOwner: boolean): KegView {
  return {
    id: r.id,
    code: r.code,
    name: r.name,
    capacityLiters: num(r.capacity_liters),
    lock: attrStr(r.attributes, 'lock'),
    serial: attrStr(r.attributes, 'serial'),
    state: r.state,
    whereabouts: r.whereabouts,
    since: iso(r.since),
    tap: r.tap_id ? { id: r.tap_id, code: r.tap_code ?? '', name: r.tap_name ?? '', position: attrStr(r.tap_attributes, 'position') } : null,
    member: showOwner && r.member_id ? { id: r.member_id, name: r.member_name ?? '' } : null,
    checkedOutAt: iso(r.checked_out_at),
    dueAt: iso(r.due_at),
    overdue: Boolean(r.overdue),
    lastRemindedAt: iso(r.last_reminded_at),
    contents: r.fill_id
      ? {
          fillId: r.fill_id,
          batchId: r.batch_id!,
          batchName: r.batch_name ?? '',
          style: r.batch_style ?? '',
          volumeLiters: Number(r.volume_liters),
          remainingLiters: Number(r.remaining_liters),
          og: num(r.og),
          fg: num(r.fg),
          abv: num(r.abv),
          filledAt: iso(r.filled_at)!,
          bestBefore: iso(r.best_before),
          bestBeforeState: r.best_before_state,
          dissolvedOxygenPpb: num(r.dissolved_oxygen_ppb),
          ...beerFacts(r.allergens ?? [], r.finings_kind ? [{ kind: r.finings_kind, dose: Number(r.finings_amount), unit: r.finings_unit ?? '' }] : []),
        }
      : null,
    carbonation: r.plan_id
      ? {
          planId: r.plan_id,
          method: r.plan_method!,
          targetVolumes: Number(r.target_volumes),
          servingPressureKpa: Number(r.serving_pressure_kpa),
          fastPressureKpa: num(r.fast_pressure_kpa),
          lowerPressureAt: iso(r.lower_pressure_at),
          pressureLoweredAt: iso(r.pressure_lowered_at),
          readyAt: iso(r.ready_at)!,
        }
      : null,
    freshUntil: iso(r.fresh_until),
  };
}

export async function listKegs(db: Database, q: KegListQuery, vis: KegVisibility, now: Date): Promise<Page<KegView>> {
  const { rows, total } = await kegPage(db, q, vis, now);
  return { items: rows.map((r) => toKegView(r, vis.showOwner)), total, page: q.page, pageSize: q.pageSize };
}

export async function findKeg(db: Database, id: string, now: Date): Promise<KegRow | undefined> {
  return kegRow(db, id, now);
}

export function kegView(r: KegRow, showOwner: boolean): KegView {
  return toKegView(r, showOwner);
}

export async function tapBoard(db: Database, canSee: (row: KegRow) => boolean, showOwner: boolean, now: Date): Promise<TapBoardEntry[]> {
  const [taps, kegs] = await tapRows(db, now);
  const byTap = new Map(kegs.map((k) => [k.tap_id!, k]));
  return taps.map((t) => {
    const k = byTap.get(t.id);
    return {
      id: t.id,
      code: t.code,
      name: t.name,
      position: attrStr(t.attributes, 'position'),
      lineLengthM: attrNum(t.attributes, 'lineLengthM'),
      lineInsideDiameterMm: attrNum(t.attributes, 'lineInsideDiameterMm'),
      lineMaterial: attrStr(t.attributes, 'lineMaterial'),
      lineResistanceKpaPerM: attrNum(t.attributes, 'lineResistanceKpaPerM'),
      riseM: attrNum(t.attributes, 'riseM'),
      coldRoomTempC: attrNum(t.attributes, 'coldRoomTempC'),
      state: t.state,
      taken: Boolean(k),
      keg: k && canSee(k) ? toKegView(k, showOwner) : null,
    };
  });
}

// ---------------------------------------------------------------------------------------------
// Changes: each in one transaction with a movement row and an audit row.
// ---------------------------------------------------------------------------------------------

export async function checkOutKeg(db: Database, kegId: string, input: KegCheckOutInput, actor: { id: string }, now: Date) {
  const due = new Date(input.dueAt);
  if (due.getTime() <= now.getTime()) throw unprocessable('The due date must be in the future.', [{ path: 'dueAt', message: 'Pick a date after today' }]);
  await db.transaction().execute(async (trx) => {
    const keg = await lockKeg(trx, kegId);
    if (keg.state === 'out_of_service') throw conflict(`${keg.code} is out of service.`);
    if (keg.whereabouts === 'with_member') throw conflict(`${keg.code} is already out with a member.`);
    if (keg.whereabouts === 'missing') throw conflict(`${keg.code} is marked missing: mark it found first.`);
    const member = await activeMember(trx, input.memberId);
    if (!member || !member.is_active || !member.roles.includes('member')) {
      throw unprocessable('Kegs go out to active members only.', [{ path: 'memberId', message: 'Pick an active member' }]);
    }
    await putWhereabouts(trx, kegId, { whereabouts: 'with_member', memberId: member.id, checkedOutAt: now, dueAt: due }, actor.id, now);
    if (keg.tap_id) await setVesselState(trx, keg.tap_id, 'needs_cleaning', `${keg.code} disconnected and checked out; clean the line`, actor.id, now);
    await addMovement(trx, {
      keg_id: kegId,
      action: 'checked_out',
      from_whereabouts: keg.whereabouts,
      to_whereabouts: 'with_member',
      member_id: member.id,
      due_at: due,
      tap_id: keg.tap_id,
      note: input.note ?? '',
      actor_id: actor.id,
      at: now,
    });
    await audit(trx, actor.id, 'checked_out', 'Keg', kegId, { code: keg.code, memberId: member.id, dueAt: due.toISOString() });
  });
}

export async function returnKeg(db: Database, kegId: string, input: { note?: string | undefined }, actor: { id: string }, now: Date): Promise<KegUndoOffer> {
  return db.transaction().execute(async (trx) => {
    const keg = await lockKeg(trx, kegId);
    if (keg.whereabouts !== 'with_member') throw conflict(`${keg.code} is not out with a member.`);
    const before = await undoSnapshot(trx, kegId, keg.state);
    const memberName = keg.member_id ? await userName(trx, keg.member_id) : undefined;
    const late = keg.due_at && new Date(keg.due_at).getTime() < now.getTime();
    await putWhereabouts(trx, kegId, { whereabouts: 'cellar' }, actor.id, now);
    const movementId = await addMovement(trx, {
      keg_id: kegId,
      action: 'returned',
      from_whereabouts: 'with_member',
      to_whereabouts: 'cellar',
      member_id: keg.member_id,
      due_at: keg.due_at,
      note: input.note ?? (late ? 'Returned after its due date' : ''),
      actor_id: actor.id,
      at: now,
    });
    await closeFill(trx, kegId, 'returned', now);
    if (keg.state !== 'out_of_service') {
      await setVesselState(trx, kegId, 'needs_cleaning', `Returned by ${memberName ?? 'a member'}; clean before use`, actor.id, now);
    }
    await audit(trx, actor.id, 'returned', 'Keg', kegId, {
      code: keg.code,
      memberId: keg.member_id,
      late: Boolean(late),
      before: auditState(before),
      after: {
        state: keg.state === 'out_of_service' ? keg.state : 'needs_cleaning',
        whereabouts: 'cellar',
        memberId: null,
        remainingLiters: before.fill ? 0 : null,
      },
    });
    return recordUndo(trx, kegId, 'returned', before, movementId, actor.id, now);
  });
}

export async function moveKeg(db: Database, kegId: string, input: KegMoveInput, actor: { id: string }, now: Date) {
  await db.transaction().execute(async (trx) => {
    const keg = await lockKeg(trx, kegId);
    const to = input.to;
    let tap: { id: string; code: string } | undefined;
    if (input.tapId) {
      const t = await lockTap(trx, input.tapId);
      if (!t || t.kind !== 'tap') throw unprocessable('That is not a tap position.', [{ path: 'tapId', message: 'Pick a tap position' }]);
      if (t.state === 'out_of_service') throw conflict(`Tap ${t.code} is out of service.`);
      if (keg.state !== 'holding') throw conflict(`${keg.code} holds no beer: only a filled keg goes on a tap.`);
      const other = await otherKegOnTap(trx, t.id, kegId);
      if (other) throw conflict(`Tap ${t.code} already has ${other} on it.`);
      tap = t;
    }
    if (keg.whereabouts === to && (keg.tap_id ?? null) === (tap?.id ?? null)) throw conflict(`${keg.code} is already there.`);
    const action = to === 'missing' ? 'marked_missing' : keg.whereabouts === 'missing' ? 'found' : tap ? 'tapped' : keg.tap_id ? 'untapped' : 'moved';
    await putWhereabouts(trx, kegId, { whereabouts: to, tapId: tap?.id ?? null }, actor.id, now).catch((e) => mapTapTaken(e, tap?.code ?? ''));
    // The tap positions follow: a connected line holds beer, a disconnected one needs cleaning.
    if (keg.tap_id && keg.tap_id !== tap?.id)
      await setVesselState(trx, keg.tap_id, 'needs_cleaning', `${keg.code} disconnected; clean the line`, actor.id, now);
    if (tap && tap.id !== keg.tap_id) await setVesselState(trx, tap.id, 'holding', `${keg.code} connected`, actor.id, now);
    await addMovement(trx, {
      keg_id: kegId,
      action,
      from_whereabouts: keg.whereabouts,
      to_whereabouts: to,
      tap_id: tap?.id ?? keg.tap_id,
      member_id: keg.member_id,
      note: input.note ?? '',
      actor_id: actor.id,
      at: now,
    });
    await audit(trx, actor.id, action, 'Keg', kegId, { code: keg.code, from: keg.whereabouts, to, tapId: tap?.id ?? null });
  });
}

export async function emptyKeg(
  db: Database,
  kegId: string,
  input: { note?: string | undefined; dumped?: boolean | undefined },
  actor: { id: string },
  now: Date,
): Promise<KegUndoOffer> {
  return db.transaction().execute(async (trx) => {
    const keg = await lockKeg(trx, kegId);
    if (keg.state !== 'holding') throw conflict(`${keg.code} holds no beer.`);
    const before = await undoSnapshot(trx, kegId, keg.state);
    await closeFill(trx, kegId, input.dumped ? 'dumped' : 'emptied', now);
    if (keg.tap_id) {
      await putWhereabouts(trx, kegId, { whereabouts: 'cold_room' }, actor.id, now);
      await setVesselState(trx, keg.tap_id, 'needs_cleaning', `${keg.code} emptied and disconnected; clean the line`, actor.id, now);
    }
    const movementId = await addMovement(trx, {
      keg_id: kegId,
      action: 'emptied',
      from_whereabouts: keg.whereabouts,
      to_whereabouts: keg.whereabouts,
      tap_id: keg.tap_id,
      note: input.note ?? (input.dumped ? 'Beer dumped' : keg.tap_id ? 'Emptied and taken off its tap' : ''),
      actor_id: actor.id,
      at: now,
    });
    await setVesselState(trx, kegId, 'needs_cleaning', input.dumped ? 'Beer dumped; clean before use' : 'Emptied; clean before use', actor.id, now);
    await audit(trx, actor.id, 'emptied', 'Keg', kegId, {
      code: keg.code,
      ...(input.dumped ? { dumped: true } : {}),
      before: auditState(before),
      after: { state: 'needs_cleaning', whereabouts: keg.whereabouts, tapId: null, remainingLiters: before.fill ? 0 : null },
    });
    return recordUndo(trx, kegId, input.dumped ? 'dumped' : 'emptied', before, movementId, actor.id, now);
  });
}

export async function setKegLevel(db: Database, kegId: string, remainingLiters: number, actor: { id: string }, now: Date) {
  await db.transaction().execute(async (trx) => {
    const keg = await lockKeg(trx, kegId);
    const fill = await openFill(trx, kegId);
    if (!fill) throw conflict(`${keg.code} holds no beer.`);
    if (remainingLiters > Number(fill.volume_liters)) {
      throw unprocessable('More than was filled.', [{ path: 'remainingLiters', message: `At most ${Number(fill.volume_liters)} L` }]);
    }
    await setFillLevel(trx, fill.id, remainingLiters);
    await addMovement(trx, {
      keg_id: kegId,
      action: 'level',
      from_whereabouts: keg.whereabouts,
      to_whereabouts: keg.whereabouts,
      tap_id: keg.tap_id,
      note: `About ${remainingLiters.toFixed(1)} L left`,
      actor_id: actor.id,
      at: now,
    });
    await audit(trx, actor.id, 'level', 'Keg', kegId, { code: keg.code, remainingLiters });
  });
}

const movementTitles: Record<string, string> = {
  checked_out: 'Checked out',
  returned: 'Returned',
  moved: 'Moved',
  tapped: 'Put on tap',
  untapped: 'Taken off tap',
  marked_missing: 'Marked missing',
  found: 'Found',
  level: 'Level noted',
  emptied: 'Emptied',
  undone: 'Undone',
};
const whereLabel: Record<string, string> = { cellar: 'cellar', cold_room: 'cold room', with_member: 'with a member', missing: 'missing' };

/** A keg's whole history, newest first: movements, state changes, cycles, fills, plans, one query. */
export async function kegHistory(db: Database, kegId: string, page: number, pageSize: number): Promise<Page<KegHistoryEntry>> {
  const { rows, total } = await kegHistoryRows(db, kegId, page, pageSize);
  const items = rows.map((r): KegHistoryEntry => {
    let title = '';
    let detail = '';
    switch (r.kind) {
      case 'movement':
        title = movementTitles[r.code] ?? r.code;
        detail = [r.a && r.b && r.a !== r.b ? `${whereLabel[r.a] ?? r.a} → ${whereLabel[r.b] ?? r.b}` : '', r.c ?? ''].filter(Boolean).join(' · ');
        break;
      case 'state':
        title = `State: ${r.b?.replace('_', ' ')}`;
        detail = r.c ?? '';
        break;
      case 'sanitation':
        title = r.code === 'ready' ? 'Sanitation cycle, complete' : `Sanitation cycle, incomplete (${r.code.replace('_', ' ')})`;
        detail = r.c ?? '';
        break;
      case 'fill':
        title = `Filled with ${r.a}`;
        detail = [`${Number(r.b).toFixed(1)} L`, r.c ?? ''].filter(Boolean).join(' · ');
        break;
      case 'emptied':
        title = r.code === 'returned' ? `Returned empty (${r.a})` : `Emptied (${r.a})`;
        break;
      case 'carbonation':
        title = `Carbonation plan, ${r.code === 'fast_start' ? 'fast start' : 'set and hold'} (${r.c})`;
        detail = `${Number(r.a).toFixed(1)} volumes at ${Number(r.b).toFixed(0)} kPa`;
        break;
    }
    return { at: r.at.toISOString(), kind: r.kind, title, detail, actor: r.actor, refId: r.ref_id };
  });
  return { items, total, page, pageSize };
}
