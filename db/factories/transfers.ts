import type { Selectable } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import type { KegFillTable, KegWhereabouts, TransferTable } from '../../backend/db/tables/cellar-operations.ts';
import { batchGravityFigures } from '../../backend/modules/batches/figures.ts';
import { fillBestBefore } from '../../backend/modules/batches/shelf-life.ts';
import { sanitationSettings } from '../../backend/modules/sanitation/sanitation.service.ts';
import { writeStateChange } from '../../backend/modules/equipment/vessel-state.ts';
import {
  fillFigures,
  kegFillValues,
  lockBatch,
  lockFermenter,
  markBatchPackaged,
  setBatchPackagedStatus,
  transferFigureValues,
} from '../../backend/modules/transfers/transfers.repository.ts';
import { transferChecklistItems } from '../../shared/schemas/transfers.ts';
import { type At, DAY, HOUR, inTransaction, MINUTE, toDate } from './common.ts';
import { createBatch } from './batches.ts';
import { createFermenter } from './equipment.ts';
import { createSanitationCycle } from './sanitation.ts';

export type TransferRow = Selectable<TransferTable>;
export type KegFillRow = Selectable<KegFillTable>;

export interface TransferOverrides {
  batchId: string;
  /** The fermenter drawn from. */
  fromEquipmentId: string;
  kegIds: string[];
  /** When the beer went into the kegs: the transfer's end (`ended_at` = `transferred_at`). */
  at: At;
  /** When drawing began; default 40 minutes before `at`. `null` records no times (as transfers before times were kept). */
  startedAt?: At | null;
  /** Why it went ahead before the gravity was stable (the factory does not apply the guard). */
  unstableGravityReason?: string | null;
  /** Dissolved oxygen at fill, ppb; and per keg, in the order of kegIds. */
  dissolvedOxygenPpb?: number | null;
  kegDissolvedOxygenPpb?: (number | null)[];
  /** Litres per keg; default: the volume less the loss shared evenly, else 18 L each. */
  kegVolumesLiters?: number[];
  volumeLiters?: number;
  lossLiters?: number;
  recordedBy?: string | null;
  /**
   * Default true: a keg whose latest complete cycle is not fresh at `at` gets one that finished an
   * hour before (as the co-op's rule requires before a fill).
   */
  sanitizeKegs?: boolean;
  /** Where the filled kegs are (a keg_whereabouts row since `at`); default 'cellar'. */
  whereabouts?: Extract<KegWhereabouts, 'cellar' | 'cold_room'>;
  co2Grams?: number;
  finings?: { kind: string; amount: number; unit: 'g' | 'mL' } | null;
  notes?: string;
}

export interface TransferResult {
  transfer: TransferRow;
  fills: KegFillRow[];
}

const round2 = (v: number) => Math.round(v * 100) / 100;

/**
 * A transfer from a fermenter into kegs, written as the transfers service writes it: the transfer
 * row (OG/FG/ABV from the batch's readings), one open fill per keg linked to the cycle that made
 * it ready, each keg `holding`, the fermenter `needs_cleaning`, the batch packaged — all at `at`.
 */
