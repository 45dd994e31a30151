import { sql } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import { batchGravityFigures } from '../../backend/modules/batches/figures.ts';
import { planCarbonation } from '../../shared/cellar/carbonation-planner.ts';
import { blockingViolations, evaluateCycle, type StepForRules } from '../../shared/cellar/sanitation-rules.ts';
import { defaultCarbonationSettings, defaultSanitationSettings } from '../../shared/schemas/cellar-settings.ts';
import type { VesselState } from '../../shared/schemas/equipment.ts';
import { transferChecklistItems } from '../../shared/schemas/transfers.ts';
import { cycleFields, judgedStepValues } from '../../backend/modules/sanitation/sanitation.repository.ts';
import { transferFigureValues } from '../../backend/modules/transfers/transfers.repository.ts';
import { userId } from './0001_users.ts';
import { rota } from './0002_equipment.ts';
import type { DemoCalendar } from './demo-calendar.ts';
import { rng, seedId } from './ids.ts';
import { insertInChunks } from './write.ts';

/**
 * The cellar's records for the demo's last three months (September to November 2026 as designed),
 * written to agree with the states the bookings seed walked every vessel through: a sanitation cycle
 * for every cleaning (and a fresh one wherever a vessel sat past its freshness window before its
 * next use), a transfer for every batch that came out of a fermenter into kegs, where each keg went
 * (out with its member, in the cold room, on a tap), and a carbonation plan per fill. A few
 * exceptions are left in on purpose so that the audit report has something to flag: a keg whose
 * first cleaning was never entered, a sanitize step that was too short, a keg filled after its
 * window lapsed, and kegs still out with members past their due dates.
 */

const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;
const settings = defaultSanitationSettings;
const FRESH = settings.freshnessDays * DAY;

interface Change {
  id: string;
  equipment_id: string;
  from_state: VesselState | null;
  to_state: VesselState;
  reason: string;
  actor_id: string | null;
  at: Date;
}

interface CycleRow {
  id: string;
  equipment_id: string;
  started_at: Date;
  completed_at: Date;
  outcome: 'ready' | 'cleaned' | 'needs_cleaning';
  complete: boolean;
  issues: string;
  freshness_days: number | null;
  fresh_until: Date | null;
  recorded_by: string;
  notes: string;
  created_at: Date;
}

/** The keg whose registry cleaning was kept on paper and never entered (audit: a fill with no cycle on record). */
const UNRECORDED_KEG = 'K-017';
/** Kegs still out with their members past the due date on the demo's today. */
const OVERDUE_COUNT = 4;
/** Idle kegs the rota re-sanitized at the end of November, so that the cellar has ready kegs today. */
const READY_POOL = 14;

const styleVolumes: Record<string, { family: string; volumes: number }> = {
  'Pale ale': { family: 'American ales and IPAs', volumes: 2.4 },
  Porter: { family: 'Porters and stouts', volumes: 2.1 },
  Saison: { family: 'Sours and saisons', volumes: 3.0 },
  'Best bitter': { family: 'British and Irish ales', volumes: 1.8 },
  'Oatmeal stout': { family: 'Porters and stouts', volumes: 2.0 },
  Pilsner: { family: 'Lagers', volumes: 2.6 },
  'American IPA': { family: 'American ales and IPAs', volumes: 2.4 },
  'Brown ale': { family: 'British and Irish ales', volumes: 1.9 },
  'Wheat beer': { family: 'Wheat beers', volumes: 3.3 },
  'Red ale': { family: 'American ales and IPAs', volumes: 2.3 },
  'Golden ale': { family: 'British and Irish ales', volumes: 2.0 },
  'Dry stout': { family: 'Porters and stouts', volumes: 2.0 },
  'Winter warmer': { family: 'British and Irish ales', volumes: 1.9 },
  'Amber lager': { family: 'Lagers', volumes: 2.5 },
};

