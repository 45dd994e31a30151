import { sql } from 'kysely';
import { addDays, dateSpan, daysBetween, maxDate, minDate, shortDate } from '../../../../shared/billing/dates.ts';
import { priceItemInfo } from '../../../../shared/schemas/billing.ts';
import type { Database } from '../../../db/database.ts';
import { pricedCharge, type ChargeContext, type ChargeDraft, type ChargeSource, type SourceResult } from './types.ts';
import { chargedMembers, dayInPeriod, dayOf, localDay } from './window.ts';

const plural = (n: number, one: string) => `${n} ${one}${n === 1 ? '' : 's'}`;

/** Each check-out of a keg to a member, with the movement that ended it (if any). */
async function kegHolds(db: Database, ctx: ChargeContext) {
  let q = db
    .selectFrom('keg_movement as m')
    .innerJoin('equipment as e', 'e.id', 'm.keg_id')
    .leftJoinLateral(
      (eb) =>
        eb
          .selectFrom('keg_movement as n')
          .select(['n.at'])
          .whereRef('n.keg_id', '=', 'm.keg_id')
          .where(sql<boolean>`(n.at, n.id) > (m.at, m.id)`)
          .where('n.to_whereabouts', '<>', 'with_member')
          .orderBy('n.at')
          .orderBy('n.id')
          .limit(1)
          .as('r'),
      (join) => join.onTrue(),
    )
    .select([
      sql<string>`m.id::text`.as('id'),
      'm.member_id',
      'e.code',
      localDay(ctx, 'm.at').as('out_date'),
      localDay<string | null>(ctx, 'm.due_at').as('due_date'),
      localDay<string | null>(ctx, 'r.at').as('back_date'),
    ])
    .where('m.action', '=', 'checked_out')
    .where('m.member_id', 'is not', null)
    .where(sql<boolean>`${dayOf(ctx, 'm.at')} < ${ctx.next}::date`)
    .where(sql<boolean>`(r.at is null or ${dayOf(ctx, 'r.at')} >= ${ctx.first}::date)`)
    .orderBy('m.at')
    .orderBy('m.id');
  if (ctx.memberIds) q = q.where('m.member_id', 'in', chargedMembers(ctx));
  return (await q.execute()) as { id: string; member_id: string; code: string; out_date: string; due_date: string | null; back_date: string | null }[];
}

/**
 * Kegs held: per week or part week from the day a keg is checked out to a member until the day
 * it comes back. Weeks start on the check-out date every 7 days and each belongs to the month it
 * starts in; a keg still out at the end of the period pays for the weeks begun so far.
 */
export const kegHoldCharges: ChargeSource = {
  key: 'keg_holds',
  label: 'Kegs checked out to members',
  async derive(db, ctx): Promise<SourceResult> {
    const charges: ChargeDraft[] = [];
    const problems: string[] = [];
    for (const h of await kegHolds(db, ctx)) {
      const end = h.back_date ? (h.back_date > h.out_date ? h.back_date : addDays(h.out_date, 1)) : ctx.next;
      const groups: { priceId: string; unitCents: number; starts: string[] }[] = [];
      for (let start = h.out_date; start < end && start < ctx.next; start = addDays(start, 7)) {
        if (start < ctx.first) continue;
        const price = ctx.book.priceOn('keg_week', start);
        if (!price) {
          problems.push(`No keg-week price on ${shortDate(start)} (${h.code}).`);
          break;
        }
        const last = groups.at(-1);
        if (last && last.priceId === price.id) last.starts.push(start);
        else groups.push({ priceId: price.id, unitCents: price.unitCents, starts: [start] });
      }
      for (const g of groups) {
        const from = g.starts[0]!;
        const to = minDate(addDays(g.starts.at(-1)!, 7), end);
        const span = h.back_date ? `out ${dateSpan(h.out_date, h.back_date)}` : `out since ${shortDate(h.out_date)}`;
        charges.push(
          pricedCharge(
            'keg_week',
            { id: g.priceId, unitCents: g.unitCents },
            {
              memberId: h.member_id,
              sourceType: 'keg_checkout',
              sourceId: h.id,
              sourceLabel: `${h.code}, ${span}, ${plural(g.starts.length, 'week')} from ${shortDate(from)}`,
              serviceFrom: from,
              serviceTo: addDays(to, -1),
              quantity: g.starts.length,
              unit: 'week',
            },
          ),
        );
      }
    }
    return { charges, problems };
  },
};

