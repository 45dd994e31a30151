import {
  transferChecklistItems,
  type CreateTransferInput,
  type DrawMethod,
  type TransferCandidate,
  type TransferListQuery,
  type TransferView,
  TRANSFER_MAX_HOURS,
} from '../../../shared/schemas/transfers.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Database } from '../../db/database.ts';
import { audit } from '../../lib/audit.ts';
import { conflict, notFound, unprocessable } from '../../lib/http-problem.ts';
import { pageOfViews } from '../../lib/paginate.ts';
import { batchGravityFigures } from '../batches/figures.ts';
import { fillBestBefore } from '../batches/shelf-life.ts';
import { boundFrom, boundTo, sanitationSettings } from '../sanitation/sanitation.service.ts';
import { setVesselState } from '../equipment/vessel-state.ts';
import { drawCo2 } from '../equipment/cylinders.service.ts';
import { assertInspected } from '../equipment/inspections.service.ts';
import { gravityNotStable, gravityStability } from './gravity-stability.ts';
import {
  candidateRows,
  cyclesByIds,
  fillFigures,
  insertKegFill,
  insertTransfer,
  kegFillValues,
  lockBatch,
  lockFermenter,
  lockKegsForFill,
  markBatchPackaged,
  setBatchPackagedStatus,
  transferFigureValues,
  transferPage,
  transferRows,
} from './transfers.repository.ts';

const FUTURE_SLACK_MS = 10 * 60_000;
const round2 = (v: number) => Math.round(v * 100) / 100;
const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

/** Checklist items that apply to this draw method and were not confirmed. */
export function unconfirmedItems(checklist: Record<string, unknown>, method: DrawMethod, hasFinings: boolean): string[] {
  return transferChecklistItems
    .filter((i) => !i.method || i.method === method)
    .filter((i) => !(i.key === 'finingsAdded' && hasFinings))
    .filter((i) => checklist[i.key] !== true)
    .map((i) => i.key);
}

/** Splits the litres that reached the kegs evenly (to the centilitre, the last keg takes the rounding). */
function shareEvenly(total: number, n: number): number[] {
  const each = Math.floor((total / n) * 100) / 100;
  const out = Array.from({ length: n }, () => each);
  out[n - 1] = round2(total - each * (n - 1));
  return out;
}

/**
 * Records a transfer: every keg must be `ready` with a current sanitation cycle (else 409 and
 * nothing changes); in one transaction the kegs are filled (holding, linked to the batch, OG/FG/ABV
 * copied), the fermenter becomes `needs_cleaning`, the batch is marked packaged, and the audit
 * trail notes it.
 */
