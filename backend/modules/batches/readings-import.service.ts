import { sql } from 'kysely';
import type { Actor } from '../../../shared/permissions/roles.ts';
import {
  importMappingSchema,
  type FermentationSettings,
  type GravityUnit,
  type ImportMapping,
  type ImportPreview,
  type ImportPreviewRow,
  type ImportResult,
  type ImportRowProblem,
} from '../../../shared/schemas/batches.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { HttpProblem, conflict, unprocessable } from '../../lib/http-problem.ts';
import type { BatchRow } from './batches.service.ts';
import { CellError, cellText, detectDateOrder, parseNumber, parseTakenAt, parseTemperature, parseUnit, proposeMapping } from './import-cells.ts';
import { readTable, type Cell, type FileTable, type UploadedFile } from './import-file.ts';
import { firstReadingOf, insertReadings, normaliseAll, renormaliseBrix, startFermentingIfPlanned, type ReadingCandidate } from './readings.service.ts';

/** Rows shown in a preview, and most problems listed in one answer. */
export const PREVIEW_ROWS = 20;
export const MAX_LISTED_ERRORS = 1000;
const MAX_FUTURE_MS = 10 * 60_000;
const EARLIEST = Date.UTC(2000, 0, 1);

export interface ImportRequest {
  batch: BatchRow;
  file: UploadedFile;
  /** The `mapping` form field as sent (JSON text), if any. */
  mappingField?: string;
  dryRun: boolean;
  progressId?: string;
  actor: Actor;
  settings: FermentationSettings;
  /** The co-op's time zone: times without an offset are read in it unless the mapping names one. */
  timeZone: string;
  /** The clock's "now": readings dated after it are refused. */
  now: Date;
}

type Progress = (phase: 'reading' | 'checking' | 'writing' | 'done' | 'failed', rowsDone: number, rowsTotal: number | null, message?: string) => Promise<void>;

/** Progress rows live outside the import's transaction so that a poll on any instance sees them. */
function progressWriter(db: Database, req: ImportRequest): Progress {
  if (!req.progressId) return async () => undefined;
  const id = req.progressId;
  let last = 0;
  return async (phase, rowsDone, rowsTotal, message = '') => {
    const now = Date.now();
    // At most a few writes a second, but always the phase changes that end an import.
    if (phase !== 'done' && phase !== 'failed' && now - last < 250 && rowsDone !== 0) return;
    last = now;
    await db
      .insertInto('reading_import_progress')
      .values({ id, user_id: req.actor.id, batch_id: req.batch.id, phase, rows_done: rowsDone, rows_total: rowsTotal, message })
      .onConflict((oc) =>
        oc.column('id').doUpdateSet({ phase, rows_done: rowsDone, rows_total: rowsTotal, message, updated_at: new Date() }).where('reading_import_progress.user_id', '=', req.actor.id),
      )
      .execute();
  };
}

