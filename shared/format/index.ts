import { isValid } from 'date-fns/isValid';
import { parseISO } from 'date-fns/parseISO';
import { abvMethod, celsiusToFahrenheit, kpaToBar, kpaToPsi, litersToUsGallons } from '../brewing/index.ts';
import type { UnitSystem } from '../schemas/user.ts';

/**
 * The one formatter for what people read: screens, e-mails and PDFs. Dates and times are shown in
 * the co-op's time zone (Settings › booking rules), in the reader's locale, in one style
 * (medium date, short time: "3 Dec 2026, 14:00" in en-GB, "Dec 3, 2026, 2:00 PM" in en-US).
 * Quantities come in the API's units (litres, °C, kPa gauge) and are shown in the person's units
 * (metric: L, °C, bar · US: gal, °F, psi) through the conversions of shared/brewing. Money is
 * integer cents with a currency code.
 *
 * A calendar day ('2026-12-03') is a day wherever it is read: it is never shifted by a time zone.
 * A missing or unreadable value is shown as an em dash (or the `empty` text given).
 */
export interface FormatContext {
  /** BCP 47 tag; the runtime's own when not given (screens), `defaultLocale` on the server. */
  locale?: string | undefined;
  /** IANA zone of the co-op; the runtime's own when not given. */
  timeZone?: string | undefined;
  units?: UnitSystem | undefined;
}

/** The locale e-mails and PDFs use (the co-op writes British English). */
export const defaultLocale = 'en-GB';
export const missing = '—';

type DateInput = Date | string | number | null | undefined;
const dayPattern = /^\d{4}-\d{2}-\d{2}$/;
const monthPattern = /^\d{4}-\d{2}$/;

/** A readable instant, or null. Calendar days and months come back as UTC midnights (see `isCalendar`). */
function toDate(value: DateInput): Date | null {
  if (value === null || value === undefined || value === '') return null;
  if (value instanceof Date) return isValid(value) ? value : null;
  if (typeof value === 'number') return Number.isFinite(value) ? new Date(value) : null;
  if (dayPattern.test(value)) return new Date(`${value}T00:00:00Z`);
  if (monthPattern.test(value)) return new Date(`${value}-01T00:00:00Z`);
  const parsed = parseISO(value);
  return isValid(parsed) ? parsed : null;
}

const isCalendar = (value: DateInput) => typeof value === 'string' && (dayPattern.test(value) || monthPattern.test(value));

const formats = new Map<string, Intl.DateTimeFormat>();
function dateTimeFormat(locale: string | undefined, timeZone: string | undefined, options: Intl.DateTimeFormatOptions): Intl.DateTimeFormat {
  const key = `${locale ?? ''}|${timeZone ?? ''}|${JSON.stringify(options)}`;
  let format = formats.get(key);
  if (!format) {
    try {
      format = new Intl.DateTimeFormat(locale, { ...options, ...(timeZone ? { timeZone } : {}) });
    } catch {
      // An unknown zone (or locale) falls back to the runtime's rather than failing a page or a PDF.
      try {
        format = new Intl.DateTimeFormat(locale, options);
      } catch {
        format = new Intl.DateTimeFormat(undefined, options);
      }
    }
    formats.set(key, format);
  }
  return format;
}

function formatWith(value: DateInput, ctx: FormatContext, options: Intl.DateTimeFormatOptions, empty: string): string {
  const date = toDate(value);
  if (!date) return empty;
  return dateTimeFormat(ctx.locale, isCalendar(value) ? 'UTC' : ctx.timeZone, options).format(date);
}

/** "3 Dec 2026": the day in the co-op's time zone. */
export function formatDate(value: DateInput, ctx: FormatContext = {}, empty = missing): string {
  return formatWith(value, ctx, { dateStyle: 'medium' }, empty);
}

/** "3 Dec 2026, 14:00". */
export function formatDateTime(value: DateInput, ctx: FormatContext = {}, empty = missing): string {
  if (isCalendar(value)) return formatDate(value, ctx, empty);
  return formatWith(value, ctx, { dateStyle: 'medium', timeStyle: 'short' }, empty);
}

/** "14:00". */
export function formatTime(value: DateInput, ctx: FormatContext = {}, empty = missing): string {
  return formatWith(value, ctx, { timeStyle: 'short' }, empty);
}

/** "Thu": the day of the week, for booking times in e-mails. */
export function formatWeekday(value: DateInput, ctx: FormatContext = {}, empty = missing): string {
  return formatWith(value, ctx, { weekday: 'short' }, empty);
}

/** "3 Dec": a day without its year, for chart axes and short lists. */
export function formatDayMonth(value: DateInput, ctx: FormatContext = {}, empty = missing): string {
  return formatWith(value, ctx, { day: 'numeric', month: 'short' }, empty);
}

/** "December 2026" (long) or "Dec 26" (short) for a month ('2026-12') or an instant in it. */
export function formatMonth(value: DateInput, ctx: FormatContext = {}, style: 'long' | 'short' = 'long', empty = missing): string {
  return formatWith(value, ctx, style === 'long' ? { month: 'long', year: 'numeric' } : { month: 'short', year: '2-digit' }, empty);
}

