import { addDays, dateSpan, daysBetween, maxDate, minDate, shortDate } from '../../../../shared/billing/dates.ts';
import { priceItemInfo } from '../../../../shared/schemas/billing.ts';
import { kegHolds, periodFermenterCleanings, periodFinings, periodKegFills } from './charges.repository.ts';
import { chargeAtPrice, chargeSource, dayCharge, dayCharges, plural, spanCharge, type ChargeContext, type SourceResult } from './types.ts';
import { weeksInPeriod } from './weeks.ts';

/**
 * Kegs held: per week or part week from the day a keg is checked out to a member until the day
 * it comes back. Weeks start on the check-out date every 7 days and each belongs to the month it
 * starts in; a keg still out at the end of the period pays for the weeks begun so far.
 */
export const kegHoldCharges = chargeSource({
  key: 'keg_holds',
  label: 'Kegs checked out to members',
  records: kegHolds,
  charge(h, ctx, out) {
    const end = h.back_date ? (h.back_date > h.out_date ? h.back_date : addDays(h.out_date, 1)) : ctx.next;
    const { weeks, unpriced } = weeksInPeriod(ctx, 'keg_week', h.out_date, end);
    if (unpriced) out.problems.push(`No keg-week price on ${shortDate(unpriced)} (${h.code}).`);
    const span = h.back_date ? `out ${dateSpan(h.out_date, h.back_date)}` : `out since ${shortDate(h.out_date)}`;
    for (const w of weeks) {
      out.charges.push(
        spanCharge('keg_week', w.price, w, {
          memberId: h.member_id,
          sourceType: 'keg_checkout',
          sourceId: h.id,
          sourceLabel: `${h.code}, ${span}, ${plural(w.quantity, 'week')} from ${shortDate(w.from)}`,
        }),
      );
    }
  },
});

/**
 * Late keg returns: per day from the due date until the day the keg comes back (due 10 Nov,
 * back 13 Nov: 3 days). A keg still out is charged to the end of the period, the rest next month.
 */
export const lateKegCharges = chargeSource({
  key: 'late_kegs',
  label: 'Late keg returns',
  records: kegHolds,
  charge(h, ctx, out) {
    const due = h.due_date;
    if (!due) return;
    const from = maxDate(due, ctx.first);
    const to = minDate(h.back_date ?? ctx.next, ctx.next);
    if (daysBetween(from, to) <= 0) return;
    const segments = ctx.book.segments('late_keg_day', from, to);
    if (!segments) {
      out.problems.push(`No late-return price on ${shortDate(from)} (${h.code}).`);
      return;
    }
    const status = h.back_date ? `returned ${shortDate(h.back_date)}` : 'not yet returned';
    out.charges.push(
      ...dayCharges('late_keg_day', segments, (days, s) => ({
        memberId: h.member_id,
        sourceType: 'keg_checkout',
        sourceId: h.id,
        sourceLabel: `${h.code}, due ${shortDate(due)}, ${status}: ${plural(days, 'day')} late (${dateSpan(s.from, addDays(s.to, -1))})`,
      })),
    );
  },
});

/**
 * Kegs filled at transfers, billed to the batch's owner: CO2 for each fill (per kilogram of the
 * CO2 recorded for it when the price list has a per-kg price in effect, otherwise per fill), and
 * the cleaning fee for the sanitation cycle that made the keg ready for that fill.
 */
export const kegFillCharges = chargeSource({
  key: 'keg_fills',
  label: 'Keg fills (CO2, keg cleaning)',
  records: periodKegFills,
  charge(r, ctx, out) {
    const what = `${r.keg_code} filled ${shortDate(r.fill_date)}${r.from_code ? ` from ${r.from_code}` : ''} (${r.batch_name})`;
    const fill = { memberId: r.owner_id, sourceType: 'keg_fill', sourceId: r.id } as const;
    const perKg = ctx.book.priceOn('co2_kg', r.fill_date);
    const perFill = ctx.book.priceOn('co2_fill', r.fill_date);
    const grams = Number(r.co2_grams ?? 0);
    if (perKg && grams > 0) {
      const kg = Math.round(grams) / 1000;
      out.charges.push(dayCharge('co2_kg', perKg, r.fill_date, { ...fill, sourceLabel: `${what}, ${kg} kg`, quantity: kg, unit: 'kg' }));
    } else if (perFill) {
      out.charges.push(dayCharge('co2_fill', perFill, r.fill_date, { ...fill, sourceLabel: what, unit: 'fill' }));
    } else {
      out.problems.push(`No CO2 price (per fill or per kg) on ${shortDate(r.fill_date)} (${r.keg_code}).`);
    }
    if (!r.sanitation_cycle_id) return;
    const day = r.cycle_date ?? r.fill_date;
    const cycle = { id: r.sanitation_cycle_id, day, memberId: r.owner_id, code: r.keg_code, billedOn: r.fill_date };
    cleaningCharge(ctx, out, cycle, `for the fill of ${shortDate(r.fill_date)}`);
  },
});

/** Finings added at a transfer: one dose per transfer that recorded finings, billed to the batch's owner. */
export const finingsCharges = chargeSource({
  key: 'finings',
  label: 'Finings at transfers',
  records: periodFinings,
  charge(r, ctx, out) {
    const amount = r.finings_amount !== null ? ` ${Number(r.finings_amount)} ${r.finings_unit ?? ''}`.trimEnd() : '';
    const label = `Transfer from ${r.from_code} on ${shortDate(r.day)} (${r.batch_name}),${amount}`.replace(/,$/, '');
    chargeAtPrice(ctx, out, { item: 'finings_dose', day: r.day, missing: `No finings price on ${shortDate(r.day)} (${r.from_code}).` }, (price) =>
      dayCharge('finings_dose', price, r.day, {
        memberId: r.owner_id,
        description: `${priceItemInfo.finings_dose.label}: ${r.finings_kind}`,
        sourceType: 'transfer',
        sourceId: r.id,
        sourceLabel: label,
        unit: 'dose',
      }),
    );
  },
});

/**
 * Fermenter cleaning: one cleaning fee per fermenter booking, for the first cleaning cycle
 * recorded on that fermenter from the booking's start on (before the next booking starts),
 * billed to the booking's member in the month the cycle was completed.
 */
export const fermenterCleaningCharges = chargeSource({
  key: 'fermenter_cleaning',
  label: 'Fermenter cleaning after bookings',
  records: periodFermenterCleanings,
  charge: (r, ctx, out) => cleaningCharge(ctx, out, { id: r.id, day: r.day, memberId: r.owner_id, code: r.code, billedOn: r.day }, 'after your booking'),
});

/** The cleaning fee for a sanitation cycle completed on `day`, billed on the day of the use it serves. */
function cleaningCharge(
  ctx: ChargeContext,
  out: SourceResult,
  cycle: { id: string; day: string; memberId: string; code: string; billedOn: string },
  why: string,
) {
  const missing = `No cleaning-fee price on ${shortDate(cycle.day)} (${cycle.code}).`;
  chargeAtPrice(ctx, out, { item: 'cleaning', day: cycle.day, missing }, (price) =>
    dayCharge('cleaning', price, cycle.billedOn, {
      memberId: cycle.memberId,
      sourceType: 'sanitation_cycle',
      sourceId: cycle.id,
      sourceLabel: `${cycle.code}, cleaned and sanitized ${shortDate(cycle.day)} ${why}`,
      unit: 'vessel',
    }),
  );
}
