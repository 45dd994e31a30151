import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import { centsToDecimal } from '../../shared/billing/money.ts';
import { csvCell, XLSX_DATE_FORMAT, XLSX_DATE_TIME_FORMAT, XLSX_MONTH_FORMAT, xlsxCell, xlsxDate, xlsxMoneyFormat, type ExportCell } from './export-cells.ts';

/**
 * The one writer of every CSV and XLSX download. A table is columns (a header, how to read the value
 * from a row, and the value's type) and rows; every cell goes through export-cells.ts, so text a person
 * typed never runs as a formula and numbers, days and amounts arrive typed:
 * - `text`: text neutralised (a number stays a number);
 * - `number`: a number (shown with `numFmt` in XLSX);
 * - `money`: integer cents, a decimal in the CSV and an amount in the row's currency in XLSX;
 * - `date` / `month`: 'YYYY-MM-DD' / 'YYYY-MM' as is in the CSV, a date cell in XLSX;
 * - `datetime`: a moment (a Date, or wall-clock text 'YYYY-MM-DD HH:MM'), as given in the CSV, a date
 *   cell with a time in XLSX (spreadsheet dates hold wall-clock time; exceljs writes a Date's UTC fields).
 * A `number` or `money` column may hold a number's text ('1.052'), written as typed in the CSV.
 *
 * The CSV neutralises each cell itself rather than through papaparse's `escapeFormulae`: that option
 * also quotes every cell it escapes and knows neither the full-width forms nor text that is a number.
 */

export type ColumnType = 'text' | 'number' | 'money' | 'date' | 'month' | 'datetime';

export interface Column<Row> {
  header: string;
  value: (row: Row) => ExportCell;
  /** `text` unless given. */
  type?: ColumnType;
  /** XLSX: how a number is shown ('0.00'); money takes the row's currency, dates their own format. */
  numFmt?: string;
  /** XLSX column width in characters (default: from the header). */
  width?: number;
}

export interface Table<Row> {
  /** The XLSX worksheet's name. */
  name: string;
  columns: readonly Column<Row>[];
  rows: readonly Row[];
  /** Money columns: the currency code of a row (amounts are shown in it in XLSX). */
  currency?: (row: Row) => string | null;
  /** Rows after the table (a total, a note), cells in column order; `bold` for a total. */
  after?: readonly { cells: ExportCell[]; bold?: boolean }[];
  /** XLSX: how many columns stay in view when scrolling sideways (none unless given). */
  frozenColumns?: number;
  /** XLSX: the header row stays in view when scrolling down (default true). */
  frozenHeader?: boolean;
}

/** One cell of a row as CSV writes it. */
export function csvValue<Row>(column: Column<Row>, row: Row): string | number | boolean {
  const v = column.value(row);
  if (column.type === 'money' && typeof v === 'number') return centsToDecimal(v);
  return csvCell(v);
}

/** A table's header and rows as CSV cells. */
export function csvRows<Row>(table: Pick<Table<Row>, 'columns' | 'rows' | 'after'>): ExportCell[][] {
  return [
    table.columns.map((c) => c.header),
    ...table.rows.map((r) => table.columns.map((c) => csvValue(c, r))),
    // Rows after the table as wide as the table, so every line of the CSV has its columns.
    ...(table.after ?? []).map((a) => (a.cells.length ? [...a.cells, ...Array<ExportCell>(Math.max(0, table.columns.length - a.cells.length)).fill('')] : [])),
  ];
}

/** A CSV file of rows of cells: text neutralised, a byte-order mark (so spreadsheet programs read UTF-8), CRLF line ends. */
export function csvFile(rows: readonly ExportCell[][]): string {
  return `\uFEFF${Papa.unparse(
    rows.map((r) => r.map(csvCell)),
    { newline: '\r\n' },
  )}\r\n`;
}

/** One table as a CSV file. */
export function csvTable<Row>(table: Pick<Table<Row>, 'columns' | 'rows' | 'after'>): string {
  return csvFile(csvRows(table));
}

const defaultFormats: Partial<Record<ColumnType, string>> = {
  money: '#,##0.00',
  date: XLSX_DATE_FORMAT,
  month: XLSX_MONTH_FORMAT,
  datetime: XLSX_DATE_TIME_FORMAT,
};

const WALL_CLOCK = /^\d{4}-\d{2}-\d{2}[ T]\d{2}:\d{2}$/;

function xlsxValue<Row>(column: Column<Row>, row: Row): string | number | boolean | Date | null {
  const v = column.value(row);
  switch (column.type) {
    case 'date':
    case 'month':
      return typeof v === 'string' ? xlsxDate(v) : v instanceof Date ? v : null;
    case 'datetime':
      return typeof v === 'string' && WALL_CLOCK.test(v) ? new Date(`${v.replace(' ', 'T')}:00Z`) : xlsxCell(v);
    case 'number':
    case 'money': {
      const n = typeof v === 'string' && v.trim() !== '' ? Number(v) : v;
      if (typeof n !== 'number' || !Number.isFinite(n)) return xlsxCell(v);
      return column.type === 'money' ? n / 100 : n;
    }
    default:
      return xlsxCell(v);
  }
}

function addSheet<Row>(wb: ExcelJS.Workbook, table: Table<Row>) {
  const frozen = table.frozenHeader === false ? {} : { ySplit: 1 };
  const xSplit = table.frozenColumns ? { xSplit: table.frozenColumns } : {};
  const ws = wb.addWorksheet(table.name, Object.keys({ ...frozen, ...xSplit }).length ? { views: [{ state: 'frozen', ...frozen, ...xSplit }] } : {});
  ws.columns = table.columns.map((c, i) => {
    const numFmt = c.numFmt ?? defaultFormats[c.type ?? 'text'];
    const typed = c.type === 'date' || c.type === 'money';
    return { header: c.header, key: `c${i}`, width: c.width ?? Math.max(typed ? 12 : 10, c.header.length + 2), ...(numFmt ? { style: { numFmt } } : {}) };
  });
  ws.getRow(1).font = { bold: true };
  for (const r of table.rows) {
    const added = ws.addRow(table.columns.map((c) => xlsxValue(c, r)));
    // Amounts are numbers shown in their own currency, row by row.
    const currency = table.currency?.(r);
    if (currency) table.columns.forEach((c, i) => c.type === 'money' && (added.getCell(i + 1).numFmt = xlsxMoneyFormat(currency)));
  }
  for (const a of table.after ?? []) {
    const added = ws.addRow(a.cells.map(xlsxCell));
    if (a.bold) added.font = { bold: true };
  }
}

/** A workbook of one sheet per table (each table with rows of its own kind). */
export async function xlsxFile<Rows extends readonly unknown[]>(tables: { [K in keyof Rows]: Table<Rows[K]> }, title?: string): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  wb.creator = 'Cellarwright';
  if (title) wb.title = title;
  for (const t of tables as unknown as Table<unknown>[]) addSheet(wb, t);
  return Buffer.from(await wb.xlsx.writeBuffer());
}

/** The media types of the two formats, for `res.type()`. */
export const CSV_TYPE = 'text/csv; charset=utf-8';
export const XLSX_TYPE = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet';
