import { sql } from 'kysely';
import type { readingListQuerySchema } from '../../../shared/schemas/batches.ts';
import type { z } from 'zod';
import type { Database } from '../../db/database.ts';
import { orderByAllowed, paginate } from '../../lib/paginate.ts';

/** One writer of a batch's readings at a time: a transaction-scoped lock on the batch's id. */
export async function lockBatchReadings(trx: Database, batchId: string): Promise<void> {
  await sql`select pg_advisory_xact_lock(hashtext(${batchId}))`.execute(trx);
}

/** The batch's earliest reading, if any. */
export async function firstReadingRow(db: Database, batchId: string) {
  return db
    .selectFrom('reading')
    .select(['taken_at', 'entered_value', 'entered_unit', 'gravity_sg'])
    .where('batch_id', '=', batchId)
    .orderBy('taken_at')
    .limit(1)
    .executeTakeFirst();
}

/** The batch's readings (time and gravity) in time order. */
export function gravityRows(db: Database, batchId: string) {
  return db.selectFrom('reading').select(['taken_at', 'gravity_sg']).where('batch_id', '=', batchId).orderBy('taken_at').execute();
}

/** The batch's reading at exactly this time, if any. */
export async function readingAt(trx: Database, batchId: string, at: Date) {
  return trx.selectFrom('reading').select('id').where('batch_id', '=', batchId).where('taken_at', '=', at).executeTakeFirst();
}

/** Readings to insert, column by column (one statement for them all). */
export interface ReadingColumns {
  takenAt: string[];
  gravitySg: number[];
  enteredValue: number[];
  enteredUnit: string[];
  temperatureC: (number | null)[];
  corrected: boolean[];
  rawSg: (number | null)[];
  method: (string | null)[];
  note: string[];
}

/** Inserts readings of one batch from column arrays; their ids in order. */
export async function insertReadingColumns(trx: Database, batchId: string, c: ReadingColumns, source: 'manual' | 'import', actorId: string): Promise<string[]> {
  const result = await sql<{ id: string }>`
      insert into reading (batch_id, taken_at, gravity_sg, entered_value, entered_unit, temperature_c, corrected, raw_sg, method, source, note, created_by)
      select ${batchId}::uuid, t.taken_at, t.gravity_sg, t.entered_value, t.entered_unit, t.temperature_c, t.corrected, t.raw_sg, t.method, ${source}, t.note, ${actorId}::uuid
      from unnest(
        ${c.takenAt}::timestamptz[],
        ${c.gravitySg}::numeric[],
        ${c.enteredValue}::numeric[],
        ${c.enteredUnit}::text[],
        ${c.temperatureC}::numeric[],
        ${c.corrected}::boolean[],
        ${c.rawSg}::numeric[],
        ${c.method}::text[],
        ${c.note}::text[]
      ) as t(taken_at, gravity_sg, entered_value, entered_unit, temperature_c, corrected, raw_sg, method, note)
      returning id`.execute(trx);
  return result.rows.map((r) => r.id);
}

/** The batch's Brix readings, as entered. */
export async function brixReadings(trx: Database, batchId: string) {
  return trx
    .selectFrom('reading')
    .select(['id', 'taken_at', 'entered_value', 'temperature_c', 'gravity_sg', 'method'])
    .where('batch_id', '=', batchId)
    .where('entered_unit', '=', 'brix')
    .execute();
}

export async function setReadingGravity(trx: Database, id: string, g: { sg: number; rawSg: number | null; corrected: boolean }): Promise<void> {
  await trx.updateTable('reading').set({ gravity_sg: g.sg, raw_sg: g.rawSg, corrected: g.corrected }).where('id', '=', id).execute();
}

/** Moves the batch to fermenting if it is still planned. */
export async function startFermenting(trx: Database, batchId: string, now: Date): Promise<void> {
  await trx.updateTable('batch').set({ status: 'fermenting', updated_at: now }).where('id', '=', batchId).where('status', '=', 'planned').execute();
}

/** Deletes a reading of the batch; what it was, or undefined when there is none. */
export async function deleteReadingRow(trx: Database, batchId: string, readingId: string) {
  return trx
    .deleteFrom('reading')
    .where('id', '=', readingId)
    .where('batch_id', '=', batchId)
    .returning(['id', 'taken_at', 'gravity_sg', 'entered_value', 'entered_unit'])
    .executeTakeFirst();
}

