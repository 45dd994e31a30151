import { addDays, dateSpan, daysBetween, maxDate, minDate, shortDate } from '../../../../shared/billing/dates.ts';
import { priceItemInfo } from '../../../../shared/schemas/billing.ts';
import { billableBookings } from './charges.repository.ts';
import { chargeSource, dayCharges, plural, spanCharge, type ChargeContext, type SourceResult } from './types.ts';
import { weeksInPeriod } from './weeks.ts';

/**
 * Bookings that are not cancelled. Fermenters are billed per day used: the days run from the
 * booking's start date to its end date in the co-op's time zone (12 → 26 Nov is 14 days; a booking
 * inside one day counts one). A booking across a month boundary is split there, each month billing
 * its own days; within a month the days are split again wherever the price changes.
 * Tap positions are billed per week begun: weeks start on the booking's start date every 7 days,
 * and each week belongs to the month it starts in. Keg and CO2-cylinder bookings are reservations:
 * kegs are billed for the time they are held (check-out to return), not for being reserved.
 */
export const bookingCharges = chargeSource({
  key: 'bookings',
  label: 'Fermenter and tap-position bookings',
  records: billableBookings,
  charge(r, ctx, out) {
    // A booking inside one day still uses the vessel for a day.
    const end = r.end_date > r.start_date ? r.end_date : addDays(r.start_date, 1);
    if (r.kind === 'fermenter') fermenterDays(ctx, r, r.start_date, end, out);
    else tapWeeks(ctx, r, r.start_date, end, out);
  },
});

interface BookingFacts {
  id: string;
  owner_id: string;
  code: string;
  capacity_liters: number | null;
}

function fermenterDays(ctx: ChargeContext, r: BookingFacts, start: string, end: string, out: SourceResult) {
  const from = maxDate(start, ctx.first);
  const to = minDate(end, ctx.next);
  if (daysBetween(from, to) <= 0) return;
  const capacity = r.capacity_liters ?? 0;
  const band = ctx.book.bandFor(capacity);
  if (band === null) {
    out.problems.push(`No fermenter-day price covers ${capacity} L (${r.code}); add a capacity band to the price list.`);
    return;
  }
  const segments = ctx.book.segments('fermenter_day', from, to, band);
  if (!segments) {
    out.problems.push(`No fermenter-day price for fermenters up to ${band} L on ${shortDate(from)} (${r.code}).`);
    return;
  }
  const note = from !== start || to !== end ? ` (booking ${dateSpan(start, end)}, split at month end)` : '';
  out.charges.push(
    ...dayCharges('fermenter_day', segments, (days, s) => ({
      memberId: r.owner_id,
      description: `${priceItemInfo.fermenter_day.label}, fermenter up to ${band} L`,
      sourceType: 'booking',
      sourceId: r.id,
      sourceLabel: `${r.code}, ${dateSpan(s.from, s.to)}, ${plural(days, 'day')}${note}`,
    })),
  );
}

function tapWeeks(ctx: ChargeContext, r: BookingFacts, start: string, end: string, out: SourceResult) {
  const totalWeeks = Math.ceil(daysBetween(start, end) / 7);
  const { weeks, unpriced } = weeksInPeriod(ctx, 'tap_week', start, end);
  if (unpriced) {
    out.problems.push(`No tap-position-week price on ${shortDate(unpriced)} (${r.code}).`);
    return;
  }
  for (const w of weeks) {
    const ofTotal = w.quantity === totalWeeks ? '' : ` of ${totalWeeks} (booking ${dateSpan(start, end)})`;
    out.charges.push(
      spanCharge('tap_week', w.price, w, {
        memberId: r.owner_id,
        sourceType: 'booking',
        sourceId: r.id,
        sourceLabel: `${r.code}, ${dateSpan(w.from, w.to)}, ${plural(w.quantity, 'week')}${ofTotal}`,
      }),
    );
  }
}
