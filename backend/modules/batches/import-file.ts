import path from 'node:path';
import { Readable } from 'node:stream';
import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import { HttpProblem, badRequest } from '../../lib/http-problem.ts';
import { inspectZip, unreadableXlsx, verifyZip, type ZipLimits } from './import-zip.ts';

/** A cell as it came out of the file: CSV gives text, XLSX also numbers, dates and booleans. */
export type Cell = string | number | boolean | Date | null;

export interface FileTable {
  fileType: 'csv' | 'xlsx';
  delimiter: string | null;
  headers: string[];
  /** Data rows; `row` is the row number a spreadsheet shows (the header is row `headerRow`). */
  rows: { row: number; cells: Cell[] }[];
  headerRow: number;
  /** Quoting problems the CSV parser met, by row. */
  problems: { row: number; message: string }[];
}

export interface UploadedFile {
  buffer: Buffer;
  originalname: string;
  mimetype: string;
  size: number;
}

/**
 * What one import takes. A season of a logger reading every few minutes is tens of thousands of
 * rows; anything beyond these is refused with a 413 problem that names the limit, long before it
 * could hold up the server (DEVELOPERS.md, "Imports").
 */
export const IMPORT_MAX_ROWS = 100_000;
/** Most columns in one row, and most cells (rows × columns) in one file. */
export const IMPORT_MAX_COLUMNS = 100;
export const IMPORT_MAX_CELLS = 1_000_000;
/** An XLSX workbook's ZIP archive: entries, bytes once unpacked, and how far one entry may unpack. */
export const IMPORT_ZIP_LIMITS: ZipLimits = {
  maxEntries: 500,
  maxUncompressedBytes: 128 * 1024 * 1024,
  maxRatio: 200,
  ratioFloorBytes: 1024 * 1024,
};

const unsupported = (detail: string) => new HttpProblem(415, 'Unsupported file', detail);

const isZip = (b: Buffer) => b.length >= 4 && b[0] === 0x50 && b[1] === 0x4b && (b[2] === 0x03 || b[2] === 0x05) && (b[3] === 0x04 || b[3] === 0x06);
const isOle = (b: Buffer) => b.length >= 8 && b.subarray(0, 8).equals(Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]));

const csvExtensions = new Set(['.csv', '.tsv', '.txt', '.tab']);
const xlsxExtensions = new Set(['.xlsx', '.xlsm']);

/** What the name (or, without a telling name, the declared type) says the file is. */
function declaredType(file: UploadedFile): 'csv' | 'xlsx' | 'xls' | null {
  const ext = path.extname(file.originalname || '').toLowerCase();
  if (xlsxExtensions.has(ext)) return 'xlsx';
  if (csvExtensions.has(ext)) return 'csv';
  if (ext === '.xls') return 'xls';
  const mime = (file.mimetype || '').toLowerCase();
  if (mime.includes('spreadsheetml')) return 'xlsx';
  if (mime.startsWith('text/') || mime.includes('csv')) return 'csv';
  return null;
}

/** Reads an uploaded CSV or XLSX into a header and rows; every unreadable file is a 4xx problem. */
export async function readTable(file: UploadedFile, onRows?: (n: number) => Promise<void>): Promise<FileTable> {
  const buf = file.buffer;
  if (!buf || buf.length === 0 || (/^[\s\uFEFF]*$/.test(buf.subarray(0, 4096).toString('utf8')) && buf.length <= 4096)) {
    throw badRequest('The file is empty.');
  }
  const declared = declaredType(file);
  const zip = isZip(buf);
  if (isOle(buf) || declared === 'xls') {
    throw unsupported('This looks like an old Excel .xls workbook; save it as .xlsx or CSV and upload it again.');
  }
  if (declared === 'xlsx' && !zip) {
    throw unsupported(
      `${file.originalname} is named as an XLSX workbook but is not one (an XLSX file is a ZIP archive). Export it again, or upload it as CSV.`,
    );
  }
  if (declared === 'csv' && zip) {
    throw unsupported(`${file.originalname} is named as CSV but holds a ZIP archive (an XLSX workbook?). Upload it with the .xlsx name.`);
  }
  if (zip) return readXlsx(file, onRows);
  return readCsv(file);
}

// ---------------------------------------------------------------------------------------------
// CSV
// ---------------------------------------------------------------------------------------------

