import { sql } from 'kysely';
import { addDays, dateSpan, daysBetween, maxDate, minDate, shortDate } from '../../../../shared/billing/dates.ts';
import { priceItemInfo } from '../../../../shared/schemas/billing.ts';
import { pricedCharge, type ChargeContext, type ChargeDraft, type ChargeSource, type SourceResult } from './types.ts';
import { chargedMembers, dayOf, localDay } from './window.ts';

const plural = (n: number, one: string) => `${n} ${one}${n === 1 ? '' : 's'}`;

/**
 * Bookings that are not cancelled. Fermenters are billed per day used: the days run from the
 * booking's start date to its end date in the co-op's time zone (12 → 26 Nov is 14 days; a booking
 * inside one day counts one). A booking across a month boundary is split there, each month billing
 * its own days; within a month the days are split again wherever the price changes.
 * Tap positions are billed per week begun: weeks start on the booking's start date every 7 days,
 * and each week belongs to the month it starts in. Keg and CO2-cylinder bookings are reservations:
 * kegs are billed for the time they are held (check-out to return), not for being reserved.
 */
export const bookingCharges: ChargeSource = {
  key: 'bookings',
  label: 'Fermenter and tap-position bookings',
  async derive(db, ctx): Promise<SourceResult> {
    let q = db
      .selectFrom('booking as b')
      .innerJoin('equipment as e', 'e.id', 'b.equipment_id')
      .select([
        'b.id',
        'b.owner_id',
        'e.code',
        'e.kind',
        'e.capacity_liters',
        localDay(ctx, 'b.starts_at').as('start_date'),
        localDay(ctx, 'b.ends_at').as('end_date'),
      ])
      .where('b.state', '<>', 'cancelled')
      .where('e.kind', 'in', ['fermenter', 'tap'])
      .where(sql<boolean>`${dayOf(ctx, 'b.starts_at')} < ${ctx.next}::date`)
      .where(sql<boolean>`greatest(${dayOf(ctx, 'b.ends_at')}, ${dayOf(ctx, 'b.starts_at')} + 1) > ${ctx.first}::date`)
      .orderBy('b.starts_at')
      .orderBy('b.id');
    if (ctx.memberIds) q = q.where('b.owner_id', 'in', chargedMembers(ctx));
    const rows = await q.execute();

    const charges: ChargeDraft[] = [];
    const problems: string[] = [];
    for (const r of rows) {
      const start = r.start_date;
      // A booking inside one day still uses the vessel for a day.
      const end = r.end_date > start ? r.end_date : addDays(start, 1);
      if (r.kind === 'fermenter') fermenterDays(ctx, r, start, end, charges, problems);
      else tapWeeks(ctx, r, start, end, charges, problems);
    }
    return { charges, problems };
  },
};

interface BookingFacts {
  id: string;
  owner_id: string;
  code: string;
  capacity_liters: number | null;
}

function fermenterDays(ctx: ChargeContext, r: BookingFacts, start: string, end: string, charges: ChargeDraft[], problems: string[]) {
  const from = maxDate(start, ctx.first);
  const to = minDate(end, ctx.next);
  if (daysBetween(from, to) <= 0) return;
  const capacity = r.capacity_liters ?? 0;
  const band = ctx.book.bandFor(capacity);
  if (band === null) {
    problems.push(`No fermenter-day price covers ${capacity} L (${r.code}); add a capacity band to the price list.`);
    return;
  }
  const segments = ctx.book.segments('fermenter_day', from, to, band);
  if (!segments) {
    problems.push(`No fermenter-day price for fermenters up to ${band} L on ${shortDate(from)} (${r.code}).`);
    return;
  }
  const split = from !== start || to !== end;
  for (const s of segments) {
    const days = daysBetween(s.from, s.to);
    const note = split ? ` (booking ${dateSpan(start, end)}, split at month end)` : '';
    charges.push(
      pricedCharge('fermenter_day', s.price, {
        memberId: r.owner_id,
        description: `${priceItemInfo.fermenter_day.label}, fermenter up to ${band} L`,
        sourceType: 'booking',
        sourceId: r.id,
        sourceLabel: `${r.code}, ${dateSpan(s.from, s.to)}, ${plural(days, 'day')}${note}`,
        serviceFrom: s.from,
        serviceTo: addDays(s.to, -1),
        quantity: days,
        unit: 'day',
      }),
    );
  }
}

function tapWeeks(ctx: ChargeContext, r: BookingFacts, start: string, end: string, charges: ChargeDraft[], problems: string[]) {
  const totalWeeks = Math.ceil(daysBetween(start, end) / 7);
  // Week starts falling in this period, grouped by the price in effect on each.
  const groups: { priceId: string; unitCents: number; starts: string[] }[] = [];
  for (let k = 0; k < totalWeeks; k++) {
    const weekStart = addDays(start, 7 * k);
    if (weekStart < ctx.first || weekStart >= ctx.next) continue;
    const price = ctx.book.priceOn('tap_week', weekStart);
    if (!price) {
      problems.push(`No tap-position-week price on ${shortDate(weekStart)} (${r.code}).`);
      return;
    }
    const last = groups.at(-1);
    if (last && last.priceId === price.id) last.starts.push(weekStart);
    else groups.push({ priceId: price.id, unitCents: price.unitCents, starts: [weekStart] });
  }
  for (const g of groups) {
    const n = g.starts.length;
    const firstStart = g.starts[0]!;
    const lastEnd = minDate(addDays(g.starts.at(-1)!, 7), end);
    const ofTotal = n === totalWeeks ? '' : ` of ${totalWeeks} (booking ${dateSpan(start, end)})`;
    charges.push(
      pricedCharge(
        'tap_week',
        { id: g.priceId, unitCents: g.unitCents },
        {
          memberId: r.owner_id,
          sourceType: 'booking',
          sourceId: r.id,
          sourceLabel: `${r.code}, ${dateSpan(firstStart, lastEnd)}, ${plural(n, 'week')}${ofTotal}`,
          serviceFrom: firstStart,
          serviceTo: addDays(lastEnd, -1),
          quantity: n,
          unit: 'week',
        },
      ),
    );
  }
}
