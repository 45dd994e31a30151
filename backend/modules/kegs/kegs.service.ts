import { sql } from 'kysely';
import type { KegCheckOutInput, KegHistoryEntry, KegListQuery, KegMoveInput, KegView, KegWhereabouts, TapBoardEntry } from '../../../shared/schemas/kegs.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Database } from '../../db/database.ts';
import type { VesselState } from '../../db/tables/cellar.ts';
import type { KegUndoableAction } from '../../db/tables/cellar-operations.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound, unprocessable } from '../../lib/http-problem.ts';
import { effectiveStateSql, freshUntilSql, setVesselState } from '../equipment/vessel-state.ts';
import { beerFacts, defaultShelfLifeSettings, type BestBeforeState } from '../../../shared/cellar/trace.ts';

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

export interface KegVisibility {
  /** Restrict to kegs this member has out or whose beer is theirs. */
  memberId?: string | undefined;
  /** Show who holds each keg. */
  showOwner: boolean;
}

/** Everything a keg row shows, one query: whereabouts, tap, holder, contents, carbonation. */
function kegBase(db: Database) {
  return db
    .selectFrom('equipment as e')
    .leftJoin('keg_whereabouts as kw', 'kw.keg_id', 'e.id')
    .leftJoin('equipment as tap', 'tap.id', 'kw.tap_id')
    .leftJoin('app_user as m', 'm.id', 'kw.member_id')
    .leftJoin('keg_fill as kf', (j) => j.onRef('kf.keg_id', '=', 'e.id').on('kf.emptied_at', 'is', null))
    .leftJoin('batch as b', 'b.id', 'kf.batch_id')
    .leftJoin('transfer as tr', 'tr.id', 'kf.transfer_id')
    .leftJoin('carbonation_plan as cp', (j) => j.onRef('cp.keg_id', '=', 'e.id').on('cp.state', '=', 'active'))
    .where('e.kind', '=', 'keg');
}
type KegBase = ReturnType<typeof kegBase>;

function selectKeg(q: KegBase, now: Date) {
  return q.select((eb) => [
    'e.id',
    'e.code',
    'e.name',
    'e.capacity_liters',
    'e.attributes',
    'e.state as stored_state',
    effectiveStateSql(eb.ref('e.id'), eb.ref('e.state'), now).as('state'),
    freshUntilSql(eb.ref('e.id')).as('fresh_until'),
    sql<KegWhereabouts>`coalesce(kw.whereabouts, 'cellar')`.as('whereabouts'),
    'kw.since',
    'kw.tap_id',
    'tap.code as tap_code',
    'tap.name as tap_name',
    'tap.attributes as tap_attributes',
    'kw.member_id',
    'm.name as member_name',
    'kw.checked_out_at',
    'kw.due_at',
    sql<boolean>`(kw.whereabouts = 'with_member' and kw.due_at < ${now})`.as('overdue'),
    // Reminders to bring it back, while it is out with the member reminded.
    sql<Date | null>`(select max(r.sent_at) from reminder r where r.keg_id = e.id and kw.whereabouts = 'with_member'
      and r.member_id = kw.member_id and r.sent_at >= kw.checked_out_at)`.as('last_reminded_at'),
    'kf.id as fill_id',
    'kf.batch_id',
    'b.name as batch_name',
    'b.style as batch_style',
    'b.owner_id as batch_owner_id',
    'kf.volume_liters',
    'kf.remaining_liters',
    'kf.og',
    'kf.fg',
    'kf.abv',
    'kf.filled_at',
    'kf.best_before',
    'kf.dissolved_oxygen_ppb',
    // Past, or within the co-op's warning days of it (Settings, shelf life).
    sql<BestBeforeState | null>`(case when kf.best_before is null then null when kf.best_before <= ${now} then 'past'
      when kf.best_before <= ${now}::timestamptz + make_interval(days => coalesce((select (s.value->>'nearDays')::int from setting s where s.key = 'shelf_life'), ${defaultShelfLifeSettings.nearDays})) then 'near'
      else 'ok' end)`.as('best_before_state'),
    'b.allergens',
    'tr.finings_kind',
    'tr.finings_amount',
    'tr.finings_unit',
    'cp.id as plan_id',
    'cp.method as plan_method',
    'cp.target_volumes',
    'cp.serving_pressure_kpa',
    'cp.fast_pressure_kpa',
    'cp.lower_pressure_at',
    'cp.pressure_lowered_at',
    'cp.ready_at',
  ]);
}
type KegRow = Awaited<ReturnType<ReturnType<typeof selectKeg>['executeTakeFirstOrThrow']>>;

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

