import { ForbiddenError } from '@casl/ability';
import { subject, type AppAbility } from '../../../shared/permissions/ability.ts';
import type { Actor } from '../../../shared/permissions/roles.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import {
  nextBatchStatuses,
  type BatchDetail,
  type BatchListItem,
  type BatchListQuery,
  type createBatchSchema,
  type updateBatchSchema,
} from '../../../shared/schemas/batches.ts';
import type { z } from 'zod';
import type { Database } from '../../db/database.ts';
import type { BatchStatus } from '../../db/tables/batches.ts';
import { audit } from '../../lib/audit.ts';
import { canAll } from '../../lib/authz.ts';
import { conflict, notFound, unprocessable } from '../../lib/http-problem.ts';
import { computeFigures, loadFermentationSettings, loadGravitySeries } from './figures.ts';
import { isUuid } from '../../lib/uuid-params.ts';
import { pageOf } from '../../lib/paginate.ts';
import { toBookingSummary } from '../calendar/calendar-feed.repository.ts';
import {
  batchBookingRows,
  batchById,
  batchPage,
  bookingToLink,
  insertBatch,
  isActiveMember,
  ownerName,
  setBookingBatch,
  unlinkBatchBookings,
  updateBatchRow,
} from './batches.repository.ts';

export interface BatchRow {
  id: string;
  owner_id: string;
  name: string;
  style: string;
  volume_liters: number;
  target_og: number | null;
  target_fg: number | null;
  status: BatchStatus;
  packaged_at: Date | null;
  packaged_liters: number | null;
  notes: string;
  allergens: string[];
  shelf_life_days: number | null;
  created_at: Date;
  updated_at: Date;
}

const num = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));

/** A batch the person may see, or 404 (a batch you may not see does not exist for you). */
export async function findVisibleBatch(db: Database, ability: AppAbility, id: string): Promise<BatchRow> {
  if (!isUuid(id)) throw notFound('Batch');
  const row = await batchById(db, id);
  if (!row || !ability.can('read', subject('Batch', { ownerId: row.owner_id }))) throw notFound('Batch');
  return row;
}

export async function listBatches(db: Database, ability: AppAbility, actor: Actor, q: BatchListQuery): Promise<Page<BatchListItem>> {
  // Whoever may read only their own batches sees only those rows.
  const page = await batchPage(db, q, !canAll(ability, 'read', 'Batch') || q.mine ? actor.id : undefined);
  return pageOf(
    page,
    (r) => ({
      ...toListItem(r as unknown as BatchRow, r.owner_name),
      readingsCount: Number(r.readings_count ?? 0),
      og: num(r.og),
      currentGravity: num(r.current_gravity),
      lastReadingAt: r.last_reading_at ? new Date(r.last_reading_at).toISOString() : null,
    }),
    q,
  );
}

function toListItem(r: BatchRow, ownerName: string): BatchListItem {
  return {
    id: r.id,
    name: r.name,
    style: r.style,
    status: r.status,
    volumeLiters: Number(r.volume_liters),
    targetOg: num(r.target_og),
    targetFg: num(r.target_fg),
    ownerId: r.owner_id,
    ownerName,
    readingsCount: 0,
    og: null,
    currentGravity: null,
    lastReadingAt: null,
    createdAt: r.created_at.toISOString(),
  };
}

export async function batchDetail(db: Database, ability: AppAbility, row: BatchRow, now: Date): Promise<BatchDetail> {
  const [owner, settings, series, bookings] = await Promise.all([
    ownerName(db, row.owner_id),
    loadFermentationSettings(db),
    loadGravitySeries(db, row.id),
    batchBookingRows(db, row.id),
  ]);
  const figures = computeFigures(series, row.status, num(row.target_fg), settings, now);
  // subject() marks the object it is given, so each check gets its own.
  const own = () => ({ ownerId: row.owner_id });
  return {
    ...toListItem(row, owner ?? ''),
    notes: row.notes,
    allergens: row.allergens ?? [],
    shelfLifeDays: row.shelf_life_days,
    packagedAt: row.packaged_at?.toISOString() ?? null,
    packagedLiters: num(row.packaged_liters),
    updatedAt: row.updated_at.toISOString(),
    ...figures,
    bookings: bookings.map(toBookingSummary),
    can: {
      update: ability.can('update', subject('Batch', own())),
      addReading: ability.can('create', subject('Reading', own())),
      importReadings: ability.can('import', subject('Reading', own())),
      deleteReading: ability.can('delete', subject('Reading', own())),
    },
    corrections: { hydrometerCalibrationC: settings.hydrometerCalibrationC, wortCorrectionFactor: settings.wortCorrectionFactor },
  };
}