/** Readings with who recorded them. */
function readingBase(db: Database) {
  return db.selectFrom('reading').leftJoin('app_user', 'app_user.id', 'reading.created_by');
}

/** What the API gives of a reading. */
const readingColumns = [
  'reading.id',
  'reading.taken_at',
  'reading.gravity_sg',
  'reading.entered_value',
  'reading.entered_unit',
  'reading.temperature_c',
  'reading.corrected',
  'reading.raw_sg',
  'reading.method',
  'reading.source',
  'reading.note',
  'reading.created_by',
  'app_user.name as created_by_name',
  'reading.created_at',
] as const;

export async function readingRow(db: Database, id: string) {
  return readingBase(db).select(readingColumns).where('reading.id', '=', id).executeTakeFirstOrThrow();
}

export type ReadingRow = Awaited<ReturnType<typeof readingRow>>;

const readingSort = {
  takenAt: 'reading.taken_at',
  gravitySg: 'reading.gravity_sg',
  temperatureC: 'reading.temperature_c',
  createdAt: 'reading.created_at',
} as const;

/** One page of the batch's readings (of one source, when asked). */
export async function readingPage(db: Database, batchId: string, q: z.infer<typeof readingListQuerySchema>) {
  let base = readingBase(db).where('reading.batch_id', '=', batchId);
  if (q.source) base = base.where('reading.source', '=', q.source);
  return paginate(base, (qb) => orderByAllowed(qb.select(readingColumns), readingSort, q, 'reading.id'), q);
}

/** The times (epoch milliseconds) the batch already has readings at. */
export async function readingTimesMs(db: Database, batchId: string): Promise<number[]> {
  const rows = await db
    .selectFrom('reading')
    .select(sql<string>`(extract(epoch from taken_at) * 1000)::bigint`.as('ms'))
    .where('batch_id', '=', batchId)
    .execute();
  return rows.map((r) => Number(r.ms));
}

/** The column mapping a person's last import used, or null. */
export async function rememberedImportMapping(db: Database, userId: string): Promise<unknown> {
  const row = await db.selectFrom('reading_import_mapping').select(['mapping']).where('user_id', '=', userId).executeTakeFirst();
  return row?.mapping ?? null;
}

/** Keeps the column mapping and headers of a person's import for their next one. */
export async function rememberImportMapping(trx: Database, userId: string, mapping: unknown, headers: string[], at: Date): Promise<void> {
  await trx
    .insertInto('reading_import_mapping')
    .values({ user_id: userId, mapping: JSON.stringify(mapping), headers, updated_at: at })
    .onConflict((oc) => oc.column('user_id').doUpdateSet({ mapping: JSON.stringify(mapping), headers, updated_at: at }))
    .execute();
}

export interface ImportProgressRow {
  id: string;
  userId: string;
  batchId: string;
  phase: 'reading' | 'checking' | 'writing' | 'done' | 'failed';
  rowsDone: number;
  rowsTotal: number | null;
  message: string;
}

/** Writes an import's progress row; only its own user's import is updated. */
export async function upsertImportProgress(db: Database, p: ImportProgressRow, at: Date): Promise<void> {
  const { phase, message } = p;
  await db
    .insertInto('reading_import_progress')
    .values({ id: p.id, user_id: p.userId, batch_id: p.batchId, phase, rows_done: p.rowsDone, rows_total: p.rowsTotal, message, updated_at: at })
    .onConflict((oc) =>
      oc
        .column('id')
        .doUpdateSet({ phase, rows_done: p.rowsDone, rows_total: p.rowsTotal, message, updated_at: at })
        .where('reading_import_progress.user_id', '=', p.userId),
    )
    .execute();
}

export async function deleteImportProgressBefore(db: Database, before: Date): Promise<void> {
  await db.deleteFrom('reading_import_progress').where('updated_at', '<', before).execute();
}

/** An import's progress row, only for the user and batch it belongs to. */
export function importProgressRow(db: Database, key: { id: string; userId: string; batchId: string }) {
  return db
    .selectFrom('reading_import_progress')
    .selectAll()
    .where('id', '=', key.id)
    .where('user_id', '=', key.userId)
    .where('batch_id', '=', key.batchId)
    .executeTakeFirst();
}