function decodeText(file: UploadedFile): string {
  let buf = file.buffer;
  // UTF-16 (a spreadsheet's "Unicode text" export) by its byte-order mark.
  if (buf.length >= 2 && buf[0] === 0xff && buf[1] === 0xfe) return new TextDecoder('utf-16le').decode(buf.subarray(2));
  if (buf.length >= 2 && buf[0] === 0xfe && buf[1] === 0xff) return new TextDecoder('utf-16be').decode(buf.subarray(2));
  if (buf.length >= 3 && buf[0] === 0xef && buf[1] === 0xbb && buf[2] === 0xbf) buf = buf.subarray(3);
  // Binary junk: NUL bytes or many control characters in the first 64 KiB.
  const head = buf.subarray(0, 65_536);
  let control = 0;
  for (const byte of head) {
    if (byte === 0) throw unsupported(`${file.originalname || 'The file'} is not a text file (it contains NUL bytes); upload a CSV or XLSX file.`);
    if (byte < 0x20 && byte !== 0x09 && byte !== 0x0a && byte !== 0x0d) control += 1;
  }
  if (control > head.length * 0.02) throw unsupported(`${file.originalname || 'The file'} is not a text file; upload a CSV or XLSX file.`);
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(buf);
  } catch {
    // Not UTF-8: spreadsheets on some systems save CSV in Windows-1252.
    return new TextDecoder('windows-1252').decode(buf);
  }
}

/** The delimiter of the header line: tab, semicolon or comma, whichever occurs most outside quotes. */
export function detectDelimiter(text: string): string {
  let line = '';
  let inQuotes = false;
  for (const ch of text) {
    if (ch === '"') inQuotes = !inQuotes;
    if (!inQuotes && (ch === '\n' || ch === '\r')) {
      if (line.trim()) break;
      line = '';
      continue;
    }
    line += ch;
  }
  const counts = { '\t': 0, ';': 0, ',': 0 } as Record<string, number>;
  inQuotes = false;
  for (const ch of line) {
    if (ch === '"') inQuotes = !inQuotes;
    else if (!inQuotes && ch in counts) counts[ch]! += 1;
  }
  const best = (['\t', ';', ','] as const).reduce((a, b) => (counts[b]! > counts[a]! ? b : a), '\t' as string);
  return counts[best]! > 0 ? best : ',';
}

function readCsv(file: UploadedFile): FileTable {
  const text = decodeText(file).replace(/^\uFEFF/, '');
  if (!text.trim()) throw badRequest('The file is empty.');
  const delimiter = detectDelimiter(text);
  // Rows are records (a quoted field may span lines); row 1 is the first record. The parser hands
  // over one record at a time, so a file over a limit stops at the first record past it.
  const data: string[][] = [];
  const problems: FileTable['problems'] = [];
  let headerIndex = -1;
  let cells = 0;
  let over: HttpProblem | null = null;
  try {
    Papa.parse<string[]>(text, {
      delimiter,
      skipEmptyLines: false,
      quoteChar: '"',
      escapeChar: '"',
      step: (results, parser) => {
        const r = results.data;
        const row = data.length + 1;
        for (const e of results.errors) if (e.type === 'Quotes') problems.push({ row, message: 'A quoted field is not closed' });
        if (r.length > IMPORT_MAX_COLUMNS) over = tooManyColumns(row);
        else if ((cells += r.length) > IMPORT_MAX_CELLS) over = tooManyCells();
        else if (headerIndex >= 0 && row - 1 - headerIndex > IMPORT_MAX_ROWS + 1) over = tooManyRows();
        if (over) return parser.abort();
        if (headerIndex < 0 && r.some((c) => c.trim() !== '')) headerIndex = data.length;
        data.push(r);
      },
    });
  } catch {
    throw unreadableFile('CSV');
  }
  // eslint-disable-next-line @typescript-eslint/only-throw-error -- set in the parser's callback, which narrowing cannot see
  if (over) throw over;
  if (headerIndex < 0) throw badRequest('The file is empty.');
  const headers = uniqueHeaders(data[headerIndex]!.map((h) => h));
  const rows: FileTable['rows'] = [];
  for (let i = headerIndex + 1; i < data.length; i += 1) {
    const r = data[i]!;
    // Papa's last record of a file ending in a newline is [''].
    if (i === data.length - 1 && r.length === 1 && r[0] === '') break;
    rows.push({ row: i + 1, cells: r });
    if (rows.length > IMPORT_MAX_ROWS) throw tooManyRows();
  }
  headerIndex += 1;
  return { fileType: 'csv', delimiter, headers, rows, headerRow: headerIndex, problems };
}

const tooManyRows = () =>
  new HttpProblem(413, 'Too many rows', `One import takes at most ${IMPORT_MAX_ROWS.toLocaleString('en')} rows of readings; split the file.`);
const tooManyColumns = (row: number) =>
  new HttpProblem(413, 'Too many columns', `Row ${row} has more than ${IMPORT_MAX_COLUMNS} columns, the most one import takes; a readings file needs five.`);
const tooManyCells = () =>
  new HttpProblem(
    413,
    'Too many cells',
    `One import takes at most ${IMPORT_MAX_CELLS.toLocaleString('en')} cells (rows × columns); leave out columns you do not import, or split the file.`,
  );

