import { formatMoney as formatWithLocale } from '../format/index.ts';

/**
 * Money maths for billing. Amounts are integer cents; quantities have at most three decimals;
 * tax rates are basis points (800 = 8.00 %).
 *
 * Rounding rule (the only one): every line is rounded on its own, half-up, where "up" means away
 * from zero so that a credit mirrors its charge exactly: 2.5 → 3, −2.5 → −3, 2.4999 → 2.
 * - line amount = round(quantity × unit price)
 * - line tax    = round(line amount × rate)
 * - invoice tax = the sum of the lines' taxes (never re-rounded on the total)
 * - total       = subtotal + tax
 */

/** n / d rounded half away from zero; n and d integers, d > 0. Exact for |n| < 2^52. */
export function divRoundHalfUp(n: number, d: number): number {
  if (!Number.isInteger(n) || !Number.isInteger(d) || d <= 0) throw new RangeError(`divRoundHalfUp needs integers and d > 0, got ${n}/${d}`);
  const sign = n < 0 ? -1 : 1;
  const a = Math.abs(n);
  const q = Math.floor(a / d);
  const r = a - q * d;
  const rounded = 2 * r >= d ? q + 1 : q;
  return sign * rounded || 0;
}

/** A quantity as integer thousandths (3.25 → 3250); refuses more than three decimals. */
export function toMilli(quantity: number): number {
  const milli = Math.round(quantity * 1000);
  if (Math.abs(milli - quantity * 1000) > 1e-6) throw new RangeError(`a quantity has at most three decimals, got ${quantity}`);
  return milli;
}

export function lineAmountCents(quantity: number, unitCents: number): number {
  return divRoundHalfUp(toMilli(quantity) * unitCents, 1000);
}

export function taxCents(amountCents: number, rateBp: number): number {
  return divRoundHalfUp(amountCents * rateBp, 10_000);
}

/** Splits a tax-inclusive amount into net and tax at one rate: net is rounded half-up, tax is the rest. */
export function splitGross(grossCents: number, rateBp: number): { netCents: number; taxCents: number } {
  const netCents = divRoundHalfUp(grossCents * 10_000, 10_000 + rateBp);
  return { netCents, taxCents: grossCents - netCents };
}

export interface PricedLine {
  quantity: number;
  unitPriceCents: number;
  taxRateBp: number;
}

export interface LineTotals {
  amountCents: number;
  taxCents: number;
}

export function priceLine(line: PricedLine): LineTotals {
  const amountCents = lineAmountCents(line.quantity, line.unitPriceCents);
  return { amountCents, taxCents: taxCents(amountCents, line.taxRateBp) };
}

export function sumLines(lines: LineTotals[]): { subtotalCents: number; taxCents: number; totalCents: number } {
  const subtotalCents = lines.reduce((s, l) => s + l.amountCents, 0);
  const tax = lines.reduce((s, l) => s + l.taxCents, 0);
  return { subtotalCents, taxCents: tax, totalCents: subtotalCents + tax };
}

/** "€1,234.50" style, in the reader's locale (the co-op's by default): the one formatter's. */
export function formatMoney(cents: number, currency: string, locale?: string): string {
  return formatWithLocale(cents, currency, locale ? { locale } : {});
}

/** Cents as a plain decimal string for exports: 123456 → "1234.56", −5 → "-0.05". */
export function centsToDecimal(cents: number): string {
  const sign = cents < 0 ? '-' : '';
  const a = Math.abs(cents);
  return `${sign}${Math.floor(a / 100)}.${String(a % 100).padStart(2, '0')}`;
}

/** A tax rate in basis points as "8 %" or "7.5 %". */
const rateFormat = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 2 });
export function formatRate(rateBp: number): string {
  return `${rateFormat.format(rateBp / 100)} %`;
}
