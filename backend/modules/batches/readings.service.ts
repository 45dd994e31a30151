import { checkAgainstOriginal, normaliseGravity, originalBrixOf, type BrixMethod, type NormalisedGravity } from '../../../shared/brewing/readings.ts';
import type { Actor } from '../../../shared/permissions/roles.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { FermentationSettings, GravityUnit, ReadingDto, readingListQuerySchema } from '../../../shared/schemas/batches.ts';
import type { z } from 'zod';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound, unprocessable } from '../../lib/http-problem.ts';
import type { BatchRow } from './batches.service.ts';
import { isUuid } from '../../lib/uuid-params.ts';
import { pageOf } from '../../lib/paginate.ts';
import {
  brixReadings,
  deleteReadingRow,
  firstReadingRow,
  insertReadingColumns,
  lockBatchReadings,
  readingAt,
  readingPage,
  readingRow,
  setReadingGravity,
  startFermenting,
  type ReadingRow,
} from './readings.repository.ts';

/** A reading ready to be normalised: what came in, with its time as epoch milliseconds. */
export interface ReadingCandidate {
  time: number;
  value: number;
  unit: GravityUnit;
  temperatureC: number | null;
  correctTemperature: boolean;
  note: string;
  /** How a Brix reading is converted, as the user chose; null: wort for the batch's first reading, alcohol-corrected after. */
  method?: BrixMethod | null;
  /** The user confirms a reading beyond the plausible attenuation. */
  confirm?: boolean;
}

export interface NormalisedCandidate extends ReadingCandidate {
  gravity: NormalisedGravity;
}

export interface FirstReading {
  time: number;
  enteredValue: number;
  enteredUnit: GravityUnit;
  sg: number;
}

/** The batch's earliest stored reading (its OG), if any. */
export async function firstReadingOf(db: Database, batchId: string): Promise<FirstReading | null> {
  const r = await firstReadingRow(db, batchId);
  return r ? { time: r.taken_at.getTime(), enteredValue: Number(r.entered_value), enteredUnit: r.entered_unit, sg: Number(r.gravity_sg) } : null;
}

/**
 * The earliest reading of a batch once `candidates` join it: a stored one, or the earliest
 * candidate (normalised as wort, before fermentation). Brix readings after it are read through
 * alcohol with its original Brix.
 */
export function normaliseAll<T extends ReadingCandidate>(
  candidates: readonly T[],
  existingFirst: FirstReading | null,
  settings: FermentationSettings,
  onError: (candidate: T, message: string) => void,
): (T & { gravity: NormalisedGravity })[] {
  const options = { calibrationC: settings.hydrometerCalibrationC, wortCorrectionFactor: settings.wortCorrectionFactor };
  let earliest: T | null = null;
  for (const c of candidates) if (!earliest || c.time < earliest.time) earliest = c;
  let first: FirstReading | null = existingFirst;
  let firstCandidate: T | null = null;
  if (earliest && (!existingFirst || earliest.time < existingFirst.time)) {
    firstCandidate = earliest;
    try {
      const g = normaliseGravity(earliest.value, earliest.unit, earliest.temperatureC, {
        ...options,
        correctTemperature: earliest.correctTemperature,
        method: earliest.method ?? null,
      });
      first = { time: earliest.time, enteredValue: earliest.value, enteredUnit: earliest.unit, sg: g.sg };
    } catch {
      first = existingFirst;
    }
  }
  const originalBrix = originalBrixOf(first, settings.wortCorrectionFactor);
  const out: (T & { gravity: NormalisedGravity })[] = [];
  for (const c of candidates) {
    try {
      const isFirst = c === firstCandidate;
      const method = c.unit === 'brix' ? (c.method ?? (isFirst ? 'wort' : 'alcohol_corrected')) : null;
      if (method === 'alcohol_corrected' && !isFirst && originalBrix === null) {
        throw new RangeError('A refractometer reading after the first one needs the batch’s original gravity above 1.000');
      }
      const gravity = normaliseGravity(c.value, c.unit, c.temperatureC, {
        ...options,
        correctTemperature: c.correctTemperature,
        originalBrix: isFirst ? null : originalBrix,
        method,
      });
      if (!isFirst && first) {
        const check = checkAgainstOriginal(gravity.sg, first.sg, c.confirm ?? false);
        if (check.refusal) throw new RangeError(check.refusal);
      }
      out.push({ ...c, gravity });
    } catch (err) {
      onError(c, err instanceof Error ? err.message : String(err));
    }
  }
  return out;
}

const CHUNK = 5000;

/** Inserts normalised readings in chunks (one statement per chunk, columns as arrays). */
export async function insertReadings(
  trx: Database,
  batchId: string,
  rows: readonly NormalisedCandidate[],
  source: 'manual' | 'import',
  actorId: string,
  onChunk?: (done: number) => Promise<void>,
): Promise<string[]> {
  const ids: string[] = [];
  for (let i = 0; i < rows.length; i += CHUNK) {
    const chunk = rows.slice(i, i + CHUNK);
    ids.push(
      ...(await insertReadingColumns(
        trx,
        batchId,
        {
          takenAt: chunk.map((r) => new Date(r.time).toISOString()),
          gravitySg: chunk.map((r) => r.gravity.sg),
          enteredValue: chunk.map((r) => r.value),
          enteredUnit: chunk.map((r) => r.unit),
          temperatureC: chunk.map((r) => r.temperatureC),
          corrected: chunk.map((r) => r.gravity.corrected),
          rawSg: chunk.map((r) => r.gravity.rawSg),
          method: chunk.map((r) => r.gravity.method),
          note: chunk.map((r) => r.note),
        },
        source,
        actorId,
      )),
    );
    if (onChunk) await onChunk(Math.min(rows.length, i + CHUNK));
  }
  return ids;
}

