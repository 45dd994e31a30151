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
