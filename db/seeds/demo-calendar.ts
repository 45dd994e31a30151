import type { Database } from '../../backend/db/database.ts';
import { getBookingRules } from '../../backend/modules/settings/settings.service.ts';
import { addDays, daysBetween, isValidDate, periodBounds, todayIn } from '../../shared/billing/dates.ts';

/**
 * The demo co-op's calendar. The demo was designed as of one day, DESIGN_TODAY (1 December 2026):
 * three months of cellar history behind it and a month of plans ahead. Seeded on another day it is
 * the same story moved in time:
 *
 * - every instant of the cellar (bookings, batches, readings, cleanings, transfers, kegs, users) moves
 *   by the whole number of days between DESIGN_TODAY and the seed's today (`at`, `date`), so what was
 *   three weeks ago on the design day is three weeks ago on the seed's day, at the same time of day;
 * - the books, which go by calendar month, move by whole months instead (`monthDate`, `period`):
 *   the design's September and October (the two months before last) are billed on the 1st of the
 *   month after each, and November (the last month that has ended) is left for the treasurer to run.
 *
 * With today = DESIGN_TODAY both mappings are the identity, so the demo is exactly the designed one.
 */
export const DESIGN_TODAY = '2026-12-01';
const DAY_MS = 86_400_000;

export interface DemoCalendar {
  /** The seed's today, 'YYYY-MM-DD' in the co-op's time zone. */
  readonly today: string;
  /** Whole days from DESIGN_TODAY to today. */
  readonly shiftDays: number;
  /** Whole calendar months from DESIGN_TODAY's month to today's. */
  readonly shiftMonths: number;
  /** The demo's "now" on its today (08:00 UTC, as designed). */
  readonly now: Date;
  /** A design instant ('2026-11-16T17:00:00Z', or a Date) moved by shiftDays. */
  at(design: string | Date): Date;
  /** A design calendar date ('2026-11-01') moved by shiftDays. */
  date(design: string): string;
  /** A design billing period ('2026-09') moved by shiftMonths. */
  period(design: string): string;
  /**
   * A design date in the books ('2026-10-15') moved by shiftMonths: the same day of the month (the
   * month's last day when it is shorter), in the month as far from today's month as in the design.
   */
  monthDate(design: string): string;
  /** The last day of a design period, moved by shiftMonths. */
  lastDayOf(design: string): string;
}

export function demoCalendar(today: string): DemoCalendar {
  if (!isValidDate(today)) throw new Error(`The demo's today must be a date as YYYY-MM-DD, not "${today}"`);
  const shiftDays = daysBetween(DESIGN_TODAY, today);
  const monthIndex = (d: string) => Number(d.slice(0, 4)) * 12 + Number(d.slice(5, 7)) - 1;
  const shiftMonths = monthIndex(today) - monthIndex(DESIGN_TODAY);
  const period = (design: string) => {
    const i = monthIndex(`${design}-01`) + shiftMonths;
    return `${String(Math.floor(i / 12)).padStart(4, '0')}-${String((i % 12) + 1).padStart(2, '0')}`;
  };
  const at = (design: string | Date) => {
    const t = typeof design === 'string' ? new Date(design).getTime() : design.getTime();
    if (Number.isNaN(t)) throw new Error(`Not a design instant: ${String(design)}`);
    return new Date(t + shiftDays * DAY_MS);
  };
  return {
    today,
    shiftDays,
    shiftMonths,
    now: at(`${DESIGN_TODAY}T08:00:00Z`),
    at,
    date: (design) => addDays(design, shiftDays),
    period,
    monthDate(design) {
      const { first, last } = periodBounds(period(design.slice(0, 7)));
      const day = Number(design.slice(8, 10));
      const wanted = addDays(first, day - 1);
      return wanted > last ? last : wanted;
    },
    lastDayOf: (design) => periodBounds(period(design)).last,
  };
}

/**
 * The day the demo is seeded as of: SEED_TODAY ('YYYY-MM-DD') when set, otherwise the real current
 * date in the co-op's time zone (the booking rules' time zone).
 */
export async function seedToday(db: Database, env: NodeJS.ProcessEnv = process.env, now: Date = new Date()): Promise<string> {
  const fromEnv = env.SEED_TODAY?.trim();
  if (fromEnv) {
    if (!isValidDate(fromEnv)) throw new Error(`SEED_TODAY must be a date as YYYY-MM-DD, not "${fromEnv}"`);
    return fromEnv;
  }
  const { timeZone } = await getBookingRules(db);
  return todayIn(timeZone, now);
}