export async function recordTransfer(
  db: Database,
  input: CreateTransferInput,
  actor: { id: string },
  now: Date,
): Promise<{ transfer: TransferView; warnings: string[] }> {
  // With start and end times, the end is the transfer's time and may not be after the clock's now.
  // A start without an end ends now (recorded as it finishes).
  const startedAt = input.startedAt ? new Date(input.startedAt) : null;
  const endedAt = input.endedAt ? new Date(input.endedAt) : startedAt ? now : null;
  if (endedAt && endedAt.getTime() > now.getTime())
    throw unprocessable('A transfer cannot end in the future.', [{ path: 'endedAt', message: 'This time is in the future' }]);
  if (startedAt && endedAt && startedAt.getTime() >= endedAt.getTime())
    throw unprocessable('A transfer starts before it ends.', [{ path: 'startedAt', message: 'The start must be before the end' }]);
  if (startedAt && endedAt && endedAt.getTime() - startedAt.getTime() > TRANSFER_MAX_HOURS * 3_600_000) {
    throw unprocessable(`A transfer takes at most ${TRANSFER_MAX_HOURS} hours.`, [{ path: 'startedAt', message: 'Check the dates' }]);
  }
  const at = endedAt ?? (input.transferredAt ? new Date(input.transferredAt) : now);
  if (at.getTime() > now.getTime() + FUTURE_SLACK_MS)
    throw unprocessable('A transfer cannot be recorded in the future.', [{ path: 'transferredAt', message: 'This time is in the future' }]);
  const settings = await sanitationSettings(db);

  const transferId = await db
    .transaction()
    .execute(async (trx) => {
      const batch = await lockBatch(trx, input.batchId);
      if (!batch) throw notFound('Batch');
      if (batch.status === 'planned') throw conflict(`${batch.name} has not been brewed yet.`);
      if (batch.status === 'discarded') throw conflict(`${batch.name} was discarded.`);
      // The guard: beer whose gravity is not yet stable goes into kegs only with a reason.
      const stability = await gravityStability(trx, batch.id, startedAt ?? at);
      if (!stability.stable && !input.unstableGravityReason) throw gravityNotStable(batch.name, stability);

      const fermenter = await lockFermenter(trx, input.fromEquipmentId);
      if (!fermenter) throw notFound('Fermenter');
      if (fermenter.kind !== 'fermenter')
        throw unprocessable('Beer is transferred from a fermenter.', [{ path: 'fromEquipmentId', message: 'Pick a fermenter' }]);
      if (fermenter.state === 'out_of_service') throw conflict(`${fermenter.code} is out of service.`);

      // Locked in a fixed order so two transfers never deadlock.
      const kegs = await lockKegsForFill(trx, input.toKegIds);
      const missing = input.toKegIds.filter((id) => !kegs.some((k) => k.id === id));
      if (missing.length)
        throw unprocessable(
          'Unknown keg.',
          missing.map((id) => ({ path: `toKegIds.${input.toKegIds.indexOf(id)}`, message: 'No such keg' })),
        );
      const notKeg = kegs.find((k) => k.kind !== 'keg');
      if (notKeg) throw unprocessable(`${notKeg.code} is not a keg.`, [{ path: `toKegIds.${input.toKegIds.indexOf(notKeg.id)}`, message: 'Pick a keg' }]);
      // A keg whose pressure test, relief-valve check or seals are past due (or failed) is not filled.
      await assertInspected(trx, kegs, 'filled', now);

      const lastIds = kegs.map((k) => k.last_cycle_id).filter((v): v is string => Boolean(v));
      const cycles = await cyclesByIds(trx, lastIds);
      const cycleById = new Map(cycles.map((c) => [c.id, c]));
      const refused: { id: string; code: string; state: string; reason: string }[] = [];
      for (const k of kegs) {
        const c = k.last_cycle_id ? cycleById.get(k.last_cycle_id) : undefined;
        let reason: string | null = null;
        if (k.state !== 'ready') reason = `it is ${k.state.replace('_', ' ')}`;
        else if (!c) reason = 'it has no sanitation cycle on record';
        else if (!c.complete) reason = 'its last sanitation cycle is incomplete';
        else if (!c.fresh_until || new Date(c.fresh_until).getTime() <= at.getTime()) reason = 'its freshness window has lapsed';
        else if (new Date(c.completed_at).getTime() > at.getTime()) reason = 'it was sanitized after the transfer time';
        else if (k.whereabouts === 'with_member' || k.whereabouts === 'missing')
          reason = `it is ${k.whereabouts === 'missing' ? 'missing' : 'out with a member'}`;
        if (reason) refused.push({ id: k.id, code: k.code, state: k.state, reason });
      }
      if (refused.length) {
        throw conflict(`Not ready to fill: ${refused.map((r) => `${r.code} (${r.reason})`).join('; ')}. Record a complete sanitation cycle first.`, {
          kegs: refused,
        });
      }

      // Volumes: per keg as given, or the volume less the loss shared evenly.
      const ordered = input.toKegIds.map((id) => kegs.find((k) => k.id === id)!);
      let perKeg: number[];
      let loss: number;
      if (input.kegVolumesLiters) {
        perKeg = input.kegVolumesLiters.map(round2);
        const sum = round2(perKeg.reduce((s, v) => s + v, 0));
        loss = round2(input.volumeLiters - sum);
        if (loss < 0)
          throw unprocessable('The kegs hold more than was drawn from the fermenter.', [
            { path: 'kegVolumesLiters', message: `They add up to ${sum} L, more than ${input.volumeLiters} L` },
          ]);
      } else {
        loss = round2(input.lossLiters ?? 0);
        if (loss >= input.volumeLiters) throw unprocessable('The loss is the whole volume.', [{ path: 'lossLiters', message: 'Less than the volume drawn' }]);
        perKeg = shareEvenly(round2(input.volumeLiters - loss), ordered.length);
      }
      ordered.forEach((k, i) => {
        const cap = num(k.capacity_liters);
        if (cap !== null && perKeg[i]! > cap) {
          throw unprocessable(`${k.code} holds ${cap} L.`, [
            { path: input.kegVolumesLiters ? `kegVolumesLiters.${i}` : 'volumeLiters', message: `${k.code} holds at most ${cap} L` },
          ]);
        }
      });
      const packaged = round2(perKeg.reduce((s, v) => s + v, 0));
      const volume = round2(packaged + loss);

      const attrs = (fermenter.attributes ?? {}) as Record<string, unknown>;
      const method: DrawMethod = input.checklist.drawMethod ?? (attrs.hasValve === false ? 'siphon' : 'bottom_valve');
      const finings = input.finings
        ? {
            kind: input.finings.kind,
            amount: round2(input.finings.amount ?? input.finings.dose!),
            unit: input.finings.unit ?? (/silica|liquid/i.test(input.finings.kind) ? ('mL' as const) : ('g' as const)),
          }
        : null;
      const unconfirmed = unconfirmedItems(input.checklist, method, Boolean(finings));
      const co2 = input.co2Grams ?? settings.co2GramsPerKegFill * ordered.length;

      // The batch is packaged from here on: its FG is the latest reading.
      await setBatchPackagedStatus(trx, batch.id, now);
      const figures = fillFigures(await batchGravityFigures(trx, batch.id, now));

      const transferId = await insertTransfer(trx, {
        batch_id: batch.id,
        from_equipment_id: fermenter.id,
        volume_liters: volume,
        packaged_liters: packaged,
        loss_liters: loss,
        draw_method: method,
        checklist: JSON.stringify({ ...input.checklist, drawMethod: method, unconfirmed }),
        ...transferFigureValues(finings, co2, figures),
        transferred_at: at,
        started_at: startedAt,
        ended_at: endedAt,
        unstable_gravity_reason: stability.stable ? null : input.unstableGravityReason!,
        dissolved_oxygen_ppb: input.dissolvedOxygenPpb ?? null,
        recorded_by: actor.id,
        notes: input.notes ?? '',
      });

      const perKegCo2 = Math.round((co2 / ordered.length) * 10) / 10;
      const fill = { transferId, batchId: batch.id, ...figures, co2Grams: perKegCo2, at, bestBefore: await fillBestBefore(trx, batch.id, at) };
      for (const [i, k] of ordered.entries()) {
        const keg = { kegId: k.id, liters: perKeg[i]!, cycleId: k.last_cycle_id, dissolvedOxygenPpb: input.kegDissolvedOxygenPpb?.[i] ?? null };
        const fillId = await insertKegFill(trx, kegFillValues(fill, keg));
        // The CO2 billed for the fill comes off the connected cylinder.
        await drawCo2(trx, { grams: perKegCo2, sourceType: 'keg_fill', sourceId: fillId, actorId: actor.id, at, now });
        await setVesselState(trx, k.id, 'holding', `Filled with ${batch.name} from ${fermenter.code} (${perKeg[i]} L)`, actor.id, now);
      }
      await setVesselState(
        trx,
        fermenter.id,
        'needs_cleaning',
        `Emptied by transfer of ${batch.name} to ${ordered.map((k) => k.code).join(', ')}`,
        actor.id,
        now,
      );

      await markBatchPackaged(trx, batch.id, at, now);

      await audit(trx, actor.id, 'recorded', 'Transfer', transferId, {
        batchId: batch.id,
        from: fermenter.code,
        kegs: ordered.map((k) => k.code),
        volumeLiters: volume,
        lossLiters: loss,
        unconfirmed,
        ...(stability.stable
          ? {}
          : { unstableGravityReason: input.unstableGravityReason, stability: { heldDays: stability.heldDays, spanDays: stability.spanDays } }),
      });
      return transferId;
    })
    .catch((err: unknown) => {
      // A keg filled meanwhile by another transfer: its open-fill index refuses the second one.
      if ((err as { code?: string })?.code === '23505') throw conflict('One of the kegs was filled meanwhile; nothing was recorded. Reload and try again.');
      throw err;
    });

  const [view] = await transferViews(db, [transferId]);
  const warnings = view!.unconfirmed.map((key) => `Not confirmed: ${transferChecklistItems.find((i) => i.key === key)?.label ?? key}`);
  return { transfer: view!, warnings };
}

