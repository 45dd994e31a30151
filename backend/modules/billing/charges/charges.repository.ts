import { sql } from 'kysely';
import type { Database } from '../../../db/database.ts';
import type { ChargeContext } from './types.ts';
import { chargedMember, dayInPeriod, localDay, spanInPeriod } from './window.ts';

/** Active accounts holding the member role that existed by the period's last day. */
export function duesMembers(db: Database, ctx: ChargeContext) {
  return db
    .selectFrom('app_user')
    .select(['id', 'name'])
    .where('is_active', '=', true)
    .where(sql<boolean>`'member' = any(roles)`)
    .where(sql<boolean>`(created_at at time zone ${ctx.timeZone})::date <= ${ctx.last}::date`)
    .where(chargedMember(ctx, 'id'))
    .orderBy('id')
    .execute();
}

/** Manual charges and credits of the period not yet on an invoice, oldest first. */
export function openManualCharges(db: Database, ctx: ChargeContext) {
  return db
    .selectFrom('manual_charge')
    .select(['id', 'member_id', 'description', 'reason', 'amount_cents', 'taxable'])
    .where('period', '=', ctx.period)
    .where('invoice_line_id', 'is', null)
    .where(chargedMember(ctx, 'member_id'))
    .orderBy('created_at')
    .orderBy('id')
    .execute();
}

/** Fermenter and tap-position bookings, not cancelled, that use a day of the period, with their local start and end days. */
export function billableBookings(db: Database, ctx: ChargeContext) {
  return db
    .selectFrom('booking as b')
    .innerJoin('equipment as e', 'e.id', 'b.equipment_id')
    .select(['b.id', 'b.owner_id', 'e.code', 'e.kind', 'e.capacity_liters'])
    .select([localDay(ctx, 'b.starts_at').as('start_date'), localDay(ctx, 'b.ends_at').as('end_date')])
    .where('b.state', '<>', 'cancelled')
    .where('e.kind', 'in', ['fermenter', 'tap'])
    .where(spanInPeriod(ctx, 'b.starts_at', 'b.ends_at'))
    .where(chargedMember(ctx, 'b.owner_id'))
    .orderBy('b.starts_at')
    .orderBy('b.id')
    .execute();
}

/** Each check-out of a keg to a member that reaches into the period, with the day of the movement that ended it (if any). */
export async function kegHolds(db: Database, ctx: ChargeContext) {
  const { rows } = await sql<{ id: string; member_id: string; code: string; out_date: string; due_date: string | null; back_date: string | null }>`
    select m.id::text as id, m.member_id, e.code,
      ${localDay(ctx, 'm.at')} as out_date, ${localDay(ctx, 'm.due_at')} as due_date, ${localDay(ctx, 'r.at')} as back_date
    from keg_movement m
    join equipment e on e.id = m.keg_id
    left join lateral (
      select n.at from keg_movement n
      where n.keg_id = m.keg_id and (n.at, n.id) > (m.at, m.id) and n.to_whereabouts <> 'with_member'
      order by n.at, n.id limit 1
    ) r on true
    where m.action = 'checked_out' and m.member_id is not null
      and ${spanInPeriod(ctx, 'm.at', 'r.at')}
      and ${chargedMember(ctx, 'm.member_id')}
    order by m.at, m.id`.execute(db);
  return rows;
}

/**
 * Keg fills of the period with what bills them: the batch's owner and name, the vessel the
 * transfer drew from, the CO2 recorded and the sanitation cycle that readied the keg.
 */
export function periodKegFills(db: Database, ctx: ChargeContext) {
  return db
    .selectFrom('keg_fill as f')
    .innerJoin('batch as b', 'b.id', 'f.batch_id')
    .innerJoin('equipment as k', 'k.id', 'f.keg_id')
    .leftJoin('sanitation_cycle as sc', 'sc.id', 'f.sanitation_cycle_id')
    .select(['f.id', 'f.co2_grams', 'f.sanitation_cycle_id', 'k.code as keg_code', 'b.owner_id', 'b.name as batch_name'])
    .select([localDay(ctx, 'f.filled_at').as('fill_date'), localDay<string | null>(ctx, 'sc.completed_at').as('cycle_date')])
    .select((eb) =>
      eb
        .selectFrom('transfer as t')
        .innerJoin('equipment as fe', 'fe.id', 't.from_equipment_id')
        .select('fe.code')
        .whereRef('t.id', '=', 'f.transfer_id')
        .as('from_code'),
    )
    .where(dayInPeriod(ctx, 'f.filled_at'))
    .where(chargedMember(ctx, 'b.owner_id'))
    .orderBy('f.filled_at')
    .orderBy('f.id')
    .execute();
}

/** Transfers of the period that recorded finings, with the batch's owner and name and the vessel drawn from. */
export function periodFinings(db: Database, ctx: ChargeContext) {
  return db
    .selectFrom('transfer as t')
    .innerJoin('batch as b', 'b.id', 't.batch_id')
    .innerJoin('equipment as fe', 'fe.id', 't.from_equipment_id')
    .select(['t.id', 't.finings_kind', 't.finings_amount', 't.finings_unit', 'b.owner_id', 'b.name as batch_name', 'fe.code as from_code'])
    .select(localDay(ctx, 't.transferred_at').as('day'))
    .where('t.finings_kind', 'is not', null)
    .where(dayInPeriod(ctx, 't.transferred_at'))
    .where(chargedMember(ctx, 'b.owner_id'))
    .orderBy('t.transferred_at')
    .orderBy('t.id')
    .execute();
}

/**
 * Cleaning cycles of fermenters completed in the period that are the first since a booking began
 * (before the next booking starts), with that booking's member.
 */
export async function periodFermenterCleanings(db: Database, ctx: ChargeContext) {
  const { rows } = await sql<{ id: string; code: string; owner_id: string; booking_id: string; day: string }>`
    select sc.id, e.code, bk.owner_id, bk.id as booking_id, ${localDay(ctx, 'sc.completed_at')} as day
    from sanitation_cycle sc
    join equipment e on e.id = sc.equipment_id and e.kind = 'fermenter'
    join lateral (
      select b.id, b.owner_id, b.starts_at from booking b
      where b.equipment_id = sc.equipment_id and b.state <> 'cancelled' and b.starts_at <= sc.started_at
      order by b.starts_at desc limit 1
    ) bk on true
    where sc.outcome in ('ready', 'cleaned')
      and ${dayInPeriod(ctx, 'sc.completed_at')}
      and not exists (
        select 1 from sanitation_cycle sc2
        where sc2.equipment_id = sc.equipment_id and sc2.outcome in ('ready', 'cleaned')
          and sc2.started_at >= bk.starts_at and (sc2.started_at, sc2.id) < (sc.started_at, sc.id)
      )
      and ${chargedMember(ctx, 'bk.owner_id')}
    order by sc.completed_at, sc.id`.execute(db);
  return rows;
}