/**
 * Late keg returns: per day from the due date until the day the keg comes back (due 10 Nov,
 * back 13 Nov: 3 days). A keg still out is charged to the end of the period, the rest next month.
 */
export const lateKegCharges: ChargeSource = {
  key: 'late_kegs',
  label: 'Late keg returns',
  async derive(db, ctx): Promise<SourceResult> {
    const charges: ChargeDraft[] = [];
    const problems: string[] = [];
    for (const h of await kegHolds(db, ctx)) {
      if (!h.due_date) continue;
      const end = h.back_date ?? ctx.next;
      const from = maxDate(h.due_date, ctx.first);
      const to = minDate(end, ctx.next);
      if (daysBetween(from, to) <= 0) continue;
      const segments = ctx.book.segments('late_keg_day', from, to);
      if (!segments) {
        problems.push(`No late-return price on ${shortDate(from)} (${h.code}).`);
        continue;
      }
      const status = h.back_date ? `returned ${shortDate(h.back_date)}` : 'not yet returned';
      for (const s of segments) {
        const days = daysBetween(s.from, s.to);
        charges.push(
          pricedCharge('late_keg_day', s.price, {
            memberId: h.member_id,
            sourceType: 'keg_checkout',
            sourceId: h.id,
            sourceLabel: `${h.code}, due ${shortDate(h.due_date)}, ${status}: ${plural(days, 'day')} late (${dateSpan(s.from, addDays(s.to, -1))})`,
            serviceFrom: s.from,
            serviceTo: addDays(s.to, -1),
            quantity: days,
            unit: 'day',
          }),
        );
      }
    }
    return { charges, problems };
  },
};

/**
 * Kegs filled at transfers, billed to the batch's owner: CO2 for each fill (per kilogram of the
 * CO2 recorded for it when the price list has a per-kg price in effect, otherwise per fill), and
 * the cleaning fee for the sanitation cycle that made the keg ready for that fill.
 */
export const kegFillCharges: ChargeSource = {
  key: 'keg_fills',
  label: 'Keg fills (CO2, keg cleaning)',
  async derive(db, ctx): Promise<SourceResult> {
    let q = db
      .selectFrom('keg_fill as f')
      .innerJoin('equipment as k', 'k.id', 'f.keg_id')
      .innerJoin('batch as b', 'b.id', 'f.batch_id')
      .leftJoin('transfer as t', 't.id', 'f.transfer_id')
      .leftJoin('equipment as fe', 'fe.id', 't.from_equipment_id')
      .leftJoin('sanitation_cycle as sc', 'sc.id', 'f.sanitation_cycle_id')
      .select([
        'f.id',
        'f.co2_grams',
        'f.sanitation_cycle_id',
        'k.code as keg_code',
        'b.owner_id',
        'b.name as batch_name',
        'fe.code as from_code',
        localDay(ctx, 'f.filled_at').as('fill_date'),
        localDay<string | null>(ctx, 'sc.completed_at').as('cycle_date'),
      ])
      .where(dayInPeriod(ctx, 'f.filled_at'))
      .orderBy('f.filled_at')
      .orderBy('f.id');
    if (ctx.memberIds) q = q.where('b.owner_id', 'in', chargedMembers(ctx));
    const rows = await q.execute();
    const charges: ChargeDraft[] = [];
    const problems: string[] = [];
    for (const r of rows) {
      const what = `${r.keg_code} filled ${shortDate(r.fill_date)}${r.from_code ? ` from ${r.from_code}` : ''} (${r.batch_name})`;
      const perKg = ctx.book.priceOn('co2_kg', r.fill_date);
      const perFill = ctx.book.priceOn('co2_fill', r.fill_date);
      const grams = Number(r.co2_grams ?? 0);
      if (perKg && grams > 0) {
        const kg = Math.round(grams) / 1000;
        charges.push(
          pricedCharge('co2_kg', perKg, {
            memberId: r.owner_id,
            sourceType: 'keg_fill',
            sourceId: r.id,
            sourceLabel: `${what}, ${kg} kg`,
            serviceFrom: r.fill_date,
            serviceTo: r.fill_date,
            quantity: kg,
            unit: 'kg',
          }),
        );
      } else if (perFill) {
        charges.push(
          pricedCharge('co2_fill', perFill, {
            memberId: r.owner_id,
            sourceType: 'keg_fill',
            sourceId: r.id,
            sourceLabel: what,
            serviceFrom: r.fill_date,
            serviceTo: r.fill_date,
            quantity: 1,
            unit: 'fill',
          }),
        );
      } else {
        problems.push(`No CO2 price (per fill or per kg) on ${shortDate(r.fill_date)} (${r.keg_code}).`);
      }
      if (r.sanitation_cycle_id) {
        const day = r.cycle_date ?? r.fill_date;
        const price = ctx.book.priceOn('cleaning', day);
        if (!price) {
          problems.push(`No cleaning-fee price on ${shortDate(day)} (${r.keg_code}).`);
          continue;
        }
        charges.push(
          pricedCharge('cleaning', price, {
            memberId: r.owner_id,
            sourceType: 'sanitation_cycle',
            sourceId: r.sanitation_cycle_id,
            sourceLabel: `${r.keg_code}, cleaned and sanitized ${shortDate(day)} for the fill of ${shortDate(r.fill_date)}`,
            serviceFrom: r.fill_date,
            serviceTo: r.fill_date,
            quantity: 1,
            unit: 'vessel',
          }),
        );
      }
    }
    return { charges, problems };
  },
};

