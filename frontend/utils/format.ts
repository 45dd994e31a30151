import * as shared from '../../shared/format/index.ts';

/**
 * Screens format through the one formatter in shared/format, with the reader's locale (the
 * browser's) and the co-op's time zone (sent with `/api/auth/me`; the browser's until then).
 */
const display: shared.FormatContext = {};

export function setCoopTimeZone(timeZone: string | null | undefined): void {
  display.timeZone = timeZone || undefined;
}

/** The co-op's time zone (the browser's until the session says). */
export const coopTimeZone = (): string => display.timeZone ?? Intl.DateTimeFormat().resolvedOptions().timeZone;

/** The locale and zone screens format with (add the person's units for quantities). */
export const displayContext = (): shared.FormatContext => ({ ...display });

type DateInput = Date | string | number | null | undefined;

export function formatDateTime(value: DateInput, empty = '—'): string {
  return shared.formatDateTime(value, display, empty);
}

export function formatDate(value: DateInput, empty = '—'): string {
  return shared.formatDate(value, display, empty);
}

export function formatTime(value: DateInput, empty = '—'): string {
  return shared.formatTime(value, display, empty);
}

/** "Thu": the day of the week. */
export function formatWeekday(value: DateInput, empty = '—'): string {
  return shared.formatWeekday(value, display, empty);
}

/** "3 Dec": chart axes and short lists. */
export function formatDayMonth(value: DateInput, empty = '—'): string {
  return shared.formatDayMonth(value, display, empty);
}

export function formatMonth(value: DateInput, style: 'long' | 'short' = 'long'): string {
  return shared.formatMonth(value, display, style);
}

/** A count or measure in the reader's locale ("12,345"). */
export function formatCount(value: number): string {
  return shared.formatNumber(value, 0, display);
}

export function formatAbv(value: number | null | undefined, digits = 1): string {
  return shared.formatAbv(value, display, digits);
}

export function formatMoney(cents: number, currency: string): string {
  return shared.formatMoney(cents, currency, { ...display, locale: display.locale ?? browserLocale() });
}

function browserLocale(): string | undefined {
  return typeof navigator !== 'undefined' ? navigator.language || undefined : undefined;
}

export function greetingFor(date: Date = new Date()): string {
  const hour = date.getHours();
  if (hour < 12) return 'Good morning';
  if (hour < 18) return 'Good afternoon';
  return 'Good evening';
}

export function pluralize(count: number, one: string, many = `${one}s`): string {
  return `${count} ${count === 1 ? one : many}`;
}