export async function seed(db: Database, cal: DemoCalendar): Promise<void> {
  const random = rng(5005);
  const between = (lo: number, hi: number) => lo + random() * (hi - lo);
  const pick = <T>(list: readonly T[]) => list[Math.floor(random() * list.length)]!;
  const today = cal.now.getTime();

  const equipment = await db.selectFrom('equipment').select(['id', 'code', 'kind', 'state', 'attributes', 'capacity_liters']).execute();
  if (!equipment.some((e) => e.kind === 'keg')) return;
  const byId = new Map(equipment.map((e) => [e.id, e]));
  const vessels = equipment.filter((e) => e.kind === 'keg' || e.kind === 'fermenter');

  const changeRows = await db
    .selectFrom('equipment_state_change')
    .select(['id', 'equipment_id', 'from_state', 'to_state', 'reason', 'actor_id', 'at'])
    .where(
      'equipment_id',
      'in',
      vessels.map((v) => v.id),
    )
    .orderBy('equipment_id')
    .orderBy('at')
    .orderBy('id')
    .execute();
  const chains = new Map<string, Change[]>();
  for (const c of changeRows) {
    const list = chains.get(c.equipment_id) ?? [];
    list.push({ ...c, id: String(c.id) });
    chains.set(c.equipment_id, list);
  }

  const cycles: CycleRow[] = [];
  const steps: Record<string, unknown>[] = [];
  const newChanges: Omit<Change, 'id'>[] = [];
  const changeUpdates: { id: string; from_state: VesselState }[] = [];
  const deletedChanges: string[] = [];
  const finalStates = new Map<string, { state: VesselState; at: Date }>();
  let cycleNo = 0;

  /** A cycle from its steps, evaluated by the co-op's own rules. */
  function addCycle(vesselId: string, list: (StepForRules & { by: string; co2?: number })[], notes = '') {
    const refused = blockingViolations(list, settings);
    if (refused.length) throw new Error(`demo seed: a cycle the API would refuse: ${refused.map((v) => v.message).join(' ')}`);
    const ev = evaluateCycle(list, settings);
    const id = seedId('sanitation-cycle', ++cycleNo);
    const recorder = list[list.length - 1]!.by;
    cycles.push({
      id,
      equipment_id: vesselId,
      ...cycleFields(ev, settings),
      recorded_by: recorder,
      notes,
      created_at: new Date(ev.completedAt.getTime() + 2 * MIN),
    });
    ev.steps.forEach((st, position) => {
      const raw = list[st.index]!;
      steps.push({
        ...judgedStepValues(id, position, st),
        contact_minutes: raw.contactMinutes ?? null,
        purge_method: st.step === 'purge' ? (raw.purgeMethod ?? 'flush') : null,
        pushed_into_equipment_id: st.step === 'purge' ? (raw.pushedIntoEquipmentId ?? null) : null,
        vented: st.step === 'clean' ? (raw.vented ?? null) : null,
        co2_grams: st.step === 'purge' ? (raw.co2 ?? settings.co2GramsPerPurge) : null,
        solution_liters:
          st.step === 'clean' || st.step === 'sanitize' ? (byId.get(vesselId)!.kind === 'keg' ? 19 : Number(byId.get(vesselId)!.capacity_liters) / 2) : null,
        performed_by: raw.by,
        at: new Date(raw.at),
        note: '',
      });
    });
    return { id, ev };
  }

  /** Clean and rinse finishing at `cleanedAt`, sanitize and purge finishing at `readyAt` (or none). */
  function cleaningSteps(vesselId: string, cleanedAt: Date, cleanBy: string, readyAt: Date | null, readyBy: string) {
    const v = byId.get(vesselId)!;
    const conical = v.kind === 'fermenter' && Number(v.capacity_liters) >= 120;
    const cleaner = conical ? 'caustic-cleaner' : 'alkaline-cleaner';
    const soak = conical ? 30 : pick([45, 60, 60, 60, 75]);
    const list: (StepForRules & { by: string; co2?: number })[] = [
      // Vented to atmospheric pressure before the caustic goes in.
      {
        step: 'clean',
        chemical: cleaner,
        concentration: conical ? 2 : pick([1.5, 1.5, 2]),
        contactMinutes: soak,
        at: new Date(cleanedAt.getTime() - (soak + 8) * MIN),
        by: cleanBy,
        ...(conical ? { vented: true } : {}),
      },
      { step: 'rinse', at: new Date(cleanedAt.getTime() - 3 * MIN), by: cleanBy },
    ];
    if (readyAt) {
      const sanitizer = v.kind === 'fermenter' && random() < 0.5 ? 'peracetic-sanitizer' : 'acid-sanitizer';
      list.push({
        step: 'sanitize',
        chemical: sanitizer,
        contactMinutes: pick([2, 2, 3]),
        at: new Date(readyAt.getTime() - 6 * MIN),
        by: readyBy,
      });
      const pushOut = v.kind === 'keg' && random() < 0.4;
      // A push-out purge pushes the sanitizer into the next keg on the rack, which is sanitized by it.
      const kegs = vessels.filter((k) => k.kind === 'keg');
      const nextKeg = kegs[(kegs.findIndex((k) => k.id === vesselId) + 1) % kegs.length]!;
      list.push({
        step: 'purge',
        purgeMethod: pushOut ? 'push_out' : 'flush',
        ...(pushOut ? { pushedIntoEquipmentId: nextKeg.id } : {}),
        contactMinutes: pushOut ? undefined : 0.5,
        at: readyAt,
        by: readyBy,
        co2: pushOut ? 30 : v.kind === 'fermenter' ? 25 : 15,
      });
    }
    return list;
  }

  const lapseReason = (fresh: Date) => `Freshness window lapsed at ${fresh.toISOString().slice(0, 16).replace('T', ' ')} UTC; clean and sanitize before use`;

  // Walk each vessel's states: every cleaning becomes a recorded cycle; lapses before a use get a fresh one.
  let shortSanitizeDone = false;
  let lapsedFillDone = false;
  const idleAtEnd: { vesselId: string; readyAt: Date; last: Change }[] = [];
  for (const v of vessels) {
    const chain = chains.get(v.id) ?? [];
    for (let i = 0; i < chain.length; i++) {
      const c = chain[i]!;
      if (c.to_state !== 'cleaned') continue;
      const next = chain[i + 1];
      const readyChange = next && next.to_state === 'ready' && next.from_state === 'cleaned' ? next : null;
      const registry = c.at.getTime() < cal.at('2026-09-01T00:00:00Z').getTime();
      if (registry && v.code === UNRECORDED_KEG) continue;
      addCycle(
        v.id,
        cleaningSteps(v.id, c.at, c.actor_id ?? rota[0]!, readyChange?.at ?? null, readyChange?.actor_id ?? c.actor_id ?? rota[0]!),
        registry ? 'Commissioning clean before the season' : '',
      );
      if (!readyChange) continue;
      // What came after the vessel was ready: its next use, or nothing yet.
      const after = chain[i + 2];
      const readyAt = readyChange.at;
      const lapseAt = new Date(readyAt.getTime() + FRESH);
      if (!after) {
        if (lapseAt.getTime() < today) idleAtEnd.push({ vesselId: v.id, readyAt, last: readyChange });
        continue;
      }
      if (after.at.getTime() <= lapseAt.getTime()) continue;
      // Sat past its window before the next change.
      if (after.to_state === 'holding' && !lapsedFillDone && v.kind === 'keg' && after.at.getTime() > cal.at('2026-11-01T00:00:00Z').getTime()) {
        // Left in on purpose: filled after its window had lapsed (the audit flags it).
        lapsedFillDone = true;
        continue;
      }
      newChanges.push({ equipment_id: v.id, from_state: 'ready', to_state: 'needs_cleaning', reason: lapseReason(lapseAt), actor_id: null, at: lapseAt });
      if (after.to_state !== 'holding') {
        changeUpdates.push({ id: after.id, from_state: 'needs_cleaning' });
        continue;
      }
      // Re-cleaned within a day of the next fill.
      const end = new Date(Math.max(lapseAt.getTime() + 2 * HOUR, after.at.getTime() - Math.round(between(2, 20)) * HOUR));
      const by = pick(rota);
      if (!shortSanitizeDone && v.kind === 'keg' && end.getTime() > cal.at('2026-10-01T00:00:00Z').getTime()) {
        // First attempt stopped after the rinse (the sanitizer had run out): left the keg cleaned; sanitized properly later.
        shortSanitizeDone = true;
        const first = new Date(end.getTime() - 50 * MIN);
        const short = addCycle(v.id, cleaningSteps(v.id, first, by, null, by), 'Sanitizer ran out; sanitized later');
        newChanges.push({
          equipment_id: v.id,
          from_state: 'needs_cleaning',
          to_state: 'cleaned',
          reason: `Sanitation cycle incomplete, cleaned, not sanitized: ${short.ev.issues.map((i) => i.message).join(' ')}`,
          actor_id: by,
          at: first,
        });
        addCycle(v.id, cleaningSteps(v.id, new Date(end.getTime() - 15 * MIN), by, end, by));
        newChanges.push({
          equipment_id: v.id,
          from_state: 'cleaned',
          to_state: 'ready',
          reason: 'Sanitation cycle complete; ready for 7 days',
          actor_id: by,
          at: end,
        });
      } else {
        addCycle(v.id, cleaningSteps(v.id, new Date(end.getTime() - 15 * MIN), by, end, by));
        newChanges.push({
          equipment_id: v.id,
          from_state: 'needs_cleaning',
          to_state: 'ready',
          reason: 'Sanitation cycle complete; ready for 7 days',
          actor_id: by,
          at: end,
        });
      }
    }
  }

  // Vessels idle at the end whose window has lapsed: the rota re-sanitized the fermenters and some kegs late in November.
  const idleKegs = idleAtEnd
    .filter((x) => byId.get(x.vesselId)!.kind === 'keg')
    .sort((a, b) => byId.get(a.vesselId)!.code.localeCompare(byId.get(b.vesselId)!.code));
  const refreshed = new Set([...idleAtEnd.filter((x) => byId.get(x.vesselId)!.kind === 'fermenter'), ...idleKegs.slice(0, READY_POOL)].map((x) => x.vesselId));
  for (const x of idleAtEnd) {
    const lapseAt = new Date(x.readyAt.getTime() + FRESH);
    newChanges.push({ equipment_id: x.vesselId, from_state: 'ready', to_state: 'needs_cleaning', reason: lapseReason(lapseAt), actor_id: null, at: lapseAt });
    if (refreshed.has(x.vesselId)) {
      const end = new Date(Math.max(lapseAt.getTime() + 3 * HOUR, today - Math.round(between(14, 60)) * HOUR));
      const by = pick(rota);
      addCycle(x.vesselId, cleaningSteps(x.vesselId, new Date(end.getTime() - 15 * MIN), by, end, by));
      newChanges.push({
        equipment_id: x.vesselId,
        from_state: 'needs_cleaning',
        to_state: 'ready',
        reason: 'Sanitation cycle complete; ready for 7 days',
        actor_id: by,
        at: end,
      });
      finalStates.set(x.vesselId, { state: 'ready', at: end });
    } else {
      finalStates.set(x.vesselId, { state: 'needs_cleaning', at: lapseAt });
    }
  }

  // ---------------------------------------------------------------------------------------------
  // Transfers: each finished fermenter booking with a batch, into the kegs booked from it.
  // ---------------------------------------------------------------------------------------------
  const bookings = await db
    .selectFrom('booking as b')
    .innerJoin('equipment as e', 'e.id', 'b.equipment_id')
    .select(['b.id', 'b.equipment_id', 'b.owner_id', 'b.batch_id', 'b.starts_at', 'b.ends_at', 'b.state', 'b.notes', 'e.code', 'e.kind'])
    .where('b.state', '<>', 'cancelled')
    .orderBy('b.starts_at')
    .orderBy('e.code')
    .execute();
  const batches = new Map(
    (await db.selectFrom('batch').select(['id', 'name', 'style', 'volume_liters', 'status', 'packaged_liters', 'owner_id']).execute()).map((b) => [b.id, b]),
  );
  const kegBookings = bookings.filter((b) => b.kind === 'keg' && b.starts_at.getTime() <= today);
  const fermenterBookings = bookings.filter((b) => b.kind === 'fermenter' && b.batch_id && b.ends_at.getTime() <= today);

  // The cycle that made a keg ready for a fill: its latest complete cycle before then.
  const cyclesByVessel = new Map<string, CycleRow[]>();
  for (const c of cycles) {
    const list = cyclesByVessel.get(c.equipment_id) ?? [];
    list.push(c);
    cyclesByVessel.set(c.equipment_id, list);
  }
  for (const list of cyclesByVessel.values()) list.sort((a, b) => a.completed_at.getTime() - b.completed_at.getTime());
  const cycleBefore = (vesselId: string, at: Date) => {
    const list = cyclesByVessel.get(vesselId) ?? [];
    let found: CycleRow | null = null;
    for (const c of list) if (c.completed_at.getTime() <= at.getTime()) found = c;
    return found?.complete ? found : null;
  };

  const transfers: Record<string, unknown>[] = [];
  const fills: {
    id: string;
    keg_id: string;
    batch_id: string;
    volume: number;
    filled_at: Date;
    emptied_at: Date | null;
    transfer_id: string;
    cycle: string | null;
    og: number | null;
    fg: number | null;
    abv: number | null;
    co2: number;
    ownerId: string;
    booking: (typeof kegBookings)[number];
  }[] = [];
  const batchUpdates: { id: string; liters: number; at: Date }[] = [];
  let transferNo = 0;
  for (const fb of fermenterBookings) {
    const batch = batches.get(fb.batch_id!);
    if (!batch || batch.status === 'discarded') continue;
    const into = kegBookings.filter((k) => k.notes === `Filled from ${fb.code}` && k.starts_at.getTime() === fb.ends_at.getTime());
    if (!into.length) continue;
    const at = fb.ends_at;
    const volume = Number(batch.volume_liters);
    const packaged = Math.min(Number(batch.packaged_liters ?? volume - 2), 19 * into.length, volume - 0.5);
    const per = Math.floor((packaged / into.length) * 10) / 10;
    const perKeg = into.map((_, i) => (i === into.length - 1 ? Math.round((packaged - per * (into.length - 1)) * 100) / 100 : per));
    const total = Math.round(perKeg.reduce((s, v) => s + v, 0) * 100) / 100;
    const loss = Math.round((volume - total) * 100) / 100;
    const figures = await batchGravityFigures(db, batch.id, at);
    const og = figures?.og ?? null;
    const fg = figures?.fg ?? figures?.currentGravity ?? null;
    const abv = figures?.abv !== null && figures?.abv !== undefined ? Math.round(figures.abv * 100) / 100 : null;
    const fermenter = byId.get(fb.equipment_id)!;
    const hasValve = (fermenter.attributes as { hasValve?: boolean }).hasValve !== false;
    const method = hasValve ? 'bottom_valve' : 'siphon';
    const finingsRoll = random();
    const finings =
      finingsRoll < 0.3
        ? { kind: 'gelatin', amount: Math.round(total * 0.15 * 10) / 10, unit: 'g' as const }
        : finingsRoll < 0.45
          ? { kind: 'silica finings', amount: Math.round(total * 0.5), unit: 'mL' as const }
          : null;
    const checklist: Record<string, unknown> = { drawMethod: method };
    for (const item of transferChecklistItems) if (!item.method || item.method === method) checklist[item.key] = true;
    if (!finings) checklist.finingsAdded = true;
    if (random() < 0.12) checklist.oxygenPickupNote = 'Bubbles at the keg-side barb; clamped it tighter';
    checklist.unconfirmed = [];
    const recorder =
      (chains.get(fb.equipment_id) ?? []).find((c) => c.to_state === 'needs_cleaning' && c.at.getTime() === at.getTime())?.actor_id ?? pick(rota);
    const id = seedId('transfer', ++transferNo);
    const co2 = settings.co2GramsPerKegFill * into.length;
    transfers.push({
      id,
      batch_id: batch.id,
      from_equipment_id: fb.equipment_id,
      volume_liters: Math.round((total + loss) * 100) / 100,
      packaged_liters: total,
      loss_liters: loss,
      draw_method: method,
      checklist: JSON.stringify(checklist),
      ...transferFigureValues(finings, co2, { og, fg, abv }),
      transferred_at: at,
      // Drawing took 35 to 55 minutes; a meter read the dissolved oxygen on every third transfer.
      started_at: new Date(at.getTime() - (35 + (transferNo % 5) * 5) * MIN),
      ended_at: at,
      unstable_gravity_reason: figures && !figures.stable ? 'Fermenter booked for the next brew; gravity at the recipe target' : null,
      dissolved_oxygen_ppb: transferNo % 3 === 0 ? 40 + ((transferNo * 17) % 80) : null,
      recorded_by: recorder,
      notes: '',
      created_at: new Date(at.getTime() + 20 * MIN),
    });
    batchUpdates.push({ id: batch.id, liters: total, at });
    into.forEach((kb, i) => {
      const keg = byId.get(kb.equipment_id)!;
      const chain = chains.get(keg.id) ?? [];
      const emptied = chain.find((c) => c.from_state === 'holding' && c.at.getTime() > at.getTime());
      fills.push({
        id: seedId('keg-fill', `${id}:${keg.code}`),
        keg_id: keg.id,
        batch_id: batch.id,
        volume: perKeg[i]!,
        filled_at: at,
        emptied_at: emptied ? emptied.at : null,
        transfer_id: id,
        cycle: cycleBefore(keg.id, at)?.id ?? null,
        og,
        fg,
        abv,
        co2: settings.co2GramsPerKegFill,
        ownerId: kb.owner_id,
        booking: kb,
      });
    });
  }

  // ---------------------------------------------------------------------------------------------
  // Where the kegs went: out with members, in the cold room, on the taps; a few overdue; one missing.
  // ---------------------------------------------------------------------------------------------
  const movements: Record<string, unknown>[] = [];
  const whereabouts = new Map<string, Record<string, unknown>>();
  const move = (m: Record<string, unknown>) => movements.push({ note: '', ...m });
  /** A keg carried from the cellar into the cold room to carbonate. */
  const intoColdRoom = (kegId: string, actorId: string, at: Date) =>
    move({
      keg_id: kegId,
      action: 'moved',
      from_whereabouts: 'cellar',
      to_whereabouts: 'cold_room',
      actor_id: actorId,
      at,
      note: 'Into the cold room to carbonate',
    });
  const remaining = new Map<string, number>();

  // Kegs "returned" in the last week of November are, in this story, partly still on a tap or
  // still out with their members past the due date.
  const recentReturns = fills
    .filter((f) => f.emptied_at && today - f.emptied_at.getTime() < 7 * DAY && today - f.emptied_at.getTime() > 1 * DAY)
    .filter((f) => {
      const chain = chains.get(f.keg_id) ?? [];
      const last = chain[chain.length - 1];
      return last && last.from_state === 'holding' && last.at.getTime() === f.emptied_at!.getTime() && !finalStates.has(f.keg_id);
    })
    .sort((a, b) => a.emptied_at!.getTime() - b.emptied_at!.getTime());
  const keptOut = new Set<string>();
  const keepCurrent = (f: (typeof fills)[number]) => {
    const chain = chains.get(f.keg_id)!;
    deletedChanges.push(chain[chain.length - 1]!.id);
    finalStates.set(f.keg_id, { state: 'holding', at: f.filled_at });
    keptOut.add(f.id);
  };

  const tapBookings = bookings.filter((b) => b.kind === 'tap' && b.state === 'in_use');
  const onTap = new Map<string, { tapId: string; since: Date }>();
  for (const tb of tapBookings) {
    const since = (f: (typeof fills)[number]) => new Date(Math.max(tb.starts_at.getTime(), f.filled_at.getTime() + DAY));
    let candidate = fills.find((f) => f.ownerId === tb.owner_id && !f.emptied_at && !onTap.has(f.keg_id));
    if (!candidate) {
      // The member's latest keg went on the tap rather than home.
      candidate = recentReturns.find((f) => f.ownerId === tb.owner_id && !keptOut.has(f.id) && f.filled_at.getTime() < tb.ends_at.getTime());
      if (candidate) keepCurrent(candidate);
    }
    if (candidate) onTap.set(candidate.keg_id, { tapId: tb.equipment_id, since: since(candidate) });
  }
  const overdueFills = new Set<string>();
  for (const f of recentReturns.filter((r) => !keptOut.has(r.id)).slice(0, OVERDUE_COUNT)) {
    keepCurrent(f);
    overdueFills.add(f.id);
  }

  for (const f of fills) {
    const kb = f.booking;
    const overdue = overdueFills.has(f.id);
    const current = !f.emptied_at || keptOut.has(f.id);
    const tap = onTap.get(f.keg_id);
    const brewer = pick(rota);
    if (current && tap) {
      intoColdRoom(f.keg_id, brewer, new Date(f.filled_at.getTime() + HOUR));
      move({
        keg_id: f.keg_id,
        action: 'tapped',
        from_whereabouts: 'cold_room',
        to_whereabouts: 'cold_room',
        tap_id: tap.tapId,
        actor_id: brewer,
        at: tap.since,
      });
      const daysOn = (today - tap.since.getTime()) / DAY;
      const left = Math.max(2, Math.round((f.volume - daysOn * between(0.4, 0.9)) * 10) / 10);
      remaining.set(f.id, left);
      move({
        keg_id: f.keg_id,
        action: 'level',
        from_whereabouts: 'cold_room',
        to_whereabouts: 'cold_room',
        tap_id: tap.tapId,
        actor_id: pick(rota),
        at: new Date(today - Math.round(between(3, 20)) * HOUR),
        note: `About ${left.toFixed(1)} L left`,
      });
      whereabouts.set(f.keg_id, {
        keg_id: f.keg_id,
        whereabouts: 'cold_room',
        tap_id: tap.tapId,
        member_id: null,
        checked_out_at: null,
        due_at: null,
        since: tap.since,
        updated_by: brewer,
      });
      continue;
    }
    if (current && !overdue && random() < 0.25) {
      const at = new Date(f.filled_at.getTime() + HOUR);
      intoColdRoom(f.keg_id, brewer, at);
      whereabouts.set(f.keg_id, {
        keg_id: f.keg_id,
        whereabouts: 'cold_room',
        tap_id: null,
        member_id: null,
        checked_out_at: null,
        due_at: null,
        since: at,
        updated_by: brewer,
      });
      continue;
    }
    // Collected by the member some hours after filling, due back at the end of the keg booking.
    const out = new Date(f.filled_at.getTime() + Math.round(between(3, 30)) * HOUR);
    const due = kb.ends_at;
    move({
      keg_id: f.keg_id,
      action: 'checked_out',
      from_whereabouts: 'cellar',
      to_whereabouts: 'with_member',
      member_id: f.ownerId,
      due_at: due,
      actor_id: brewer,
      at: out,
    });
    if (current) {
      whereabouts.set(f.keg_id, {
        keg_id: f.keg_id,
        whereabouts: 'with_member',
        tap_id: null,
        member_id: f.ownerId,
        checked_out_at: out,
        due_at: due,
        since: out,
        updated_by: brewer,
      });
    } else {
      const late = f.emptied_at!.getTime() > due.getTime();
      move({
        keg_id: f.keg_id,
        action: 'returned',
        from_whereabouts: 'with_member',
        to_whereabouts: 'cellar',
        member_id: f.ownerId,
        due_at: due,
        actor_id: pick(rota),
        at: f.emptied_at,
        note: late ? 'Returned after its due date' : '',
      });
    }
  }
  // One keg not found at the November stock-take.
  const missing = equipment
    .filter((e) => e.kind === 'keg' && !whereabouts.has(e.id) && finalStates.get(e.id)?.state === 'needs_cleaning')
    .sort((a, b) => b.code.localeCompare(a.code))[0];
  if (missing) {
    const at = cal.at('2026-11-16T17:00:00Z');
    move({
      keg_id: missing.id,
      action: 'marked_missing',
      from_whereabouts: 'cellar',
      to_whereabouts: 'missing',
      actor_id: userId('brewer'),
      at,
      note: 'Not found at the monthly stock-take',
    });
    whereabouts.set(missing.id, {
      keg_id: missing.id,
      whereabouts: 'missing',
      tap_id: null,
      member_id: null,
      checked_out_at: null,
      due_at: null,
      since: at,
      updated_by: userId('brewer'),
    });
  }

  // ---------------------------------------------------------------------------------------------
  // Carbonation plans: one per fill; the newest ones as fast starts, one still to be lowered.
  // ---------------------------------------------------------------------------------------------
  const plans: Record<string, unknown>[] = [];
  const carb = defaultCarbonationSettings;
  const recentFirst = [...fills].filter((f) => !f.emptied_at || keptOut.has(f.id)).sort((a, b) => b.filled_at.getTime() - a.filled_at.getTime());
  const fastStarts = new Set(recentFirst.slice(0, 3).map((f) => f.id));
  for (const f of fills) {
    const batch = batches.get(f.batch_id)!;
    const preset = styleVolumes[batch.style] ?? { family: 'American ales and IPAs', volumes: 2.4 };
    const fast = fastStarts.has(f.id);
    const startedAt = new Date(f.filled_at.getTime() + 2 * HOUR);
    const p = planCarbonation({
      targetVolumes: preset.volumes,
      temperatureC: carb.coldRoomTempC,
      altitudeM: carb.altitudeM,
      method: fast ? 'fast_start' : 'set_and_hold',
      startedAt,
      holdDays: carb.holdDays,
      fastStartPressureKpa: fast ? carb.fastStartPressureKpa : undefined,
      fastStartHours: fast ? carb.fastStartHours : undefined,
      settleDays: fast ? carb.settleDays : undefined,
      maxPressureKpa: carb.maxPlanPressureKpa,
    });
    const current = !f.emptied_at || keptOut.has(f.id);
    const lowerDue = p.lowerPressureAt ? new Date(p.lowerPressureAt).getTime() : null;
    const tap = onTap.get(f.keg_id);
    const tapAttrs = tap ? (byId.get(tap.tapId)!.attributes as Record<string, number>) : null;
    plans.push({
      id: seedId('carbonation-plan', f.id),
      keg_id: f.keg_id,
      keg_fill_id: f.id,
      state: current ? 'active' : 'done',
      method: fast ? 'fast_start' : 'set_and_hold',
      style_family: preset.family,
      target_volumes: preset.volumes,
      temperature_c: carb.coldRoomTempC,
      altitude_m: carb.altitudeM,
      serving_pressure_kpa: Math.round(p.servingPressureKpa * 100) / 100,
      fast_pressure_kpa: fast ? carb.fastStartPressureKpa : null,
      fast_hours: fast ? carb.fastStartHours : null,
      hold_days: fast ? null : carb.holdDays,
      settle_days: fast ? carb.settleDays : null,
      started_at: startedAt,
      lower_pressure_at: p.lowerPressureAt ? new Date(p.lowerPressureAt) : null,
      ready_at: new Date(p.readyAt),
      // Fast starts whose time is up were turned down (and their reminder sent); the newest is still running.
      pressure_lowered_at: lowerDue !== null && lowerDue < today ? new Date(lowerDue + 40 * MIN) : null,
      reminder_sent_at: lowerDue !== null && lowerDue < today ? new Date(lowerDue) : null,
      tap_id: tap?.tapId ?? null,
      line_length_m: tapAttrs?.lineLengthM ?? null,
      line_inside_diameter_mm: tapAttrs?.lineInsideDiameterMm ?? null,
      line_rise_m: tapAttrs?.riseM ?? null,
      created_by: pick(rota),
      created_at: startedAt,
      updated_at: startedAt,
    });
  }

  // ---------------------------------------------------------------------------------------------
  // Write it all.
  // ---------------------------------------------------------------------------------------------
  await insertInChunks(db, 'sanitation_cycle', cycles);
  await insertInChunks(db, 'sanitation_step', steps as never, { size: 500 });
  await insertInChunks(db, 'transfer', transfers as never, { size: 200 });
  await insertInChunks(
    db,
    'keg_fill',
    fills.map((f) => ({
      id: f.id,
      transfer_id: f.transfer_id,
      keg_id: f.keg_id,
      batch_id: f.batch_id,
      volume_liters: f.volume,
      remaining_liters: f.emptied_at && !keptOut.has(f.id) ? 0 : (remaining.get(f.id) ?? f.volume),
      og: f.og,
      fg: f.fg,
      abv: f.abv,
      sanitation_cycle_id: f.cycle,
      co2_grams: f.co2,
      filled_at: f.filled_at,
      emptied_at: keptOut.has(f.id) ? null : f.emptied_at,
      emptied_reason: f.emptied_at && !keptOut.has(f.id) ? 'returned' : null,
      // Recorded with its transfer.
      created_at: new Date(f.filled_at.getTime() + 20 * MIN),
    })),
  );
  for (const b of batchUpdates) {
    await db.updateTable('batch').set({ packaged_liters: b.liters, packaged_at: b.at }).where('id', '=', b.id).execute();
  }
  await insertInChunks(db, 'keg_whereabouts', [...whereabouts.values()] as never);
  await insertInChunks(db, 'keg_movement', movements as never);
  await insertInChunks(db, 'carbonation_plan', plans as never);

  // The states: lapses and fresh cycles added, overdue kegs never came back.
  if (deletedChanges.length) await db.deleteFrom('equipment_state_change').where('id', 'in', deletedChanges).execute();
  for (const u of changeUpdates) await db.updateTable('equipment_state_change').set({ from_state: u.from_state }).where('id', '=', u.id).execute();
  await insertInChunks(db, 'equipment_state_change', newChanges);
  for (const [id, s] of finalStates) {
    if (byId.get(id)!.state === 'out_of_service') continue;
    await db.updateTable('equipment').set({ state: s.state, state_changed_at: s.at, updated_at: s.at }).where('id', '=', id).execute();
  }
  await sql`analyze sanitation_cycle, sanitation_step, keg_fill, keg_movement`.execute(db);
}
