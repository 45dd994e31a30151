import {
  importMappingSchema,
  type FermentationSettings,
  type GravityUnit,
  type ImportMapping,
  type ImportPreview,
  type ImportPreviewRow,
  type ImportRowProblem,
} from '../../../shared/schemas/batches.ts';
import { unprocessable } from '../../lib/http-problem.ts';
import { CellError, cellText, detectDateOrder, parseNumber, parseTakenAt, parseTemperature, parseUnit, proposeMapping } from './import-cells.ts';
import { readTable, type Cell, type FileTable } from './import-file.ts';
import { normaliseAll, type FirstReading, type NormalisedCandidate, type ReadingCandidate } from './readings.service.ts';

/**
 * The part of an import that reads and checks the file: parse it, pick the mapping, read every row
 * through it, find duplicates and normalise the gravities. Pure (no database, no clock of its own):
 * it runs on an import thread (import-pool.ts) with what the service looked up beforehand, and hands
 * back the readings to write as plain columns, so that a large file costs the request thread nothing.
 */

/** Rows shown in a preview, and most problems listed in one answer. */
export const PREVIEW_ROWS = 20;
export const MAX_LISTED_ERRORS = 1000;
const MAX_FUTURE_MS = 10 * 60_000;
const EARLIEST = Date.UTC(2000, 0, 1);
/** Longest text of one cell quoted back in a message or a preview. */
const MAX_QUOTED = 200;
const clip = (s: string, n = MAX_QUOTED * 2) => (s.length > n ? `${s.slice(0, n)}…` : s);

export interface PrepareInput {
  file: { bytes: Uint8Array; originalname: string; mimetype: string; size: number };
  /** The `mapping` form field as sent (JSON text), if any. */
  mappingField?: string;
  /** The member's stored mapping from an earlier import, if any. */
  rememberedMapping?: unknown;
  /** The co-op's time zone. */
  timeZone: string;
  /** The clock's "now" in epoch milliseconds: readings dated after it are refused. */
  now: number;
  /** Times (epoch ms) of the readings the batch already has. */
  existingTimes: number[];
  /** The batch's earliest stored reading. */
  first: FirstReading | null;
  settings: FermentationSettings;
  dryRun: boolean;
}

/** The readings to write, column by column (NaN for a missing number). */
export interface PreparedReadings {
  count: number;
  time: Float64Array;
  value: Float64Array;
  unit: GravityUnit[];
  temperatureC: Float64Array;
  correctTemperature: Uint8Array;
  note: string[];
  sg: Float64Array;
  rawSg: Float64Array;
  corrected: Uint8Array;
  /** Brix method: 0 none (SG, °P), 1 wort, 2 alcohol-corrected. */
  method: Uint8Array;
}

export interface PrepareResult {
  fileType: FileTable['fileType'];
  delimiter: string | null;
  headers: string[];
  mapping: ImportMapping;
  totalRows: number;
  skipped: number;
  /** The first problems, by row, and how many there are in all, in how many rows. */
  errors: ImportRowProblem[];
  errorCount: number;
  errorRows: number;
  readings: PreparedReadings;
  preview?: ImportPreview;
}

export type PrepareProgress = (phase: 'reading' | 'checking', rowsDone: number, rowsTotal: number | null) => void | Promise<void>;

