import { litersToUsBarrels } from '../../../shared/brewing/index.ts';
import type { ProductionMonth } from '../../../shared/schemas/batches.ts';
import type { Database } from '../../db/database.ts';
import { ledgerBatches, ledgerFills, ledgerTransfers } from './production-records.repository.ts';

/**
 * The monthly production report: every litre the co-op brews is followed from its fermenter into
 * kegs and out of the co-op's control, so each month balances (opening + produced − removals −
 * losses = closing). The rules, by record:
 *
 * - A batch is produced (its `volume_liters`) at its first reading (no readings: when it was made);
 *   a planned batch, or a discarded one that never had a reading, was never brewed.
 * - It is in a fermenter until its first transfer. At each transfer the litres drawn leave the
 *   fermenter: what reached the kegs (the fills) enters keg inventory, the transfer's `loss_liters`
 *   is a transfer loss, and at the first transfer the batch's volume less what was drawn is "left in
 *   the fermenter" (a later transfer of the same batch draws on that remainder, so it lowers it).
 * - A batch discarded in its fermenter is dumped (a loss) at `discarded_at`. A batch packaged by hand
 *   (no transfer) leaves at `packaged_at`: its `packaged_liters` as a removal (not into the co-op's
 *   kegs), the rest as left in the fermenter.
 * - A keg fill (from a transfer) is in keg inventory until it leaves: the first `checked_out`
 *   keg_movement during the fill is a removal of the whole fill (it went home with a member, out of
 *   the co-op's control); otherwise its `emptied_at`: `emptied_reason = 'dumped'` is a loss, a
 *   return is a removal, anything else (emptied on tap or in the cellar) a removal as served. A keg
 *   marked missing stays in inventory until it is emptied. Levels noted between are not counted.
 * - Inventory at an instant is the batches in fermenters plus the fills still at the co-op.
 *
 * Times are half-open: a month holds events from its first instant up to (not including) the next
 * month's, in the co-op's time zone.
 */

interface Flow {
  at: Date;
  kind: 'produced' | 'packaged' | 'checkedOut' | 'served' | 'packagedOtherwise' | 'transferLoss' | 'leftInFermenter' | 'dumpedKeg' | 'dumpedBatch';
  liters: number;
}
interface Holding {
  place: 'fermenters' | 'kegs';
  from: Date;
  until: Date | null;
  liters: number;
}

/** Rounded to the centilitre (never -0). */
const round2 = (v: number) => Math.round(v * 100) / 100 || 0;
const round4 = (v: number) => Math.round(v * 10_000) / 10_000 || 0;
const bbl = (l: number) => round4(litersToUsBarrels(l));

/** What the co-op held and what moved, from the records, for batches brewed before `until` (of one owner if given). */
async function cellarLedger(db: Database, until: Date, ownerId?: string): Promise<{ flows: Flow[]; holdings: Holding[] }> {
  const batches = await ledgerBatches(db, ownerId);
  const brewed = batches
    .map((b) => ({ ...b, brewedAt: b.first_reading_at ? new Date(b.first_reading_at as unknown as string) : b.status === 'discarded' ? null : b.created_at }))
    .filter((b): b is typeof b & { brewedAt: Date } => b.brewedAt !== null && b.brewedAt < until);
  const ids = brewed.map((b) => b.id);
  if (!ids.length) return { flows: [], holdings: [] };

  const [transfers, fills] = await Promise.all([ledgerTransfers(db, ids), ledgerFills(db, ids)]);

  const flows: Flow[] = [];
  const holdings: Holding[] = [];
  const byBatch = new Map<string, typeof transfers>();
  for (const t of transfers) byBatch.set(t.batch_id, [...(byBatch.get(t.batch_id) ?? []), t]);

  for (const b of brewed) {
    const volume = Number(b.volume_liters);
    flows.push({ at: b.brewedAt, kind: 'produced', liters: volume });
    const own = byBatch.get(b.id) ?? [];
    let leftAt: Date | null = null;
    if (own.length) {
      leftAt = own[0]!.transferred_at;
      own.forEach((t, i) => {
        const drawn = Number(t.volume_liters);
        flows.push({ at: t.transferred_at, kind: 'transferLoss', liters: Number(t.loss_liters) });
        flows.push({ at: t.transferred_at, kind: 'leftInFermenter', liters: i === 0 ? volume - drawn : -drawn });
      });
    } else if (b.status === 'discarded') {
      leftAt = b.discarded_at ?? b.updated_at;
      flows.push({ at: leftAt, kind: 'dumpedBatch', liters: volume });
    } else if (b.status === 'packaged') {
      leftAt = b.packaged_at ?? b.updated_at;
      const packaged = b.packaged_liters === null ? volume : Number(b.packaged_liters);
      flows.push({ at: leftAt, kind: 'packaged', liters: packaged });
      flows.push({ at: leftAt, kind: 'packagedOtherwise', liters: packaged });
      flows.push({ at: leftAt, kind: 'leftInFermenter', liters: volume - packaged });
    }
    holdings.push({ place: 'fermenters', from: b.brewedAt, until: leftAt, liters: volume });
  }

  for (const f of fills) {
    const liters = Number(f.volume_liters);
    flows.push({ at: f.filled_at, kind: 'packaged', liters });
    const out = f.checked_out_at ? new Date(f.checked_out_at) : null;
    let until: Date | null = null;
    if (out) {
      until = out;
      flows.push({ at: out, kind: 'checkedOut', liters });
    } else if (f.emptied_at) {
      until = f.emptied_at;
      flows.push({ at: until, kind: f.emptied_reason === 'dumped' ? 'dumpedKeg' : f.emptied_reason === 'returned' ? 'checkedOut' : 'served', liters });
    }
    holdings.push({ place: 'kegs', from: f.filled_at, until, liters });
  }
  return { flows, holdings };
}

