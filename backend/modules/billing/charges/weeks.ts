import { addDays, minDate } from '../../../../shared/billing/dates.ts';
import type { ChargeContext } from './types.ts';

/** Weeks begun in the period at one price: from the first week's start up to the last week's end (or the use's end). */
export interface PricedWeeks {
  price: { id: string; unitCents: number };
  from: string;
  to: string;
  quantity: number;
  unit: 'week';
}

/**
 * Use from `start` up to `end` (the day after the last), billed per week begun: weeks start on
 * `start` every 7 days and each belongs to the period it starts in. The period's weeks are grouped
 * by the price in effect on each; `unpriced` is the first week start without a price (the weeks
 * from there on are left out).
 */
export function weeksInPeriod(
  ctx: ChargeContext,
  item: 'keg_week' | 'tap_week',
  start: string,
  end: string,
): { weeks: PricedWeeks[]; unpriced: string | null } {
  const weeks: PricedWeeks[] = [];
  for (let weekStart = start; weekStart < end && weekStart < ctx.next; weekStart = addDays(weekStart, 7)) {
    if (weekStart < ctx.first) continue;
    const price = ctx.book.priceOn(item, weekStart);
    if (!price) return { weeks, unpriced: weekStart };
    const to = minDate(addDays(weekStart, 7), end);
    const last = weeks.at(-1);
    if (last && last.price.id === price.id) Object.assign(last, { to, quantity: last.quantity + 1 });
    else weeks.push({ price: { id: price.id, unitCents: price.unitCents }, from: weekStart, to, quantity: 1, unit: 'week' });
  }
  return { weeks, unpriced: null };
}
