/**
 * Cells of every spreadsheet export (CSV and XLSX) go through here, so text a person typed (a batch
 * name, a member's name, a note, a charge's description) can never run as a formula when the file is
 * opened: text beginning with =, +, -, @ (or their full-width forms), a tab or a carriage return gets
 * a leading apostrophe and is shown as the text it is. Numbers stay numbers, including text that is
 * just a number (-3.5, +1): a number is no formula.
 */

const FORMULA_START = /^[=+\-@\t\r\uFF1D\uFF0B\uFF0D\uFF20]/;
const PLAIN_NUMBER = /^[+-]?(\d+([.,]\d+)?|[.,]\d+)([eE][+-]?\d+)?$/;

/** The text as a spreadsheet should show it: formula-like text prefixed with an apostrophe. */
export function neutralise(value: string): string {
  return FORMULA_START.test(value) && !PLAIN_NUMBER.test(value) ? `'${value}` : value;
}

export type ExportCell = string | number | boolean | Date | null | undefined;

/** One CSV cell: numbers as they are, nothing as empty, text neutralised. */
export function csvCell(value: ExportCell): string | number | boolean {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number' || typeof value === 'boolean') return value;
  if (value instanceof Date) return value.toISOString();
  return neutralise(value);
}

/** One XLSX cell: numbers, dates and booleans as typed cells, text neutralised (never a formula object). */
export function xlsxCell(value: ExportCell): string | number | boolean | Date | null {
  if (value === null || value === undefined) return null;
  if (typeof value === 'string') return neutralise(value);
  return value;
}

/** How XLSX date cells show a day, and a moment (in UTC, as the API gives times). */
export const XLSX_DATE_FORMAT = 'yyyy-mm-dd';
export const XLSX_DATE_TIME_FORMAT = 'yyyy-mm-dd hh:mm';
/** How XLSX date cells show a month (the cell holds its first day). */
export const XLSX_MONTH_FORMAT = 'yyyy-mm';

/**
 * A calendar day ('YYYY-MM-DD') as an XLSX date cell's value: midnight UTC of that day, which the
 * spreadsheet stores as that day's serial number whatever the reader's time zone. A month ('YYYY-MM')
 * is its first day (shown with XLSX_MONTH_FORMAT). Nothing stays empty.
 */
export function xlsxDate(day: string | null | undefined): Date | null {
  if (!day) return null;
  const d = new Date(`${/^\d{4}-\d{2}$/.test(day) ? `${day}-01` : day.slice(0, 10)}T00:00:00Z`);
  if (Number.isNaN(d.getTime())) throw new Error(`xlsxDate: not a day: ${day}`);
  return d;
}

/**
 * The number format of an amount in a currency (cells hold the amount in the currency's unit, 12.5 for
 * 12.50): thousands grouped, two decimals, the currency's symbol in front ("€", "$", "£"; its code where
 * it has no symbol of its own), negatives with a minus.
 */
export function xlsxMoneyFormat(currency: string): string {
  const code = currency.trim().toUpperCase();
  let symbol = code;
  try {
    symbol =
      new Intl.NumberFormat('en', { style: 'currency', currency: code, currencyDisplay: 'narrowSymbol' }).formatToParts(0).find((p) => p.type === 'currency')
        ?.value ?? code;
  } catch {
    // Not a currency code Intl knows: show the code.
  }
  const quoted = `"${symbol.replaceAll('"', '')}${symbol.length > 1 ? ' ' : ''}"`;
  return `${quoted}#,##0.00;-${quoted}#,##0.00`;
}