/** Litres held at the instant `at`: whatever entered before it and had not left by it. */
function heldAt(holdings: Holding[], at: Date, place: Holding['place']): number {
  let sum = 0;
  for (const h of holdings) if (h.place === place && h.from < at && (h.until === null || h.until >= at)) sum += h.liters;
  return sum;
}

/** The report for consecutive months, each given as [start, end) instants. */
export async function monthlyProduction(db: Database, months: { month: string; start: Date; end: Date }[], ownerId?: string): Promise<ProductionMonth[]> {
  if (!months.length) return [];
  const { flows, holdings } = await cellarLedger(db, months[months.length - 1]!.end, ownerId);
  return months.map(({ month, start, end }) => {
    const sum = (...kinds: Flow['kind'][]) => flows.filter((f) => kinds.includes(f.kind) && f.at >= start && f.at < end).reduce((s, f) => s + f.liters, 0);
    const opening = heldAt(holdings, start, 'fermenters') + heldAt(holdings, start, 'kegs');
    const fermenters = heldAt(holdings, end, 'fermenters');
    const kegs = heldAt(holdings, end, 'kegs');
    const produced = sum('produced');
    const packaged = sum('packaged');
    const removals = { checkedOutLiters: sum('checkedOut'), servedLiters: sum('served'), packagedOtherwiseLiters: sum('packagedOtherwise') };
    const removalsTotal = removals.checkedOutLiters + removals.servedLiters + removals.packagedOtherwiseLiters;
    const losses = {
      transferLiters: sum('transferLoss'),
      leftInFermenterLiters: sum('leftInFermenter'),
      dumpedKegLiters: sum('dumpedKeg'),
      dumpedBatchLiters: sum('dumpedBatch'),
    };
    const lossesTotal = losses.transferLiters + losses.leftInFermenterLiters + losses.dumpedKegLiters + losses.dumpedBatchLiters;
    const closing = fermenters + kegs;
    return {
      month,
      openingLiters: round2(opening),
      producedLiters: round2(produced),
      packagedLiters: round2(packaged),
      removals: {
        checkedOutLiters: round2(removals.checkedOutLiters),
        servedLiters: round2(removals.servedLiters),
        packagedOtherwiseLiters: round2(removals.packagedOtherwiseLiters),
        totalLiters: round2(removalsTotal),
      },
      losses: {
        transferLiters: round2(losses.transferLiters),
        leftInFermenterLiters: round2(losses.leftInFermenterLiters),
        dumpedKegLiters: round2(losses.dumpedKegLiters),
        dumpedBatchLiters: round2(losses.dumpedBatchLiters),
        totalLiters: round2(lossesTotal),
      },
      closing: { fermentersLiters: round2(fermenters), kegsLiters: round2(kegs), totalLiters: round2(closing) },
      balanceLiters: round2(opening + produced - removalsTotal - lossesTotal - closing),
      usBarrels: {
        opening: bbl(opening),
        produced: bbl(produced),
        packaged: bbl(packaged),
        removals: bbl(removalsTotal),
        losses: bbl(lossesTotal),
        closing: bbl(closing),
      },
    };
  });
}