/** A file the parser could not make sense of; never the parser's own words. */
export const unreadableFile = (kind: 'CSV' | 'XLSX') =>
  kind === 'XLSX'
    ? unreadableXlsx()
    : new HttpProblem(415, 'Unsupported file', 'The file is not a readable CSV file. Export it again as CSV (comma, semicolon or tab separated) or as .xlsx.');

/** Blank headers become "Column C"; repeated ones get " (2)". */
function uniqueHeaders(raw: string[]): string[] {
  const seen = new Map<string, number>();
  return raw.map((h, i) => {
    let name =
      String(h ?? '')
        .replace(/^\uFEFF/, '')
        .trim() || `Column ${columnLetter(i)}`;
    const n = (seen.get(name.toLowerCase()) ?? 0) + 1;
    seen.set(name.toLowerCase(), n);
    if (n > 1) name = `${name} (${n})`;
    return name;
  });
}

export function columnLetter(index: number): string {
  let s = '';
  let n = index + 1;
  while (n > 0) {
    const m = (n - 1) % 26;
    s = String.fromCharCode(65 + m) + s;
    n = Math.floor((n - 1) / 26);
  }
  return s;
}

// ---------------------------------------------------------------------------------------------
// XLSX (exceljs streaming reader: the first worksheet, row by row)
// ---------------------------------------------------------------------------------------------

function cellValue(v: unknown): Cell {
  if (v === null || v === undefined) return null;
  if (typeof v === 'string' || typeof v === 'number' || typeof v === 'boolean') return v;
  if (v instanceof Date) return v;
  if (typeof v === 'object') {
    const o = v as Record<string, unknown>;
    if (Array.isArray(o.richText)) return (o.richText as { text?: string }[]).map((t) => t.text ?? '').join('');
    if ('result' in o) return cellValue(o.result);
    if ('formula' in o || 'sharedFormula' in o) return null;
    if (typeof o.text === 'string') return o.text;
    if (typeof o.error === 'string') return o.error;
    return null;
  }
  return typeof v === 'bigint' ? v.toString() : null;
}

async function readXlsx(file: UploadedFile, onRows?: (n: number) => Promise<void>): Promise<FileTable> {
  // The ZIP's own directory first: too many entries or too much to unpack never reaches the reader;
  // then every entry is unpacked once and checked, so a damaged one never reaches it either.
  verifyZip(file.buffer, inspectZip(file.buffer, IMPORT_ZIP_LIMITS));
  const rows: FileTable['rows'] = [];
  let headers: string[] | null = null;
  let headerRow = 0;
  let cellCount = 0;
  try {
    const reader = new ExcelJS.stream.xlsx.WorkbookReader(Readable.from(file.buffer), {
      worksheets: 'emit',
      sharedStrings: 'cache',
      styles: 'cache',
      hyperlinks: 'ignore',
      entries: 'ignore',
    });
    let sheets = 0;
    for await (const worksheet of reader) {
      sheets += 1;
      if (sheets > 1) {
        // Only the first worksheet holds readings. Later ones are read to their end all the same: the
        // reader may have parked one in a temporary file, and leaving it unread lets the reader delete
        // that file under a stream that still opens it.
        for await (const _row of worksheet as AsyncIterable<ExcelJS.Row>) void _row;
        continue;
      }
      for await (const row of worksheet as AsyncIterable<ExcelJS.Row>) {
        const values = (row.values as unknown[]) ?? [];
        if (values.length - 1 > IMPORT_MAX_COLUMNS) throw tooManyColumns(row.number);
        cellCount += Math.max(0, values.length - 1);
        if (cellCount > IMPORT_MAX_CELLS) throw tooManyCells();
        const cells: Cell[] = [];
        for (let c = 1; c < values.length; c += 1) cells.push(cellValue(values[c]));
        const blank = cells.every((c) => c === null || String(c).trim() === '');
        if (!headers) {
          if (blank) continue;
          headers = uniqueHeaders(cells.map((c) => (c instanceof Date ? c.toISOString() : c === null ? '' : String(c))));
          headerRow = row.number;
          continue;
        }
        // Blank rows count only once a row with values follows them (trailing ones are no readings).
        if (blank) continue;
        if (row.number - headerRow > IMPORT_MAX_ROWS) throw tooManyRows();
        // Rows the sheet skips entirely (no cells) are blank rows too.
        const last = rows.length ? rows[rows.length - 1]!.row : headerRow;
        for (let gap = last + 1; gap < row.number; gap += 1) rows.push({ row: gap, cells: [] });
        rows.push({ row: row.number, cells });
        if (onRows && rows.length % 20_000 === 0) await onRows(rows.length);
      }
    }
  } catch (err) {
    if (err instanceof HttpProblem) throw err;
    throw unreadableFile('XLSX');
  }
  if (!headers) throw badRequest('The workbook’s first sheet is empty.');
  return { fileType: 'xlsx', delimiter: null, headers, rows, headerRow, problems: [] };
}