/** The mapping to use: the one sent, else the member's last one if the file has its columns, else a guess from the headers. */
async function resolveMapping(
  db: Database,
  req: ImportRequest,
  headers: string[],
): Promise<{ mapping: ImportMapping; source: ImportPreview['mappingSource']; complete: boolean }> {
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
    const missing = (['takenAt', 'gravity', 'unit', 'temperature', 'note'] as const).filter((k) => mapping[k] && !headers.includes(mapping[k]!));
    if (missing.length) {
      const errors = missing.map((k) => ({ path: `mapping.${k}`, message: `The file has no column “${mapping[k]}”`, column: mapping[k]! }));
      throw unprocessable(`The file has no column ${missing.map((k) => `“${mapping[k]}”`).join(', ')}; its columns are ${headers.join(', ')}.`, errors);
    }
    return { mapping: { ...mapping, timeZone: mapping.timeZone ?? req.timeZone }, source: 'given', complete: true };
  }
  const remembered = await db.selectFrom('reading_import_mapping').select(['mapping']).where('user_id', '=', req.actor.id).executeTakeFirst();
  if (remembered) {
    const parsed = importMappingSchema.safeParse(remembered.mapping);
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
  const col = { takenAt: idx(mapping.takenAt), gravity: idx(mapping.gravity), unit: idx(mapping.unit), temperature: idx(mapping.temperature), note: idx(mapping.note) };
  const order = mapping.dateOrder === 'auto' ? detectDateOrder(table.rows.map((r) => r.cells[col.takenAt] ?? null)) : mapping.dateOrder;
  const now = nowDate.getTime();
  const quoteProblems = new Map(table.problems.map((p) => [p.row, p.message]));
  return table.rows.map(({ row, cells }) => {
    const out: CheckedRow = { row, cells, candidate: null, problems: [], status: 'ok', takenAt: null, gravity: null, unit: null, temperatureC: null, note: '' };
    if (cells.every((c) => c === null || (typeof c === 'string' && c.trim() === ''))) {
      out.status = 'blank';
      return out;
    }
    const problem = (field: string, column: string, message: string) => out.problems.push({ row, column, path: field, message });
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

/** Imports readings from a CSV or XLSX upload: all rows or none. A dry run writes no readings. */
export async function importReadings(db: Database, req: ImportRequest): Promise<ImportResult> {
  const progress = progressWriter(db, req);
  try {
    await progress('reading', 0, null);
    const table = await readTable(req.file, (n) => progress('reading', n, null));
    if (table.rows.every((r) => r.cells.every((c) => c === null || (typeof c === 'string' && c.trim() === '')))) {
      throw unprocessable('The file has a header row but no readings.', [{ path: 'file', message: 'No readings below the header row', row: table.headerRow + 1, column: '' }]);
    }
    const { mapping, source, complete } = await resolveMapping(db, req, table.headers);
    if (!complete && !req.dryRun) {
      throw unprocessable('Could not tell from the headers which columns hold the time and the gravity; send a mapping.', [
        { path: 'mapping', message: `Pick the time and gravity columns among: ${table.headers.join(', ')}` },
      ]);
    }
    await progress('checking', 0, table.rows.length);
    const checked = checkRows(table, mapping, req.now);

    // Duplicates: within the file, and of readings the batch already has.
    const existing = new Set(
      (await db.selectFrom('reading').select(sql<string>`(extract(epoch from taken_at) * 1000)::bigint`.as('ms')).where('batch_id', '=', req.batch.id).execute()).map((r) =>
        Number(r.ms),
      ),
    );
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
        if (req.batch && mappingSkipsDuplicates(mapping)) {
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
    const first = await firstReadingOf(db, req.batch.id);
    const byRow = new Map(accepted.map((r) => [r.row, r]));
    const normalised = normaliseAll(
      accepted.map((r) => r.candidate!),
      first,
      req.settings,
      (c, message) => {
        const r = byRow.get(c.row)!;
        r.problems.push({ row: r.row, column: mapping.gravity, path: 'gravity', message });
        r.status = 'error';
        r.candidate = null;
      },
    );
    const gravityByRow = new Map(normalised.map((n) => [n.row, n.gravity]));

    const problems = checked.flatMap((r) => r.problems);
    const errorRows = checked.filter((r) => r.status === 'error').length;
    await progress('checking', table.rows.length, table.rows.length);

    if (req.dryRun) {
      const preview: ImportPreview = {
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
            values: Object.fromEntries(table.headers.map((h, i) => [h, cellText(r.cells[i] ?? null)])),
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
        errors: problems.slice(0, MAX_LISTED_ERRORS),
        errorCount: problems.length,
      };
      await progress('done', table.rows.length, table.rows.length, 'preview');
      return { imported: 0, skipped, preview };
    }

    if (problems.length) {
      throw new HttpProblem(
        422,
        'Validation failed',
        `${problems.length} problem${problems.length === 1 ? '' : 's'} in ${errorRows} row${errorRows === 1 ? '' : 's'}; nothing was imported.`,
        problems.slice(0, MAX_LISTED_ERRORS),
        'about:blank',
        { errorCount: problems.length },
      );
    }
    if (normalised.length === 0) {
      return { imported: 0, skipped };
    }

    await progress('writing', 0, normalised.length);
    const imported = await db.transaction().execute(async (trx) => {
      await sql`select pg_advisory_xact_lock(hashtext(${req.batch.id}))`.execute(trx);
      const ids = await insertReadings(trx, req.batch.id, normalised, 'import', req.actor.id, (done) => progress('writing', done, normalised.length));
      if (first && normalised.some((n) => n.time < first.time)) await renormaliseBrix(trx, req.batch.id, req.settings);
      await startFermentingIfPlanned(trx, req.batch, req.actor.id, req.now);
      await trx
        .insertInto('reading_import_mapping')
        .values({ user_id: req.actor.id, mapping: JSON.stringify(mapping), headers: table.headers })
        .onConflict((oc) => oc.column('user_id').doUpdateSet({ mapping: JSON.stringify(mapping), headers: table.headers, updated_at: new Date() }))
        .execute();
      await audit(trx, req.actor.id, 'readings:imported', 'Batch', req.batch.id, {
        file: req.file.originalname,
        fileType: table.fileType,
        imported: ids.length,
        skipped,
        mapping,
      });
      return ids.length;
    }).catch((err: { code?: string }) => {
      if (err?.code === '23505') throw conflict('A reading at one of these times was added meanwhile; nothing was imported. Try again.');
      throw err;
    });
    await progress('done', imported, imported, `${imported} imported`);
    return { imported, skipped };
  } catch (err) {
    await progress('failed', 0, null, err instanceof Error ? err.message.slice(0, 300) : 'failed').catch(() => undefined);
    throw err;
  }
}

const mappingSkipsDuplicates = (m: ImportMapping) => m.onDuplicate === 'skip';

/** Forget progress rows older than a day. */
export async function pruneImportProgress(db: Database) {
  await db.deleteFrom('reading_import_progress').where('updated_at', '<', new Date(Date.now() - 86_400_000)).execute();
}