/**
 * When new readings come before the batch's old first reading, the original Brix changes: every
 * later Brix reading is normalised again.
 */
export async function renormaliseBrix(trx: Database, batchId: string, settings: FermentationSettings): Promise<number> {
  const first = await firstReadingOf(trx, batchId);
  const brix = await brixReadings(trx, batchId);
  if (!first || brix.length === 0) return 0;
  const originalBrix = originalBrixOf(first, settings.wortCorrectionFactor);
  let changed = 0;
  for (const r of brix) {
    const isFirst = r.taken_at.getTime() === first.time;
    try {
      const g = normaliseGravity(Number(r.entered_value), 'brix', null, {
        wortCorrectionFactor: settings.wortCorrectionFactor,
        originalBrix: isFirst ? null : originalBrix,
        method: r.method,
      });
      if (Math.abs(g.sg - Number(r.gravity_sg)) > 1e-9) {
        await setReadingGravity(trx, r.id, g);
        changed += 1;
      }
    } catch {
      // A Brix reading above the new original stays as it was; the batch page shows it on the chart.
    }
  }
  return changed;
}

/** A planned batch starts fermenting with its first reading. */
export async function startFermentingIfPlanned(trx: Database, batch: BatchRow, actorId: string, now: Date) {
  if (batch.status !== 'planned') return;
  await startFermenting(trx, batch.id, now);
  await audit(trx, actorId, 'status:fermenting', 'Batch', batch.id, { reason: 'first reading' });
}

const MAX_FUTURE_MS = 10 * 60_000;

export async function addReading(
  db: Database,
  batch: BatchRow,
  input: {
    takenAt: string;
    gravity: number;
    unit: GravityUnit;
    temperatureC?: number | null;
    correctTemperature: boolean;
    note: string;
    method?: BrixMethod | null;
    confirm?: boolean;
  },
  settings: FermentationSettings,
  actor: Actor,
  now: Date,
): Promise<ReadingDto> {
  const time = Date.parse(input.takenAt);
  if (time > now.getTime() + MAX_FUTURE_MS) {
    throw unprocessable('The reading is dated in the future.', [{ path: 'takenAt', message: 'The time of the reading is in the future' }]);
  }
  if (batch.status === 'discarded') throw conflict('The batch is discarded; it takes no more readings.');
  const candidate: ReadingCandidate = {
    time,
    value: input.gravity,
    unit: input.unit,
    temperatureC: input.temperatureC ?? null,
    correctTemperature: input.correctTemperature,
    note: input.note,
    method: input.unit === 'brix' ? (input.method ?? null) : null,
    confirm: input.confirm ?? false,
  };
  return db.transaction().execute(async (trx) => {
    await lockBatchReadings(trx, batch.id);
    const dup = await readingAt(trx, batch.id, new Date(time));
    if (dup) throw conflict('This batch already has a reading at that time.', { readingId: dup.id });
    const first = await firstReadingOf(trx, batch.id);
    let problem: string | null = null;
    const [normalised] = normaliseAll([candidate], first, settings, (_c, message) => {
      problem = message;
    });
    if (!normalised) {
      const message = problem ?? 'Not a valid gravity';
      const path = /temperature/i.test(message) ? 'temperatureC' : 'gravity';
      throw unprocessable(message, [{ path, message }]);
    }
    const [id] = await insertReadings(trx, batch.id, [normalised], 'manual', actor.id);
    if (first && time < first.time) await renormaliseBrix(trx, batch.id, settings);
    await startFermentingIfPlanned(trx, batch, actor.id, now);
    await audit(trx, actor.id, 'reading:added', 'Batch', batch.id, {
      readingId: id,
      takenAt: input.takenAt,
      gravity: input.gravity,
      unit: input.unit,
      ...(normalised.gravity.method ? { method: normalised.gravity.method } : {}),
      ...(input.confirm ? { confirmed: true } : {}),
    });
    return readingById(trx, id!);
  });
}

async function readingById(db: Database, id: string): Promise<ReadingDto> {
  return toReadingDto(await readingRow(db, id));
}

function toReadingDto(r: ReadingRow): ReadingDto {
  return {
    id: r.id,
    takenAt: r.taken_at.toISOString(),
    gravitySg: Number(r.gravity_sg),
    enteredValue: Number(r.entered_value),
    enteredUnit: r.entered_unit,
    temperatureC: r.temperature_c === null ? null : Number(r.temperature_c),
    corrected: r.corrected,
    rawSg: r.raw_sg === null ? null : Number(r.raw_sg),
    method: r.method,
    source: r.source,
    note: r.note,
    createdBy: r.created_by,
    createdByName: r.created_by_name ?? null,
    createdAt: r.created_at.toISOString(),
  };
}

export async function listReadings(db: Database, batchId: string, q: z.infer<typeof readingListQuerySchema>): Promise<Page<ReadingDto>> {
  return pageOf(await readingPage(db, batchId, q), toReadingDto, q);
}

export async function deleteReading(db: Database, batch: BatchRow, readingId: string, settings: FermentationSettings, actor: Actor) {
  if (!isUuid(readingId)) throw notFound('Reading');
  await db.transaction().execute(async (trx) => {
    const gone = await deleteReadingRow(trx, batch.id, readingId);
    if (!gone) throw notFound('Reading');
    await renormaliseBrix(trx, batch.id, settings);
    await audit(trx, actor.id, 'reading:deleted', 'Batch', batch.id, {
      readingId,
      takenAt: gone.taken_at.toISOString(),
      gravitySg: Number(gone.gravity_sg),
      entered: `${Number(gone.entered_value)} ${gone.entered_unit}`,
    });
  });
}