/** Finings added at a transfer: one dose per transfer that recorded finings, billed to the batch's owner. */
export const finingsCharges: ChargeSource = {
  key: 'finings',
  label: 'Finings at transfers',
  async derive(db, ctx): Promise<SourceResult> {
    let q = db
      .selectFrom('transfer as t')
      .innerJoin('batch as b', 'b.id', 't.batch_id')
      .innerJoin('equipment as fe', 'fe.id', 't.from_equipment_id')
      .select([
        't.id',
        't.finings_kind',
        't.finings_amount',
        't.finings_unit',
        'b.owner_id',
        'b.name as batch_name',
        'fe.code as from_code',
        localDay(ctx, 't.transferred_at').as('day'),
      ])
      .where('t.finings_kind', 'is not', null)
      .where(dayInPeriod(ctx, 't.transferred_at'))
      .orderBy('t.transferred_at')
      .orderBy('t.id');
    if (ctx.memberIds) q = q.where('b.owner_id', 'in', chargedMembers(ctx));
    const charges: ChargeDraft[] = [];
    const problems: string[] = [];
    for (const r of await q.execute()) {
      const price = ctx.book.priceOn('finings_dose', r.day);
      if (!price) {
        problems.push(`No finings price on ${shortDate(r.day)} (${r.from_code}).`);
        continue;
      }
      const amount = r.finings_amount !== null ? ` ${Number(r.finings_amount)} ${r.finings_unit ?? ''}`.trimEnd() : '';
      charges.push(
        pricedCharge('finings_dose', price, {
          memberId: r.owner_id,
          description: `${priceItemInfo.finings_dose.label}: ${r.finings_kind}`,
          sourceType: 'transfer',
          sourceId: r.id,
          sourceLabel: `Transfer from ${r.from_code} on ${shortDate(r.day)} (${r.batch_name}),${amount}`.replace(/,$/, ''),
          serviceFrom: r.day,
          serviceTo: r.day,
          quantity: 1,
          unit: 'dose',
        }),
      );
    }
    return { charges, problems };
  },
};

/**
 * Fermenter cleaning: one cleaning fee per fermenter booking, for the first cleaning cycle
 * recorded on that fermenter from the booking's start on (before the next booking starts),
 * billed to the booking's member in the month the cycle was completed.
 */
export const fermenterCleaningCharges: ChargeSource = {
  key: 'fermenter_cleaning',
  label: 'Fermenter cleaning after bookings',
  async derive(db, ctx): Promise<SourceResult> {
    const rows = await sql<{ id: string; code: string; owner_id: string; booking_id: string; day: string }>`
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
        ${ctx.memberIds ? sql`and bk.owner_id in (${sql.join(chargedMembers(ctx))})` : sql``}
      order by sc.completed_at, sc.id`.execute(db);
    const charges: ChargeDraft[] = [];
    const problems: string[] = [];
    for (const r of rows.rows) {
      const price = ctx.book.priceOn('cleaning', r.day);
      if (!price) {
        problems.push(`No cleaning-fee price on ${shortDate(r.day)} (${r.code}).`);
        continue;
      }
      charges.push(
        pricedCharge('cleaning', price, {
          memberId: r.owner_id,
          sourceType: 'sanitation_cycle',
          sourceId: r.id,
          sourceLabel: `${r.code}, cleaned and sanitized ${shortDate(r.day)} after your booking`,
          serviceFrom: r.day,
          serviceTo: r.day,
          quantity: 1,
          unit: 'vessel',
        }),
      );
    }
    return { charges, problems };
  },
};
