import type { Actor } from '../../../shared/permissions/roles.ts';
import type { FermentationSettings, ImportProgressDto, ImportResult } from '../../../shared/schemas/batches.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { HttpProblem, conflict } from '../../lib/http-problem.ts';
import type { BatchRow } from './batches.service.ts';
import { fromColumns } from './import-check.ts';
import { IMPORT_ZIP_LIMITS, type UploadedFile } from './import-file.ts';
import { importPool, type ImportPool } from './import-pool.ts';
import { inspectZip } from './import-zip.ts';
import {
  deleteImportProgressBefore,
  importProgressRow,
  lockBatchReadings,
  readingTimesMs,
  rememberImportMapping,
  rememberedImportMapping,
  upsertImportProgress,
} from './readings.repository.ts';
import { firstReadingOf, insertReadings, renormaliseBrix, startFermentingIfPlanned } from './readings.service.ts';

export { MAX_LISTED_ERRORS, PREVIEW_ROWS } from './import-check.ts';

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

/**
 * Progress rows live outside the import's transaction so that a poll on any instance sees them; they are
 * stamped with the import's `now` (the clock's). How often they are written is paced by the machine's
 * own elapsed time, a write throttle that no rule reads.
 */
function progressWriter(db: Database, req: ImportRequest): Progress {
  if (!req.progressId) return () => Promise.resolve();
  const id = req.progressId;
  let lastWriteMs = 0;
  return async (phase, rowsDone, rowsTotal, message = '') => {
    const elapsedMs = performance.now();
    // At most a few writes a second, but always the phase changes that end an import.
    if (phase !== 'done' && phase !== 'failed' && elapsedMs - lastWriteMs < 250 && rowsDone !== 0) return;
    lastWriteMs = elapsedMs;
    await upsertImportProgress(db, { id, userId: req.actor.id, batchId: req.batch.id, phase, rowsDone, rowsTotal, message }, req.now);
  };
}

/** Imports readings from a CSV or XLSX upload: all rows or none. A dry run writes no readings. */
export async function importReadings(db: Database, req: ImportRequest, pool: ImportPool = importPool): Promise<ImportResult> {
  const progress = progressWriter(db, req);
  try {
    await progress('reading', 0, null);
    // A workbook's ZIP directory is read here, in microseconds: one with too many entries or too much
    // to unpack is refused without taking an import thread (the thread reads it again, and inflates it).
    const head = req.file.buffer;
    if (head.length >= 4 && head[0] === 0x50 && head[1] === 0x4b) inspectZip(head, IMPORT_ZIP_LIMITS);
    // What the file is checked against, looked up here; the file itself is read on an import thread.
    const [remembered, existing, first] = await Promise.all([
      rememberedImportMapping(db, req.actor.id),
      readingTimesMs(db, req.batch.id),
      firstReadingOf(db, req.batch.id),
    ]);
    const prepared = await pool.run(
      {
        file: { bytes: req.file.buffer, originalname: req.file.originalname, mimetype: req.file.mimetype, size: req.file.size },
        mappingField: req.mappingField,
        rememberedMapping: remembered,
        timeZone: req.timeZone,
        now: req.now.getTime(),
        existingTimes: existing,
        first,
        settings: req.settings,
        dryRun: req.dryRun,
      },
      (phase, done, total) => progress(phase, done, total),
    );
    const { mapping, skipped, totalRows } = prepared;

    if (prepared.preview) {
      await progress('done', totalRows, totalRows, 'preview');
      return { imported: 0, skipped, preview: prepared.preview };
    }

    if (prepared.errorCount) {
      const { errorCount, errorRows } = prepared;
      throw new HttpProblem(
        422,
        'Validation failed',
        `${errorCount} problem${errorCount === 1 ? '' : 's'} in ${errorRows} row${errorRows === 1 ? '' : 's'}; nothing was imported.`,
        prepared.errors,
        'about:blank',
        { errorCount },
      );
    }
    const normalised = fromColumns(prepared.readings);
    if (normalised.length === 0) {
      return { imported: 0, skipped };
    }

    await progress('writing', 0, normalised.length);
    const imported = await db
      .transaction()
      .execute(async (trx) => {
        await lockBatchReadings(trx, req.batch.id);
        const ids = await insertReadings(trx, req.batch.id, normalised, 'import', req.actor.id, (done) => progress('writing', done, normalised.length));
        if (first && normalised.some((n) => n.time < first.time)) await renormaliseBrix(trx, req.batch.id, req.settings);
        await startFermentingIfPlanned(trx, req.batch, req.actor.id, req.now);
        await rememberImportMapping(trx, req.actor.id, mapping, prepared.headers, req.now);
        await audit(trx, req.actor.id, 'readings:imported', 'Batch', req.batch.id, {
          file: req.file.originalname,
          fileType: prepared.fileType,
          imported: ids.length,
          skipped,
          mapping,
        });
        return ids.length;
      })
      .catch((err: { code?: string }) => {
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

/** Forget progress rows older than a day at the clock's `now`. */
export async function pruneImportProgress(db: Database, now: Date) {
  await deleteImportProgressBefore(db, new Date(now.getTime() - 86_400_000));
}

/** How far an import of `userId` into `batchId` has got, or undefined when there is no such import. */
export async function findImportProgress(db: Database, key: { id: string; userId: string; batchId: string }): Promise<ImportProgressDto | undefined> {
  const p = await importProgressRow(db, key);
  if (!p) return undefined;
  return { id: p.id, phase: p.phase, rowsDone: p.rows_done, rowsTotal: p.rows_total, message: p.message, updatedAt: p.updated_at.toISOString() };
}
