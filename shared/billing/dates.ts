import { defaultLocale, formatDate, formatDayMonth } from '../format/index.ts';

/**
 * Calendar dates as 'YYYY-MM-DD' text and billing periods as 'YYYY-MM'. All arithmetic is on the
 * calendar (UTC midnights), so no time zone or daylight-saving shift can move a day.
 */

const DAY_MS = 86_400_000;
const monthNames = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'] as const;

export const periodPattern = /^\d{4}-(0[1-9]|1[0-2])$/;
export const datePattern = /^\d{4}-(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/;

function toUtc(date: string): number {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number];
  return Date.UTC(y, m - 1, d);
}

function fromUtc(ms: number): string {
  return new Date(ms).toISOString().slice(0, 10);
}

export function isValidDate(date: string): boolean {
  return datePattern.test(date) && fromUtc(toUtc(date)) === date;
}

export function addDays(date: string, days: number): string {
  return fromUtc(toUtc(date) + days * DAY_MS);
}

/** Whole days from `from` to `to` (to − from); negative when `to` is earlier. */
export function daysBetween(from: string, to: string): number {
  return Math.round((toUtc(to) - toUtc(from)) / DAY_MS);
}

export const minDate = (a: string, b: string) => (a < b ? a : b);
export const maxDate = (a: string, b: string) => (a > b ? a : b);

/** The first day of a period, its last day and the first day of the next period. */
export function periodBounds(period: string): { first: string; last: string; next: string } {
  const [y, m] = period.split('-').map(Number) as [number, number];
  const first = fromUtc(Date.UTC(y, m - 1, 1));
  const next = fromUtc(Date.UTC(y, m, 1));
  return { first, last: addDays(next, -1), next };
}

export function periodOf(date: string): string {
  return date.slice(0, 7);
}

export function nextPeriod(period: string, step = 1): string {
  const [y, m] = period.split('-').map(Number) as [number, number];
  return fromUtc(Date.UTC(y, m - 1 + step, 1)).slice(0, 7);
}

/** "November 2026". */
export function periodLabel(period: string): string {
  const [y, m] = period.split('-').map(Number) as [number, number];
  return `${monthNames[m - 1]} ${y}`;
}

/** "12 Nov": the one formatter's day and month, in the co-op's language. */
export function shortDate(date: string): string {
  return formatDayMonth(date, { locale: defaultLocale });
}

/** "12 Nov 2026": the one formatter's date, in the co-op's language. */
export function longDate(date: string): string {
  return formatDate(date, { locale: defaultLocale });
}

/** A span of dates for an invoice line: "12–26 Nov", "28 Oct–1 Nov", "3 Nov" (one day). */
export function dateSpan(from: string, to: string): string {
  if (from === to) return shortDate(from);
  if (from.slice(0, 7) === to.slice(0, 7)) return `${Number(from.slice(8))}–${shortDate(to)}`;
  return `${shortDate(from)}–${shortDate(to)}`;
}

/** Today's date in a time zone, as 'YYYY-MM-DD'. */
export function todayIn(timeZone: string, now: Date): string {
  const parts = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).formatToParts(now);
  const get = (t: string) => parts.find((p) => p.type === t)?.value ?? '';
  return `${get('year')}-${get('month')}-${get('day')}`;
}