export async function transferViews(db: Database, ids: string[]): Promise<TransferView[]> {
  if (!ids.length) return [];
  const [rows, fills] = await transferRows(db, ids);
  const byId = new Map(
    rows.map((r): [string, TransferView] => {
      const checklist = (r.checklist ?? {}) as Record<string, unknown>;
      const { unconfirmed, ...items } = checklist;
      return [
        r.id,
        {
          id: r.id,
          batch: { id: r.batch_id, name: r.batch_name, style: r.batch_style, ownerId: r.owner_id },
          fermenter: { id: r.from_equipment_id, code: r.fermenter_code, name: r.fermenter_name },
          volumeLiters: Number(r.volume_liters),
          packagedLiters: Number(r.packaged_liters),
          lossLiters: Number(r.loss_liters),
          drawMethod: r.draw_method,
          checklist: items,
          unconfirmed: Array.isArray(unconfirmed) ? (unconfirmed as string[]) : [],
          finings: r.finings_kind ? { kind: r.finings_kind, amount: Number(r.finings_amount), unit: r.finings_unit! } : null,
          co2Grams: Number(r.co2_grams),
          og: num(r.og),
          fg: num(r.fg),
          abv: num(r.abv),
          transferredAt: r.transferred_at.toISOString(),
          startedAt: r.started_at ? r.started_at.toISOString() : null,
          endedAt: r.ended_at ? r.ended_at.toISOString() : null,
          unstableGravityReason: r.unstable_gravity_reason,
          dissolvedOxygenPpb: num(r.dissolved_oxygen_ppb),
          recordedBy: r.recorded_by ? { id: r.recorded_by, name: r.recorded_by_name ?? '' } : null,
          notes: r.notes,
          kegs: fills
            .filter((f) => f.transfer_id === r.id)
            .map((f) => ({
              fillId: f.id,
              kegId: f.keg_id,
              code: f.code,
              volumeLiters: Number(f.volume_liters),
              sanitationCycleId: f.sanitation_cycle_id,
              dissolvedOxygenPpb: num(f.dissolved_oxygen_ppb),
            })),
        },
      ];
    }),
  );
  return ids.map((id) => byId.get(id)).filter((v): v is TransferView => Boolean(v));
}

export async function listTransfers(db: Database, q: TransferListQuery, ownerId?: string): Promise<Page<TransferView>> {
  const range = { ...(q.from ? { from: boundFrom(q.from) } : {}), ...(q.to ? { to: boundTo(q.to) } : {}) };
  return pageOfViews(await transferPage(db, q, range, ownerId), (ids) => transferViews(db, ids), q);
}

/** Batches still in a fermenter (fermenting or conditioning), each with the fermenter its latest booking holds it in and whether its gravity is stable. */
export async function transferCandidates(db: Database, now: Date): Promise<TransferCandidate[]> {
  const rows = await candidateRows(db);
  const gravity = await Promise.all(rows.map((r) => gravityStability(db, r.id, now)));
  return rows.map((r, i) => ({
    batchId: r.id,
    name: r.name,
    style: r.style,
    status: r.status,
    ownerName: r.owner_name,
    volumeLiters: Number(r.volume_liters),
    fermenter: r.f_id
      ? { id: r.f_id, code: r.f_code!, name: r.f_name!, state: r.f_state!, hasValve: (r.f_attributes as { hasValve?: boolean } | null)?.hasValve !== false }
      : null,
    gravity: gravity[i]!,
  }));
}