/** The mapping to use: the one sent, else the member's last one if the file has its columns, else a guess from the headers. */
function resolveMapping(req: PrepareInput, headers: string[]): { mapping: ImportMapping; source: ImportPreview['mappingSource']; complete: boolean } {
  if (req.mappingField !== undefined && req.mappingField.trim() !== '') {
    let raw: unknown;
    try {
      raw = JSON.parse(req.mappingField);
    } catch {
      throw unprocessable('The mapping field is not valid JSON.', [{ path: 'mapping', message: 'Send the column mapping as JSON' }]);
    }
    const parsed = importMappingSchema.safeParse(raw);
    if (!parsed.success) {
      const errors = parsed.error.issues.map((i) => ({ path: ['mapping', ...i.path.map(String)].join('.'), message: i.message }));
      throw unprocessable(errors.map((e) => `${e.path}: ${e.message}`).join('; '), errors);
    }
    const mapping = parsed.data;
    const missing = (['takenAt', 'gravity', 'unit', 'temperature', 'note'] as const).filter((k) => mapping[k] && !headers.includes(mapping[k]));
    if (missing.length) {
      const errors = missing.map((k) => ({ path: `mapping.${k}`, message: `The file has no column “${mapping[k]}”`, column: mapping[k]! }));
      throw unprocessable(`The file has no column ${missing.map((k) => `“${mapping[k]}”`).join(', ')}; its columns are ${headers.join(', ')}.`, errors);
    }
    return { mapping: { ...mapping, timeZone: mapping.timeZone ?? req.timeZone }, source: 'given', complete: true };
  }
  if (req.rememberedMapping !== null && req.rememberedMapping !== undefined) {
    const parsed = importMappingSchema.safeParse(req.rememberedMapping);
    if (parsed.success) {
      const m = parsed.data;
      const cols = [m.takenAt, m.gravity, m.unit, m.temperature, m.note].filter((c): c is string => Boolean(c));
      if (cols.every((c) => headers.includes(c))) return { mapping: { ...m, timeZone: m.timeZone ?? req.timeZone }, source: 'remembered', complete: true };
    }
  }
  const guess = proposeMapping(headers);
  const mapping = importMappingSchema.parse({
    takenAt: guess.mapping.takenAt ?? headers[0] ?? 'Column A',
    gravity: guess.mapping.gravity ?? headers[1] ?? headers[0] ?? 'Column B',
    ...guess.mapping,
    timeZone: req.timeZone,
  });
  return { mapping, source: 'proposed', complete: guess.complete };
}

interface CheckedRow {
  row: number;
  cells: Cell[];
  candidate: (ReadingCandidate & { row: number }) | null;
  problems: ImportRowProblem[];
  status: ImportPreviewRow['status'];
  takenAt: number | null;
  gravity: number | null;
  unit: GravityUnit | null;
  temperatureC: number | null;
  note: string;
}

/** Reads every row through the mapping; each problem names its row and column. */
function checkRows(table: FileTable, mapping: ImportMapping, nowDate: Date): CheckedRow[] {
  const idx = (h: string | null | undefined) => (h ? table.headers.indexOf(h) : -1);
  const col = {
    takenAt: idx(mapping.takenAt),
    gravity: idx(mapping.gravity),
    unit: idx(mapping.unit),
    temperature: idx(mapping.temperature),
    note: idx(mapping.note),
  };
  const order = mapping.dateOrder === 'auto' ? detectDateOrder(table.rows.map((r) => r.cells[col.takenAt] ?? null)) : mapping.dateOrder;
  const now = nowDate.getTime();
  const quoteProblems = new Map(table.problems.map((p) => [p.row, p.message]));
  return table.rows.map(({ row, cells }) => {
    const out: CheckedRow = { row, cells, candidate: null, problems: [], status: 'ok', takenAt: null, gravity: null, unit: null, temperatureC: null, note: '' };
    if (cells.every((c) => c === null || (typeof c === 'string' && c.trim() === ''))) {
      out.status = 'blank';
      return out;
    }
    const problem = (field: string, column: string, message: string) => out.problems.push({ row, column, path: field, message: clip(message) });
    const quote = quoteProblems.get(row);
    if (quote) problem('row', '', quote);
    try {
      out.takenAt = parseTakenAt(cells[col.takenAt] ?? null, order, mapping.timeZone ?? 'UTC');
      if (out.takenAt > now + MAX_FUTURE_MS) {
        problem('takenAt', mapping.takenAt, `${cellText(cells[col.takenAt] ?? null)} is in the future`);
        out.takenAt = null;
      } else if (out.takenAt < EARLIEST) {
        problem('takenAt', mapping.takenAt, `${cellText(cells[col.takenAt] ?? null)} is before 2000; check the date column and its order`);
        out.takenAt = null;
      }
    } catch (e) {
      if (!(e instanceof CellError)) throw e;
      problem('takenAt', mapping.takenAt, e.message);
    }
    let unit: GravityUnit = mapping.gravityUnit;
    if (col.unit >= 0) {
      try {
        unit = parseUnit(cellText(cells[col.unit] ?? null)) ?? mapping.gravityUnit;
      } catch (e) {
        if (!(e instanceof CellError)) throw e;
        problem('unit', mapping.unit!, e.message);
      }
    }
    try {
      const n = parseNumber(cells[col.gravity] ?? null);
      if (!n) problem('gravity', mapping.gravity, 'The gravity is missing');
      else {
        if (n.suffix) {
          const suffixUnit = parseUnit(n.suffix);
          if (suffixUnit) unit = suffixUnit;
        }
        out.gravity = n.value;
      }
    } catch (e) {
      if (!(e instanceof CellError)) throw e;
      problem('gravity', mapping.gravity, e.message);
    }
    out.unit = unit;
    if (col.temperature >= 0) {
      try {
        out.temperatureC = parseTemperature(cells[col.temperature] ?? null, mapping.temperatureUnit);
        const hydrometer = unit === 'sg' || unit === 'plato';
        if (hydrometer && mapping.correctTemperature && out.temperatureC !== null && (out.temperatureC < 0 || out.temperatureC > 60)) {
          problem('temperature', mapping.temperature!, `The hydrometer correction needs a sample temperature from 0 to 60 °C; got ${out.temperatureC} °C`);
        }
      } catch (e) {
        if (!(e instanceof CellError)) throw e;
        problem('temperature', mapping.temperature!, e.message);
      }
    }
    if (col.note >= 0) out.note = cellText(cells[col.note] ?? null).slice(0, 500);
    if (out.problems.length === 0 && out.takenAt !== null && out.gravity !== null) {
      out.candidate = {
        row,
        time: out.takenAt,
        value: out.gravity,
        unit,
        temperatureC: out.temperatureC,
        correctTemperature: mapping.correctTemperature,
        note: out.note,
      };
    }
    if (out.problems.length) out.status = 'error';
    return out;
  });
}