export async function createTransfer(db: Database, o: TransferOverrides): Promise<TransferResult> {
  if (o.kegIds.length === 0) throw new Error('createTransfer: no kegs');
  const at = toDate(o.at, 'at');
  const startedAt = o.startedAt === null ? null : o.startedAt !== undefined ? toDate(o.startedAt, 'startedAt') : new Date(at.getTime() - 40 * MINUTE);
  return inTransaction(db, async (trx) => {
    const settings = await sanitationSettings(trx);
    const batch = await lockBatch(trx, o.batchId);
    const fermenter = await lockFermenter(trx, o.fromEquipmentId);
    if (!batch || !fermenter) throw new Error(`createTransfer: no batch ${o.batchId} or no fermenter ${o.fromEquipmentId}`);
    const kegs = [];
    for (const id of o.kegIds) {
      if (o.sanitizeKegs !== false) {
        const fresh = await trx
          .selectFrom('sanitation_cycle')
          .select('id')
          .where('equipment_id', '=', id)
          .where('complete', '=', true)
          .where('completed_at', '<=', at)
          .where('fresh_until', '>', at)
          .executeTakeFirst();
        if (!fresh) await createSanitationCycle(trx, { equipmentId: id, readyAt: new Date(at.getTime() - HOUR), recordedBy: o.recordedBy ?? null });
      }
      const keg = await trx
        .selectFrom('equipment as e')
        .select((eb) => [
          'e.id',
          'e.code',
          'e.state',
          eb
            .selectFrom('sanitation_cycle as c')
            .select('c.id')
            .whereRef('c.equipment_id', '=', 'e.id')
            .where('c.completed_at', '<=', at)
            .orderBy('c.completed_at', 'desc')
            .limit(1)
            .as('cycle_id'),
        ])
        .where('e.id', '=', id)
        .where('e.kind', '=', 'keg')
        .forUpdate('e')
        .executeTakeFirstOrThrow();
      kegs.push(keg);
    }

    let perKeg: number[];
    let loss: number;
    if (o.kegVolumesLiters) {
      perKeg = o.kegVolumesLiters.map(round2);
      loss = round2(o.lossLiters ?? (o.volumeLiters !== undefined ? o.volumeLiters - perKeg.reduce((s, v) => s + v, 0) : 0));
    } else if (o.volumeLiters !== undefined) {
      loss = round2(o.lossLiters ?? 0);
      const each = Math.floor(((o.volumeLiters - loss) / kegs.length) * 100) / 100;
      perKeg = kegs.map((_, i) => (i === kegs.length - 1 ? round2(o.volumeLiters! - loss - each * (kegs.length - 1)) : each));
    } else {
      perKeg = kegs.map(() => 18);
      loss = round2(o.lossLiters ?? 0);
    }
    const packaged = round2(perKeg.reduce((s, v) => s + v, 0));

    await setBatchPackagedStatus(trx, batch.id, at);
    const figures = fillFigures(await batchGravityFigures(trx, batch.id, at));
    const method = (fermenter.attributes as { hasValve?: boolean }).hasValve === false ? 'siphon' : 'bottom_valve';
    const checklist: Record<string, unknown> = { drawMethod: method };
    for (const item of transferChecklistItems) if (!item.method || item.method === method) checklist[item.key] = true;
    checklist.unconfirmed = [];
    const co2 = o.co2Grams ?? settings.co2GramsPerKegFill * kegs.length;

    const transfer = await trx
      .insertInto('transfer')
      .values({
        batch_id: batch.id,
        from_equipment_id: fermenter.id,
        volume_liters: round2(packaged + loss),
        packaged_liters: packaged,
        loss_liters: loss,
        draw_method: method,
        checklist: JSON.stringify(checklist),
        ...transferFigureValues(o.finings, co2, figures),
        transferred_at: at,
        started_at: startedAt,
        ended_at: startedAt ? at : null,
        unstable_gravity_reason: o.unstableGravityReason ?? null,
        dissolved_oxygen_ppb: o.dissolvedOxygenPpb ?? null,
        recorded_by: o.recordedBy ?? null,
        notes: o.notes ?? '',
        created_at: new Date(at.getTime() + 20 * MINUTE),
      })
      .returningAll()
      .executeTakeFirstOrThrow();

    const perKegCo2 = Math.round((co2 / kegs.length) * 10) / 10;
    const fill = { transferId: transfer.id, batchId: batch.id, ...figures, co2Grams: perKegCo2, at, bestBefore: await fillBestBefore(trx, batch.id, at) };
    const fills: KegFillRow[] = [];
    for (const [i, k] of kegs.entries()) {
      const keg = { kegId: k.id, liters: perKeg[i]!, cycleId: k.cycle_id, dissolvedOxygenPpb: o.kegDissolvedOxygenPpb?.[i] ?? null };
      const created = new Date(at.getTime() + 20 * MINUTE);
      fills.push(
        await trx
          .insertInto('keg_fill')
          .values({ ...kegFillValues(fill, keg), created_at: created })
          .returningAll()
          .executeTakeFirstOrThrow(),
      );
      const now = await trx.selectFrom('equipment').select('state').where('id', '=', k.id).executeTakeFirstOrThrow();
      if (now.state !== 'holding')
        await writeStateChange(trx, k.id, now.state, 'holding', `Filled with ${batch.name} from ${fermenter.code} (${perKeg[i]} L)`, o.recordedBy ?? null, at);
      const values = {
        whereabouts: o.whereabouts ?? ('cellar' as const),
        tap_id: null,
        member_id: null,
        checked_out_at: null,
        due_at: null,
        since: at,
        updated_by: o.recordedBy ?? null,
      };
      await trx
        .insertInto('keg_whereabouts')
        .values({ keg_id: k.id, ...values })
        .onConflict((oc) => oc.column('keg_id').doUpdateSet(values))
        .execute();
    }
    if (fermenter.state !== 'needs_cleaning') {
      await writeStateChange(
        trx,
        fermenter.id,
        fermenter.state,
        'needs_cleaning',
        `Emptied by transfer of ${batch.name} to ${kegs.map((k) => k.code).join(', ')}`,
        o.recordedBy ?? null,
        at,
      );
    }
    await markBatchPackaged(trx, batch.id, at, at);
    return { transfer, fills };
  });
}

export interface FillKegOverrides {
  kegId: string;
  /** When the keg was filled. */
  at: At;
  /** Default: a new batch (OG 1.050 to a stable FG 1.010 over the week before `at`) for `ownerId`, in a new fermenter. */
  batchId?: string;
  ownerId?: string;
  fromEquipmentId?: string;
  volumeLiters?: number;
  recordedBy?: string | null;
  whereabouts?: 'cellar' | 'cold_room';
}

/** One keg filled from a batch (a single-keg transfer), making whatever it needs that is not given. */
export async function fillKeg(db: Database, o: FillKegOverrides): Promise<TransferResult & { batchId: string; fermenterId: string }> {
  const at = toDate(o.at, 'at');
  return inTransaction(db, async (trx) => {
    const fermenterId = o.fromEquipmentId ?? (await createFermenter(trx)).id;
    const batchId =
      o.batchId ??
      (
        await createBatch(trx, {
          ...(o.ownerId ? { ownerId: o.ownerId } : {}),
          readings: [
            { takenAt: new Date(at.getTime() - 9 * DAY), value: 1.05 },
            { takenAt: new Date(at.getTime() - 5 * DAY), value: 1.01 },
            { takenAt: new Date(at.getTime() - 2 * DAY), value: 1.01 },
          ],
        })
      ).id;
    const result = await createTransfer(trx, {
      batchId,
      fromEquipmentId: fermenterId,
      kegIds: [o.kegId],
      at,
      kegVolumesLiters: [o.volumeLiters ?? 18],
      ...(o.recordedBy !== undefined ? { recordedBy: o.recordedBy } : {}),
      ...(o.whereabouts ? { whereabouts: o.whereabouts } : {}),
    });
    return { ...result, batchId, fermenterId };
  });
}