const kegSort = {
  code: sql.ref('e.code'),
  state: sql.ref('state'),
  whereabouts: sql.ref('whereabouts'),
  dueAt: sql.ref('kw.due_at'),
  remainingLiters: sql.ref('kf.remaining_liters'),
} as const;

export async function listKegs(db: Database, q: KegListQuery, vis: KegVisibility, now: Date): Promise<Page<KegView>> {
  let base = kegBase(db);
  if (vis.memberId) {
    const me = vis.memberId;
    base = base.where((eb) => eb.or([eb('kw.member_id', '=', me), eb('b.owner_id', '=', me)]));
  }
  if (q.whereabouts === 'cellar') base = base.where((eb) => eb.or([eb('kw.whereabouts', 'is', null), eb('kw.whereabouts', '=', 'cellar')]));
  else if (q.whereabouts) base = base.where('kw.whereabouts', '=', q.whereabouts);
  if (q.state) base = base.where((eb) => eb(effectiveStateSql(eb.ref('e.id'), eb.ref('e.state'), now), '=', q.state!));
  if (q.overdue !== undefined) {
    base = q.overdue
      ? base.where('kw.whereabouts', '=', 'with_member').where('kw.due_at', '<', now)
      : base.where((eb) => eb.or([eb('kw.due_at', 'is', null), eb('kw.due_at', '>=', now)]));
  }
  if (q.memberId) base = base.where('kw.member_id', '=', q.memberId);
  if (q.q) {
    const like = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    base = base.where((eb) => eb.or([eb('e.code', 'ilike', like), eb('e.name', 'ilike', like), eb('b.name', 'ilike', like)]));
  }
  const [{ total }, rows] = await Promise.all([
    base.select((eb) => eb.fn.countAll<number>().as('total')).executeTakeFirstOrThrow(),
    selectKeg(base, now)
      .orderBy(sql`${kegSort[q.sort]} ${sql.raw(q.order)} nulls last`)
      .orderBy('e.code')
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize)
      .execute(),
  ]);
  return { items: rows.map((r) => toKegView(r, vis.showOwner)), total, page: q.page, pageSize: q.pageSize };
}

export async function findKeg(db: Database, id: string, now: Date): Promise<KegRow | undefined> {
  return selectKeg(kegBase(db).where('e.id', '=', id), now).executeTakeFirst();
}

export function kegView(r: KegRow, showOwner: boolean): KegView {
  return toKegView(r, showOwner);
}