/** Reads and checks an uploaded file; throws a 4xx HttpProblem for a file it cannot take. */
export async function prepareImport(req: PrepareInput, progress: PrepareProgress = () => undefined): Promise<PrepareResult> {
  const buffer = Buffer.from(req.file.bytes.buffer, req.file.bytes.byteOffset, req.file.bytes.byteLength);
  const file = { buffer, originalname: req.file.originalname, mimetype: req.file.mimetype, size: req.file.size };
  await progress('reading', 0, null);
  const table = await readTable(file, async (n) => progress('reading', n, null));
  if (table.rows.every((r) => r.cells.every((c) => c === null || (typeof c === 'string' && c.trim() === '')))) {
    throw unprocessable('The file has a header row but no readings.', [
      { path: 'file', message: 'No readings below the header row', row: table.headerRow + 1, column: '' },
    ]);
  }
  const { mapping, source, complete } = resolveMapping(req, table.headers);
  if (!complete && !req.dryRun) {
    throw unprocessable('Could not tell from the headers which columns hold the time and the gravity; send a mapping.', [
      { path: 'mapping', message: `Pick the time and gravity columns among: ${table.headers.join(', ')}` },
    ]);
  }
  await progress('checking', 0, table.rows.length);
  const checked = checkRows(table, mapping, new Date(req.now));

  // Duplicates: within the file, and of readings the batch already has.
  const existing = new Set(req.existingTimes);
  const seen = new Map<number, number>();
  let skipped = 0;
  const accepted: CheckedRow[] = [];
  for (const r of checked) {
    if (r.status === 'blank') {
      skipped += 1;
      continue;
    }
    if (!r.candidate) continue;
    const t = r.candidate.time;
    const firstRow = seen.get(t);
    if (existing.has(t) || firstRow !== undefined) {
      if (mapping.onDuplicate === 'skip') {
        r.status = 'duplicate-skipped';
        r.candidate = null;
        skipped += 1;
        continue;
      }
      r.problems.push({
        row: r.row,
        column: mapping.takenAt,
        path: 'takenAt',
        message: existing.has(t) ? 'Duplicate of a reading the batch already has at this time' : `Duplicate of row ${firstRow} (same time)`,
      });
      r.status = 'error';
      r.candidate = null;
      continue;
    }
    seen.set(t, r.row);
    accepted.push(r);
  }

  // Gravity normalisation needs the batch's first reading (hydrometer correction, Brix through alcohol).
  const byRow = new Map(accepted.map((r) => [r.row, r]));
  const normalised = normaliseAll(
    accepted.map((r) => r.candidate!),
    req.first,
    req.settings,
    (c, message) => {
      const r = byRow.get(c.row)!;
      r.problems.push({ row: r.row, column: mapping.gravity, path: 'gravity', message });
      r.status = 'error';
      r.candidate = null;
    },
  );
  const gravityByRow = new Map(normalised.map((n) => [n.row, n.gravity]));

  let errorCount = 0;
  let errorRows = 0;
  const errors: ImportRowProblem[] = [];
  for (const r of checked) {
    if (r.status === 'error') errorRows += 1;
    errorCount += r.problems.length;
    for (const p of r.problems) if (errors.length < MAX_LISTED_ERRORS) errors.push(p);
  }
  await progress('checking', table.rows.length, table.rows.length);

  const result: PrepareResult = {
    fileType: table.fileType,
    delimiter: table.delimiter,
    headers: table.headers,
    mapping,
    totalRows: table.rows.length,
    skipped,
    errors,
    errorCount,
    errorRows,
    readings: toColumns(req.dryRun || errorCount ? [] : normalised),
  };
  if (req.dryRun) {
    result.preview = {
      fileType: table.fileType,
      delimiter: table.delimiter,
      headers: table.headers,
      mapping,
      mappingSource: source,
      totalRows: table.rows.length,
      validRows: normalised.length,
      rows: checked.slice(0, PREVIEW_ROWS).map((r) => {
        const g = gravityByRow.get(r.row);
        return {
          row: r.row,
          values: Object.fromEntries(table.headers.map((h, i) => [h, clip(cellText(r.cells[i] ?? null))])),
          takenAt: r.takenAt === null ? null : new Date(r.takenAt).toISOString(),
          gravity: r.gravity,
          unit: r.unit,
          gravitySg: g?.sg ?? null,
          temperatureC: r.temperatureC,
          corrected: g?.corrected ?? false,
          note: r.note,
          status: r.status,
          problems: r.problems,
        };
      }),
      errors,
      errorCount,
    };
  }
  return result;
}