const moneyFormats = new Map<string, Intl.NumberFormat | null>();

/** "€1,234.50" in the reader's locale; cents stay exact (the division is the last step). */
export function formatMoney(cents: number | null | undefined, currency: string, ctx: FormatContext = {}, empty = missing): string {
  if (typeof cents !== 'number' || !Number.isFinite(cents)) return empty;
  const locale = ctx.locale ?? defaultLocale;
  const key = `${locale}|${currency}`;
  let format = moneyFormats.get(key);
  if (format === undefined) {
    try {
      format = new Intl.NumberFormat(locale, { style: 'currency', currency, minimumFractionDigits: 2, maximumFractionDigits: 2 });
    } catch {
      format = null;
    }
    moneyFormats.set(key, format);
  }
  if (format) return format.format(cents / 100);
  const a = Math.abs(cents);
  return `${cents < 0 ? '-' : ''}${currency} ${Math.floor(a / 100)}.${String(a % 100).padStart(2, '0')}`;
}

const numberFormats = new Map<string, Intl.NumberFormat>();

/** A plain number with a fixed count of decimals in the reader's locale ("1,234.5"). */
export function formatNumber(value: number | null | undefined, digits: number, ctx: FormatContext = {}, empty = missing): string {
  if (typeof value !== 'number' || !Number.isFinite(value)) return empty;
  const key = `${ctx.locale ?? ''}|${digits}`;
  let format = numberFormats.get(key);
  if (!format) {
    format = new Intl.NumberFormat(ctx.locale, { minimumFractionDigits: digits, maximumFractionDigits: digits });
    numberFormats.set(key, format);
  }
  return format.format(value);
}

export const unitLabels = {
  metric: { volume: 'L', temperature: '°C', pressure: 'bar' },
  us: { volume: 'gal', temperature: '°F', pressure: 'psi' },
} as const satisfies Record<UnitSystem, { volume: string; temperature: string; pressure: string }>;

export interface QuantityOptions {
  /** Decimal places; each quantity has a default per unit system. */
  digits?: number;
}

type Amount = number | null | undefined;
const isAmount = (value: Amount): value is number => typeof value === 'number' && Number.isFinite(value);

/** Litres as "20.0 L" or "5.28 gal". */
export function formatVolume(litres: Amount, ctx: FormatContext = {}, options: QuantityOptions = {}): string {
  if (!isAmount(litres)) return missing;
  const us = ctx.units === 'us';
  return `${formatNumber(us ? litersToUsGallons(litres) : litres, options.digits ?? (us ? 2 : 1), ctx)} ${unitLabels[us ? 'us' : 'metric'].volume}`;
}

/** °C as "12.0 °C" or "53.6 °F". */
export function formatTemperature(celsius: Amount, ctx: FormatContext = {}, options: QuantityOptions = {}): string {
  if (!isAmount(celsius)) return missing;
  const us = ctx.units === 'us';
  return `${formatNumber(us ? celsiusToFahrenheit(celsius) : celsius, options.digits ?? 1, ctx)} ${unitLabels[us ? 'us' : 'metric'].temperature}`;
}

/** kPa gauge as "0.83 bar" or "12.0 psi". */
export function formatPressure(kPa: Amount, ctx: FormatContext = {}, options: QuantityOptions = {}): string {
  if (!isAmount(kPa)) return missing;
  const us = ctx.units === 'us';
  return `${formatNumber(us ? kpaToPsi(kPa) : kpaToBar(kPa), options.digits ?? (us ? 1 : 2), ctx)} ${unitLabels[us ? 'us' : 'metric'].pressure}`;
}

/** Every function above bound to one reader (locale, units) and the co-op's time zone. */
export function createFormatter(ctx: FormatContext) {
  return {
    ctx,
    date: (value: DateInput, empty?: string) => formatDate(value, ctx, empty),
    dateTime: (value: DateInput, empty?: string) => formatDateTime(value, ctx, empty),
    time: (value: DateInput, empty?: string) => formatTime(value, ctx, empty),
    dayMonth: (value: DateInput, empty?: string) => formatDayMonth(value, ctx, empty),
    month: (value: DateInput, style?: 'long' | 'short') => formatMonth(value, ctx, style),
    money: (cents: number | null | undefined, currency: string) => formatMoney(cents, currency, ctx),
    number: (value: number | null | undefined, digits: number) => formatNumber(value, digits, ctx),
    volume: (litres: Amount, options?: QuantityOptions) => formatVolume(litres, ctx, options),
    temperature: (celsius: Amount, options?: QuantityOptions) => formatTemperature(celsius, ctx, options),
    pressure: (kPa: Amount, options?: QuantityOptions) => formatPressure(kPa, ctx, options),
  };
}
export type Formatter = ReturnType<typeof createFormatter>;

/** "5.2 % ABV (ASBC/Balling)": an ABV always names the method it was worked out by. */
export function formatAbv(abv: Amount, ctx: FormatContext = {}, digits = 1): string {
  if (!isAmount(abv)) return missing;
  return `${formatNumber(abv, digits, ctx)} % ABV (${abvMethod.name})`;
}
