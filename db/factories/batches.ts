import type { Selectable } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import type { BatchStatus, BatchTable, GravityUnit, ReadingTable } from '../../backend/db/tables/batches.ts';
import { firstReadingOf, insertReadings, normaliseAll, renormaliseBrix, type ReadingCandidate } from '../../backend/modules/batches/readings.service.ts';
import type { BrixMethod } from '../../shared/brewing/readings.ts';
import { getSetting } from '../../backend/modules/settings/settings.service.ts';
import { type At, HOUR, inTransaction, LONG_AGO, nextSeq, toDate } from './common.ts';
import { createBooking } from './bookings.ts';
import { setEquipmentState } from './equipment.ts';
import { createMember } from './users.ts';

export type BatchRow = Selectable<BatchTable>;
export type ReadingRow = Selectable<ReadingTable>;

export interface ReadingInput {
  takenAt: At;
  value: number;
  /** Default 'sg'. */
  unit?: GravityUnit;
  temperatureC?: number | null;
  /** Hydrometer temperature correction (as the form's tick box); default: only when a temperature is given. */
  correctTemperature?: boolean;
  note?: string;
  source?: 'manual' | 'import';
  /** How a Brix reading is converted; default as the service: wort first, alcohol-corrected after. */
  method?: BrixMethod;
  /** Store a reading beyond the plausible attenuation (as the user's confirmation). */
  confirm?: boolean;
}

export interface BatchOverrides {
  id?: string;
  /** Default: a new member. */
  ownerId?: string;
  name?: string;
  style?: string;
  volumeLiters?: number;
  targetOg?: number | null;
  targetFg?: number | null;
  /** Default: 'fermenting' when it has readings (the first reading starts fermentation), else 'planned'. */
  status?: BatchStatus;
  /** When a discarded batch was discarded (its beer dumped); default: its last reading, else its creation. */
  discardedAt?: At;
  notes?: string;
  /** Allergen notes, stored as the batches service stores them (e.g. ['gluten (barley)']). */
  allergens?: string[];
  /** Overrides the co-op's shelf life for this batch's fills. */
  shelfLifeDays?: number | null;
  /** Default: an hour before the first reading, else LONG_AGO. */
  createdAt?: At;
  /** Stored exactly as the readings service stores them (SG normalised with shared/brewing). */
  readings?: ReadingInput[];
  /**
   * Puts the batch in a fermenter: a booking of it (holding this batch) from `startsAt` to
   * `endsAt`, state derived from `now`, and the fermenter `holding` from `startsAt`.
   */
  fermenter?: { equipmentId: string; startsAt: At; endsAt: At; now?: At };
}

export interface BatchWithReadings extends BatchRow {
  readings: ReadingRow[];
  bookingId: string | null;
}

/** A batch, optionally with gravity readings and a fermenter booking. */
export async function createBatch(db: Database, o: BatchOverrides = {}): Promise<BatchWithReadings> {
  const n = nextSeq();
  const readings = o.readings ?? [];
  const firstTime = readings.length ? Math.min(...readings.map((r) => toDate(r.takenAt, 'takenAt').getTime())) : null;
  const createdAt = toDate(o.createdAt ?? (firstTime !== null ? new Date(firstTime - HOUR) : LONG_AGO), 'createdAt');
  return inTransaction(db, async (trx) => {
    const ownerId = o.ownerId ?? (await createMember(trx)).id;
    const batch = await trx
      .insertInto('batch')
      .values({
        ...(o.id ? { id: o.id } : {}),
        owner_id: ownerId,
        name: o.name ?? `Test batch ${n}`,
        style: o.style ?? 'Pale ale',
        volume_liters: o.volumeLiters ?? 20,
        target_og: o.targetOg ?? null,
        target_fg: o.targetFg ?? null,
        status: o.status ?? (readings.length ? 'fermenting' : 'planned'),
        discarded_at:
          o.status === 'discarded'
            ? toDate(
                o.discardedAt ?? (readings.length ? new Date(Math.max(...readings.map((r) => toDate(r.takenAt, 'takenAt').getTime()))) : createdAt),
                'discardedAt',
              )
            : null,
        notes: o.notes ?? '',
        ...(o.allergens ? { allergens: o.allergens } : {}),
        shelf_life_days: o.shelfLifeDays ?? null,
        created_by: ownerId,
        created_at: createdAt,
        updated_at: createdAt,
      })
      .returningAll()
      .executeTakeFirstOrThrow();
    const rows = readings.length ? await addReadings(trx, batch.id, readings, { actorId: ownerId }) : [];
    let bookingId: string | null = null;
    if (o.fermenter) {
      const booking = await createBooking(trx, {
        equipmentId: o.fermenter.equipmentId,
        ownerId,
        batchId: batch.id,
        startsAt: o.fermenter.startsAt,
        endsAt: o.fermenter.endsAt,
        ...(o.fermenter.now !== undefined ? { now: o.fermenter.now } : {}),
      });
      bookingId = booking.id;
      await setEquipmentState(trx, o.fermenter.equipmentId, 'holding', {
        at: o.fermenter.startsAt,
        reason: `Filled with wort for ${batch.name}; airlock fitted`,
        actorId: ownerId,
      });
    }
    return { ...batch, readings: rows, bookingId };
  });
}

/**
 * Adds gravity readings to a batch the way the readings service does: each value normalised to
 * SG (temperature-corrected, Brix read through alcohol after the first reading), later Brix
 * readings normalised again when an earlier reading arrives.
 */
export async function addReadings(db: Database, batchId: string, readings: ReadingInput[], o: { actorId?: string } = {}): Promise<ReadingRow[]> {
  return inTransaction(db, async (trx) => {
    const settings = (await getSetting(trx, 'fermentation')).value;
    const actorId = o.actorId ?? (await trx.selectFrom('batch').select('owner_id').where('id', '=', batchId).executeTakeFirstOrThrow()).owner_id;
    const first = await firstReadingOf(trx, batchId);
    const candidates: (ReadingCandidate & { source: 'manual' | 'import' })[] = readings.map((r) => ({
      time: toDate(r.takenAt, 'takenAt').getTime(),
      value: r.value,
      unit: r.unit ?? 'sg',
      temperatureC: r.temperatureC ?? null,
      correctTemperature: r.correctTemperature ?? (r.temperatureC !== undefined && r.temperatureC !== null),
      note: r.note ?? '',
      source: r.source ?? 'manual',
      method: r.method ?? null,
      confirm: r.confirm ?? false,
    }));
    const normalised = normaliseAll(candidates, first, settings, (c, message) => {
      throw new Error(`addReadings: ${c.value} ${c.unit} at ${new Date(c.time).toISOString()}: ${message}`);
    });
    const ids: string[] = [];
    for (const source of ['manual', 'import'] as const) {
      const part = normalised.filter((r) => r.source === source);
      if (part.length) ids.push(...(await insertReadings(trx, batchId, part, source, actorId)));
    }
    if (first && candidates.some((c) => c.time < first.time)) await renormaliseBrix(trx, batchId, settings);
    if (ids.length === 0) return [];
    // Entered when taken: no wall-clock time in the rows.
    await trx
      .updateTable('reading')
      .set((eb) => ({ created_at: eb.ref('taken_at') }))
      .where('id', 'in', ids)
      .execute();
    return trx.selectFrom('reading').selectAll().where('id', 'in', ids).orderBy('taken_at').execute();
  });
}