function toColumns(rows: readonly NormalisedCandidate[]): PreparedReadings {
  const n = rows.length;
  const out: PreparedReadings = {
    count: n,
    time: new Float64Array(n),
    value: new Float64Array(n),
    unit: new Array<GravityUnit>(n),
    temperatureC: new Float64Array(n),
    correctTemperature: new Uint8Array(n),
    note: new Array<string>(n),
    sg: new Float64Array(n),
    rawSg: new Float64Array(n),
    corrected: new Uint8Array(n),
    method: new Uint8Array(n),
  };
  rows.forEach((r, i) => {
    out.time[i] = r.time;
    out.value[i] = r.value;
    out.unit[i] = r.unit;
    out.temperatureC[i] = r.temperatureC ?? NaN;
    out.correctTemperature[i] = r.correctTemperature ? 1 : 0;
    out.note[i] = r.note;
    out.sg[i] = r.gravity.sg;
    out.rawSg[i] = r.gravity.rawSg ?? NaN;
    out.corrected[i] = r.gravity.corrected ? 1 : 0;
    out.method[i] = r.gravity.method === 'wort' ? 1 : r.gravity.method === 'alcohol_corrected' ? 2 : 0;
  });
  return out;
}

/** The columns back as readings to insert (on the request thread, where the database is). */
export function fromColumns(c: PreparedReadings): NormalisedCandidate[] {
  const out = new Array<NormalisedCandidate>(c.count);
  for (let i = 0; i < c.count; i += 1) {
    out[i] = {
      time: c.time[i]!,
      value: c.value[i]!,
      unit: c.unit[i]!,
      temperatureC: Number.isNaN(c.temperatureC[i]) ? null : c.temperatureC[i]!,
      correctTemperature: c.correctTemperature[i] === 1,
      note: c.note[i]!,
      gravity: {
        sg: c.sg[i]!,
        rawSg: Number.isNaN(c.rawSg[i]) ? null : c.rawSg[i]!,
        corrected: c.corrected[i] === 1,
        correction: null,
        method: c.method[i] === 1 ? 'wort' : c.method[i] === 2 ? 'alcohol_corrected' : null,
      },
    };
  }
  return out;
}