export async function tapBoard(db: Database, canSee: (row: KegRow) => boolean, showOwner: boolean, now: Date): Promise<TapBoardEntry[]> {
  const [taps, kegs] = await Promise.all([
    db.selectFrom('equipment').select(['id', 'code', 'name', 'state', 'attributes']).where('kind', '=', 'tap').orderBy('code').execute(),
    selectKeg(kegBase(db).where('kw.tap_id', 'is not', null), now).execute(),
  ]);
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

async function lockKeg(trx: Database, id: string) {
  const keg = await trx
    .selectFrom('equipment as e')
    .leftJoin('keg_whereabouts as kw', 'kw.keg_id', 'e.id')
    .select(['e.id', 'e.code', 'e.kind', 'e.state', 'kw.whereabouts', 'kw.tap_id', 'kw.member_id', 'kw.due_at'])
    .where('e.id', '=', id)
    .forUpdate('e')
    .executeTakeFirst();
  if (!keg || keg.kind !== 'keg') throw notFound('Keg');
  return { ...keg, whereabouts: keg.whereabouts ?? 'cellar' };
}

async function putWhereabouts(
  trx: Database,
  kegId: string,
  w: { whereabouts: KegWhereabouts; tapId?: string | null; memberId?: string | null; checkedOutAt?: Date | null; dueAt?: Date | null },
  actorId: string,
  now: Date,
) {
  const values = {
    whereabouts: w.whereabouts,
    tap_id: w.tapId ?? null,
    member_id: w.memberId ?? null,
    checked_out_at: w.checkedOutAt ?? null,
    due_at: w.dueAt ?? null,
    since: now,
    updated_by: actorId,
  };
  await trx
    .insertInto('keg_whereabouts')
    .values({ keg_id: kegId, ...values })
    .onConflict((oc) => oc.column('keg_id').doUpdateSet(values))
    .execute();
}

async function closeFill(trx: Database, kegId: string, reason: string, now: Date) {
  await trx
    .updateTable('keg_fill')
    .set({ emptied_at: now, emptied_reason: reason, remaining_liters: 0 })
    .where('keg_id', '=', kegId)
    .where('emptied_at', 'is', null)
    .execute();
  await trx.updateTable('carbonation_plan').set({ state: 'done', updated_at: now }).where('keg_id', '=', kegId).where('state', '=', 'active').execute();
}

function mapTapTaken(err: unknown, tapCode: string): never {
  if ((err as { code?: string })?.code === '23505') throw conflict(`Tap ${tapCode} already has a keg on it.`);
  throw err;
}

export async function checkOutKeg(db: Database, kegId: string, input: KegCheckOutInput, actor: { id: string }, now: Date) {
  const due = new Date(input.dueAt);
  if (due.getTime() <= now.getTime()) throw unprocessable('The due date must be in the future.', [{ path: 'dueAt', message: 'Pick a date after today' }]);
  await db.transaction().execute(async (trx) => {
    const keg = await lockKeg(trx, kegId);
    if (keg.state === 'out_of_service') throw conflict(`${keg.code} is out of service.`);
    if (keg.whereabouts === 'with_member') throw conflict(`${keg.code} is already out with a member.`);
    if (keg.whereabouts === 'missing') throw conflict(`${keg.code} is marked missing: mark it found first.`);
    const member = await trx.selectFrom('app_user').select(['id', 'name', 'roles', 'is_active']).where('id', '=', input.memberId).executeTakeFirst();
    if (!member || !member.is_active || !member.roles.includes('member')) {
      throw unprocessable('Kegs go out to active members only.', [{ path: 'memberId', message: 'Pick an active member' }]);
    }
    await putWhereabouts(trx, kegId, { whereabouts: 'with_member', memberId: member.id, checkedOutAt: now, dueAt: due }, actor.id, now);
    if (keg.tap_id) await setVesselState(trx, keg.tap_id, 'needs_cleaning', `${keg.code} disconnected and checked out; clean the line`, actor.id, now);
    await trx
      .insertInto('keg_movement')
      .values({
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
      })
      .execute();
    await audit(trx, actor.id, 'checked_out', 'Keg', kegId, { code: keg.code, memberId: member.id, dueAt: due.toISOString() });
  });
}

export async function returnKeg(db: Database, kegId: string, input: { note?: string | undefined }, actor: { id: string }, now: Date): Promise<KegUndoOffer> {
  return db.transaction().execute(async (trx) => {
    const keg = await lockKeg(trx, kegId);
    if (keg.whereabouts !== 'with_member') throw conflict(`${keg.code} is not out with a member.`);
    const before = await undoSnapshot(trx, kegId, keg.state);
    const member = keg.member_id ? await trx.selectFrom('app_user').select('name').where('id', '=', keg.member_id).executeTakeFirst() : undefined;
    const late = keg.due_at && new Date(keg.due_at).getTime() < now.getTime();
    await putWhereabouts(trx, kegId, { whereabouts: 'cellar' }, actor.id, now);
    const movement = await trx
      .insertInto('keg_movement')
      .values({
        keg_id: kegId,
        action: 'returned',
        from_whereabouts: 'with_member',
        to_whereabouts: 'cellar',
        member_id: keg.member_id,
        due_at: keg.due_at,
        note: input.note ?? (late ? 'Returned after its due date' : ''),
        actor_id: actor.id,
        at: now,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await closeFill(trx, kegId, 'returned', now);
    if (keg.state !== 'out_of_service') {
      await setVesselState(trx, kegId, 'needs_cleaning', `Returned by ${member?.name ?? 'a member'}; clean before use`, actor.id, now);
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
    return recordUndo(trx, kegId, 'returned', before, movement.id, actor.id, now);
  });
}

export async function moveKeg(db: Database, kegId: string, input: KegMoveInput, actor: { id: string }, now: Date) {
  await db.transaction().execute(async (trx) => {
    const keg = await lockKeg(trx, kegId);
    const to = input.to;
    let tap: { id: string; code: string } | undefined;
    if (input.tapId) {
      const t = await trx.selectFrom('equipment').select(['id', 'code', 'kind', 'state']).where('id', '=', input.tapId).forUpdate().executeTakeFirst();
      if (!t || t.kind !== 'tap') throw unprocessable('That is not a tap position.', [{ path: 'tapId', message: 'Pick a tap position' }]);
      if (t.state === 'out_of_service') throw conflict(`Tap ${t.code} is out of service.`);
      if (keg.state !== 'holding') throw conflict(`${keg.code} holds no beer: only a filled keg goes on a tap.`);
      const other = await trx
        .selectFrom('keg_whereabouts as kw')
        .innerJoin('equipment as e', 'e.id', 'kw.keg_id')
        .select('e.code')
        .where('kw.tap_id', '=', t.id)
        .where('kw.keg_id', '<>', kegId)
        .executeTakeFirst();
      if (other) throw conflict(`Tap ${t.code} already has ${other.code} on it.`);
      tap = t;
    }
    if (keg.whereabouts === to && (keg.tap_id ?? null) === (tap?.id ?? null)) throw conflict(`${keg.code} is already there.`);
    const action = to === 'missing' ? 'marked_missing' : keg.whereabouts === 'missing' ? 'found' : tap ? 'tapped' : keg.tap_id ? 'untapped' : 'moved';
    await putWhereabouts(trx, kegId, { whereabouts: to, tapId: tap?.id ?? null }, actor.id, now).catch((e) => mapTapTaken(e, tap?.code ?? ''));
    // The tap positions follow: a connected line holds beer, a disconnected one needs cleaning.
    if (keg.tap_id && keg.tap_id !== tap?.id)
      await setVesselState(trx, keg.tap_id, 'needs_cleaning', `${keg.code} disconnected; clean the line`, actor.id, now);
    if (tap && tap.id !== keg.tap_id) await setVesselState(trx, tap.id, 'holding', `${keg.code} connected`, actor.id, now);
    await trx
      .insertInto('keg_movement')
      .values({
        keg_id: kegId,
        action,
        from_whereabouts: keg.whereabouts,
        to_whereabouts: to,
        tap_id: tap?.id ?? keg.tap_id,
        member_id: keg.member_id,
        note: input.note ?? '',
        actor_id: actor.id,
        at: now,
      })
      .execute();
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
    const movement = await trx
      .insertInto('keg_movement')
      .values({
        keg_id: kegId,
        action: 'emptied',
        from_whereabouts: keg.whereabouts,
        to_whereabouts: keg.whereabouts,
        tap_id: keg.tap_id,
        note: input.note ?? (input.dumped ? 'Beer dumped' : keg.tap_id ? 'Emptied and taken off its tap' : ''),
        actor_id: actor.id,
        at: now,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await setVesselState(trx, kegId, 'needs_cleaning', input.dumped ? 'Beer dumped; clean before use' : 'Emptied; clean before use', actor.id, now);
    await audit(trx, actor.id, 'emptied', 'Keg', kegId, {
      code: keg.code,
      ...(input.dumped ? { dumped: true } : {}),
      before: auditState(before),
      after: { state: 'needs_cleaning', whereabouts: keg.whereabouts, tapId: null, remainingLiters: before.fill ? 0 : null },
    });
    return recordUndo(trx, kegId, input.dumped ? 'dumped' : 'emptied', before, movement.id, actor.id, now);
  });
}

export async function setKegLevel(db: Database, kegId: string, remainingLiters: number, actor: { id: string }, now: Date) {
  await db.transaction().execute(async (trx) => {
    const keg = await lockKeg(trx, kegId);
    const fill = await trx
      .selectFrom('keg_fill')
      .select(['id', 'volume_liters'])
      .where('keg_id', '=', kegId)
      .where('emptied_at', 'is', null)
      .executeTakeFirst();
    if (!fill) throw conflict(`${keg.code} holds no beer.`);
    if (remainingLiters > Number(fill.volume_liters)) {
      throw unprocessable('More than was filled.', [{ path: 'remainingLiters', message: `At most ${Number(fill.volume_liters)} L` }]);
    }
    await trx.updateTable('keg_fill').set({ remaining_liters: remainingLiters }).where('id', '=', fill.id).execute();
    await trx
      .insertInto('keg_movement')
      .values({
        keg_id: kegId,
        action: 'level',
        from_whereabouts: keg.whereabouts,
        to_whereabouts: keg.whereabouts,
        tap_id: keg.tap_id,
        note: `About ${remainingLiters.toFixed(1)} L left`,
        actor_id: actor.id,
        at: now,
      })
      .execute();
    await audit(trx, actor.id, 'level', 'Keg', kegId, { code: keg.code, remainingLiters });
  });
}

// ---------------------------------------------------------------------------------------------
// Undo of a return, an emptying or a dump: offered for KEG_UNDO_WINDOW_MS by the app's clock and
// only while nothing else has touched the keg (or the tap it came off) since.
// ---------------------------------------------------------------------------------------------

/** How long after a return, an emptying or a dump it can be undone (the app's clock). */
export const KEG_UNDO_WINDOW_MS = 10 * 60_000;

export interface KegUndoOffer {
  id: string;
  action: KegUndoableAction;
  until: string;
}

const undoTitles: Record<KegUndoableAction, string> = { returned: 'return', emptied: 'emptying', dumped: 'dump' };

interface UndoSnapshot {
  kegState: VesselState;
  whereabouts: {
    whereabouts: KegWhereabouts;
    tap_id: string | null;
    member_id: string | null;
    checked_out_at: Date | null;
    due_at: Date | null;
    since: Date | null;
  } | null;
  tapState: VesselState | null;
  fill: { id: string; remaining_liters: number } | null;
  planIds: string[];
}

/** The keg as it is before a return or an emptying: what an undo puts back. */
async function undoSnapshot(trx: Database, kegId: string, kegState: VesselState): Promise<UndoSnapshot> {
  const [whereabouts, fill, plans] = await Promise.all([
    trx
      .selectFrom('keg_whereabouts')
      .select(['whereabouts', 'tap_id', 'member_id', 'checked_out_at', 'due_at', 'since'])
      .where('keg_id', '=', kegId)
      .executeTakeFirst(),
    trx.selectFrom('keg_fill').select(['id', 'remaining_liters']).where('keg_id', '=', kegId).where('emptied_at', 'is', null).executeTakeFirst(),
    trx.selectFrom('carbonation_plan').select('id').where('keg_id', '=', kegId).where('state', '=', 'active').execute(),
  ]);
  const tap = whereabouts?.tap_id ? await trx.selectFrom('equipment').select('state').where('id', '=', whereabouts.tap_id).executeTakeFirst() : undefined;
  return {
    kegState,
    whereabouts: whereabouts ?? null,
    tapState: tap?.state ?? null,
    fill: fill ? { id: fill.id, remaining_liters: Number(fill.remaining_liters) } : null,
    planIds: plans.map((p) => p.id),
  };
}

/** The fields an audit row shows as "before" for a keg action that can be undone. */
function auditState(b: UndoSnapshot) {
  return {
    state: b.kegState,
    whereabouts: b.whereabouts?.whereabouts ?? 'cellar',
    ...(b.whereabouts?.tap_id ? { tapId: b.whereabouts.tap_id } : {}),
    ...(b.whereabouts?.member_id ? { memberId: b.whereabouts.member_id } : {}),
    remainingLiters: b.fill ? b.fill.remaining_liters : null,
    ...(b.planIds.length ? { carbonationPlans: b.planIds.length } : {}),
  };
}

const latestStateChange = (trx: Database, equipmentId: string) =>
  trx
    .selectFrom('equipment_state_change')
    .select((eb) => eb.fn.max('id').as('id'))
    .where('equipment_id', '=', equipmentId)
    .executeTakeFirst()
    .then((r) => (r?.id == null ? null : String(r.id)));

async function recordUndo(
  trx: Database,
  kegId: string,
  action: KegUndoableAction,
  b: UndoSnapshot,
  movementId: string,
  actorId: string,
  now: Date,
): Promise<KegUndoOffer> {
  const until = new Date(now.getTime() + KEG_UNDO_WINDOW_MS);
  const tapId = b.whereabouts?.tap_id ?? null;
  const [kegChange, tapChange] = await Promise.all([latestStateChange(trx, kegId), tapId ? latestStateChange(trx, tapId) : Promise.resolve(null)]);
  const row = await trx
    .insertInto('keg_action_undo')
    .values({
      keg_id: kegId,
      action,
      movement_id: movementId,
      keg_state_change_id: kegChange,
      keg_state: b.kegState,
      whereabouts: b.whereabouts?.whereabouts ?? 'cellar',
      tap_id: tapId,
      tap_state: tapId ? b.tapState : null,
      tap_state_change_id: tapChange,
      member_id: b.whereabouts?.member_id ?? null,
      checked_out_at: b.whereabouts?.checked_out_at ?? null,
      due_at: b.whereabouts?.due_at ?? null,
      since: b.whereabouts?.since ?? null,
      fill_id: b.fill?.id ?? null,
      fill_remaining_liters: b.fill ? b.fill.remaining_liters : null,
      plan_ids: b.planIds,
      actor_id: actorId,
      at: now,
      undo_until: until,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return { id: row.id, action, until: until.toISOString() };
}

/**
 * Undoes a keg's latest return, emptying or dump (or the one named by `actionId`, which must be that one):
 * the keg's state, whereabouts (the member who had it, the tap it came off), its fill with the litres it
 * held and the carbonation plans the action closed come back, in one transaction with a movement and an
 * audit row. 409 when there is nothing to undo, when the window has passed or when the keg or its tap was
 * touched since. `authorize` is asked with the action found before anything is written.
 */
export async function undoKegAction(
  db: Database,
  kegId: string,
  actionId: string | undefined,
  authorize: (action: KegUndoableAction) => void,
  actor: { id: string },
  now: Date,
): Promise<{ action: KegUndoableAction }> {
  return db.transaction().execute(async (trx) => {
    const keg = await lockKeg(trx, kegId);
    const latest = await trx
      .selectFrom('keg_action_undo')
      .selectAll()
      .where('keg_id', '=', kegId)
      .orderBy('at', 'desc')
      .orderBy('movement_id', 'desc')
      .limit(1)
      .forUpdate()
      .executeTakeFirst();
    if (!latest || latest.undone_at || (actionId && latest.id !== actionId)) throw conflict(`Nothing to undo on ${keg.code}.`);
    authorize(latest.action);
    const what = undoTitles[latest.action];
    if (now.getTime() > new Date(latest.undo_until).getTime()) {
      throw conflict(`Too late to undo the ${what} of ${keg.code}: an undo is offered for ${KEG_UNDO_WINDOW_MS / 60_000} minutes.`);
    }
    const touched = () => conflict(`${keg.code} has changed since its ${what}, so it cannot be undone.`);
    const [lastMovement, kegChange, openFill, cycles] = await Promise.all([
      trx
        .selectFrom('keg_movement')
        .select((eb) => eb.fn.max('id').as('id'))
        .where('keg_id', '=', kegId)
        .executeTakeFirst(),
      latestStateChange(trx, kegId),
      trx.selectFrom('keg_fill').select('id').where('keg_id', '=', kegId).where('emptied_at', 'is', null).executeTakeFirst(),
      trx.selectFrom('sanitation_cycle').select('id').where('equipment_id', '=', kegId).where('created_at', '>', latest.created_at).executeTakeFirst(),
    ]);
    if (
      String(lastMovement?.id) !== String(latest.movement_id) ||
      kegChange !== (latest.keg_state_change_id === null ? null : String(latest.keg_state_change_id)) ||
      openFill ||
      cycles
    ) {
      throw touched();
    }
    if (latest.tap_id) {
      const tap = await trx.selectFrom('equipment').select(['code', 'state']).where('id', '=', latest.tap_id).forUpdate().executeTakeFirstOrThrow();
      const [tapChange, other] = await Promise.all([
        latestStateChange(trx, latest.tap_id),
        trx.selectFrom('keg_whereabouts').select('keg_id').where('tap_id', '=', latest.tap_id).executeTakeFirst(),
      ]);
      if (other || tapChange !== (latest.tap_state_change_id === null ? null : String(latest.tap_state_change_id))) {
        throw conflict(`Tap ${tap.code} has changed since ${keg.code} came off it, so the ${what} cannot be undone.`);
      }
    }

    const fromWhere = keg.whereabouts;
    const values = {
      whereabouts: latest.whereabouts,
      tap_id: latest.tap_id,
      member_id: latest.member_id,
      checked_out_at: latest.checked_out_at,
      due_at: latest.due_at,
      since: latest.since ?? now,
      updated_by: actor.id,
    };
    await trx
      .insertInto('keg_whereabouts')
      .values({ keg_id: kegId, ...values })
      .onConflict((oc) => oc.column('keg_id').doUpdateSet(values))
      .execute()
      .catch((e) => mapTapTaken(e, ''));
    let restoredLiters: number | null = null;
    if (latest.fill_id) {
      const fill = await trx
        .updateTable('keg_fill')
        .set({ emptied_at: null, emptied_reason: null, remaining_liters: latest.fill_remaining_liters! })
        .where('id', '=', latest.fill_id)
        .where('emptied_at', 'is not', null)
        .returning('remaining_liters')
        .executeTakeFirst();
      if (!fill) throw touched();
      restoredLiters = Number(fill.remaining_liters);
    }
    const plans = latest.plan_ids.length
      ? await trx
          .updateTable('carbonation_plan')
          .set({ state: 'active', updated_at: now })
          .where('id', 'in', latest.plan_ids)
          .where('state', '=', 'done')
          .returning('id')
          .execute()
      : [];
    await setVesselState(trx, kegId, latest.keg_state, `Undo of the ${what}: back as it was`, actor.id, now);
    if (latest.tap_id && latest.tap_state)
      await setVesselState(trx, latest.tap_id, latest.tap_state, `${keg.code} back on the line (undo of its ${what})`, actor.id, now);
    await trx
      .insertInto('keg_movement')
      .values({
        keg_id: kegId,
        action: 'undone',
        from_whereabouts: fromWhere,
        to_whereabouts: latest.whereabouts,
        tap_id: latest.tap_id,
        member_id: latest.member_id,
        due_at: latest.due_at,
        note: `Undid the ${what}`,
        actor_id: actor.id,
        at: now,
      })
      .execute();
    await trx.updateTable('keg_action_undo').set({ undone_at: now, undone_by: actor.id }).where('id', '=', latest.id).execute();
    await audit(trx, actor.id, 'undone', 'Keg', kegId, {
      code: keg.code,
      undid: latest.action,
      undoId: latest.id,
      before: { state: keg.state, whereabouts: fromWhere, remainingLiters: latest.fill_id ? 0 : null },
      after: {
        state: latest.keg_state,
        whereabouts: latest.whereabouts,
        ...(latest.tap_id ? { tapId: latest.tap_id } : {}),
        ...(latest.member_id ? { memberId: latest.member_id } : {}),
        remainingLiters: restoredLiters,
        ...(plans.length ? { carbonationPlans: plans.length } : {}),
      },
    });
    return { action: latest.action };
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
  const events = sql<{
    at: Date;
    kind: KegHistoryEntry['kind'];
    code: string;
    a: string | null;
    b: string | null;
    c: string | null;
    actor: string | null;
    ref_id: string | null;
  }>`
    select km.at, 'movement' as kind, km.action as code, km.from_whereabouts as a, km.to_whereabouts as b,
      concat_ws(' · ', nullif(mu.name, ''), case when km.due_at is not null and km.action = 'checked_out' then 'due ' || to_char(km.due_at at time zone 'UTC', 'YYYY-MM-DD') end,
        t.code, nullif(km.note, '')) as c,
      au.name as actor, km.id::text as ref_id
    from keg_movement km left join app_user mu on mu.id = km.member_id left join app_user au on au.id = km.actor_id left join equipment t on t.id = km.tap_id
    where km.keg_id = ${kegId}
    union all
    select sc.at, 'state', sc.to_state, sc.from_state, sc.to_state, sc.reason, au.name, sc.id::text
    from equipment_state_change sc left join app_user au on au.id = sc.actor_id where sc.equipment_id = ${kegId}
    union all
    select c.completed_at, 'sanitation', c.outcome, null, null,
      (select string_agg(s.step || coalesce(' ' || s.chemical, '') || coalesce(' ' || trim_scale(s.contact_minutes)::text || ' min', ''), ', ' order by s.position) from sanitation_step s where s.cycle_id = c.id),
      au.name, c.id::text
    from sanitation_cycle c left join app_user au on au.id = c.recorded_by where c.equipment_id = ${kegId}
    union all
    select kf.filled_at, 'fill', null, b.name, kf.volume_liters::text,
      concat_ws(' · ', 'from ' || f.code, case when kf.abv is not null then kf.abv::text || ' % ABV' end), au.name, kf.id::text
    from keg_fill kf join batch b on b.id = kf.batch_id left join transfer t on t.id = kf.transfer_id
      left join equipment f on f.id = t.from_equipment_id left join app_user au on au.id = t.recorded_by
    where kf.keg_id = ${kegId}
    union all
    select kf.emptied_at, 'emptied', kf.emptied_reason, b.name, null, null, null, kf.id::text
    from keg_fill kf join batch b on b.id = kf.batch_id where kf.keg_id = ${kegId} and kf.emptied_at is not null
    union all
    select cp.created_at, 'carbonation', cp.method, cp.target_volumes::text, cp.serving_pressure_kpa::text, cp.state, au.name, cp.id::text
    from carbonation_plan cp left join app_user au on au.id = cp.created_by where cp.keg_id = ${kegId}`;
  const [count, rows] = await Promise.all([
    sql<{ total: number }>`select count(*)::int as total from (${events}) x`.execute(db),
    sql<{
      at: Date;
      kind: KegHistoryEntry['kind'];
      code: string;
      a: string | null;
      b: string | null;
      c: string | null;
      actor: string | null;
      ref_id: string | null;
    }>`
      select * from (${events}) x order by at desc, kind limit ${pageSize} offset ${(page - 1) * pageSize}`.execute(db),
  ]);
  const items = rows.rows.map((r): KegHistoryEntry => {
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
  return { items, total: count.rows[0]?.total ?? 0, page, pageSize };
}