/** Links a fermenter booking of the batch's owner to the batch (only one batch per booking). */
async function linkBooking(trx: Database, batchId: string, ownerId: string, bookingId: string, now: Date) {
  const booking = await bookingToLink(trx, bookingId);
  if (!booking || booking.owner_id !== ownerId) {
    throw unprocessable('No such booking of the batch owner.', [{ path: 'bookingId', message: 'Pick one of the batch owner’s fermenter bookings' }]);
  }
  if (booking.kind !== 'fermenter') {
    throw unprocessable('Only a fermenter booking holds a batch.', [{ path: 'bookingId', message: 'Pick a fermenter booking' }]);
  }
  if (booking.state === 'cancelled') {
    throw unprocessable('That booking is cancelled.', [{ path: 'bookingId', message: 'Pick a booking that is not cancelled' }]);
  }
  if (booking.batch_id && booking.batch_id !== batchId) throw conflict('That booking already holds another batch.');
  await setBookingBatch(trx, bookingId, batchId, now);
}

export async function createBatch(db: Database, ability: AppAbility, input: z.infer<typeof createBatchSchema>, actor: Actor, now: Date): Promise<BatchRow> {
  const ownerId = input.ownerId ?? actor.id;
  // Someone else's batch: the admin only (create on the owner's record).
  if (ownerId !== actor.id) ForbiddenError.from(ability).throwUnlessCan('update', subject('Batch', { ownerId }));
  return db.transaction().execute(async (trx) => {
    if (ownerId !== actor.id) {
      if (!(await isActiveMember(trx, ownerId))) throw unprocessable('No such member.', [{ path: 'ownerId', message: 'Pick an active member' }]);
    }
    const row = await insertBatch(trx, {
      owner_id: ownerId,
      name: input.name,
      style: input.style,
      volume_liters: input.volumeLiters,
      target_og: input.targetOg ?? null,
      target_fg: input.targetFg ?? null,
      notes: input.notes,
      allergens: input.allergens,
      shelf_life_days: input.shelfLifeDays ?? null,
      created_by: actor.id,
      created_at: now,
      updated_at: now,
    });
    const batch = row as unknown as BatchRow;
    if (input.bookingId) await linkBooking(trx, batch.id, ownerId, input.bookingId, now);
    await audit(trx, actor.id, 'created', 'Batch', batch.id, { name: input.name, volumeLiters: input.volumeLiters, bookingId: input.bookingId ?? null });
    return batch;
  });
}

export async function updateBatch(db: Database, batch: BatchRow, input: z.infer<typeof updateBatchSchema>, actor: Actor, now: Date): Promise<BatchRow> {
  if (input.status && input.status !== batch.status && !nextBatchStatuses[batch.status].includes(input.status)) {
    throw conflict(
      `A ${batch.status} batch cannot become ${input.status}` +
        (nextBatchStatuses[batch.status].length ? `; it can become ${nextBatchStatuses[batch.status].join(' or ')}.` : '; it is closed.'),
    );
  }
  const targetOg = input.targetOg !== undefined ? input.targetOg : num(batch.target_og);
  const targetFg = input.targetFg !== undefined ? input.targetFg : num(batch.target_fg);
  if (targetOg != null && targetFg != null && targetFg >= targetOg) {
    throw unprocessable('The target FG must be below the target OG.', [{ path: 'targetFg', message: 'The target FG must be below the target OG' }]);
  }
  const packaging = input.status === 'packaged' && batch.status !== 'packaged';
  return db.transaction().execute(async (trx) => {
    const updated = await updateBatchRow(trx, batch.id, {
      ...(input.name !== undefined ? { name: input.name } : {}),
      ...(input.style !== undefined ? { style: input.style } : {}),
      ...(input.volumeLiters !== undefined ? { volume_liters: input.volumeLiters } : {}),
      ...(input.targetOg !== undefined ? { target_og: input.targetOg ?? null } : {}),
      ...(input.targetFg !== undefined ? { target_fg: input.targetFg ?? null } : {}),
      ...(input.notes !== undefined ? { notes: input.notes } : {}),
      ...(input.allergens !== undefined ? { allergens: input.allergens } : {}),
      ...(input.shelfLifeDays !== undefined ? { shelf_life_days: input.shelfLifeDays ?? null } : {}),
      ...(input.status !== undefined ? { status: input.status } : {}),
      ...(input.packagedLiters !== undefined ? { packaged_liters: input.packagedLiters ?? null } : {}),
      ...(input.packagedAt !== undefined ? { packaged_at: input.packagedAt ?? null } : {}),
      // Packaging without a time given: now.
      ...(packaging && input.packagedAt === undefined && !batch.packaged_at ? { packaged_at: now } : {}),
      // Discarding dumps the beer now (the monthly production report counts it as a loss then).
      ...(input.status === 'discarded' && batch.status !== 'discarded' ? { discarded_at: now } : {}),
      updated_at: now,
    });
    if (input.bookingId === null) {
      await unlinkBatchBookings(trx, batch.id, now);
    } else if (input.bookingId) {
      await linkBooking(trx, batch.id, batch.owner_id, input.bookingId, now);
    }
    await audit(trx, actor.id, input.status && input.status !== batch.status ? `status:${input.status}` : 'updated', 'Batch', batch.id, input);
    return updated;
  });
}
