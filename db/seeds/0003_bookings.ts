import type { Database } from '../../backend/db/database.ts';
import type { BookingState } from '../../shared/schemas/booking.ts';
import type { VesselState } from '../../shared/schemas/equipment.ts';
import { demoUsers, userId } from './0001_users.ts';
import { equipmentId, rota, seedEquipment } from './0002_equipment.ts';
import type { DemoCalendar } from './demo-calendar.ts';
import { rng, seedId } from './ids.ts';
import { insertInChunks } from './write.ts';

const HOUR = 3600_000;
const DAY = 24 * HOUR;
/** The co-op's cleaning buffer when these bookings were made (the booking_rules default). */
const BUFFER = 24 * HOUR;

export const bookingSeedId = (n: number) => seedId('booking', n);

interface PlannedBooking {
  code: string;
  owner: string;
  startsAt: Date;
  endsAt: Date;
  cancelled?: boolean;
  /** For kegs: the fermenter they were filled from. */
  filledFrom?: string;
}

const members = demoUsers.filter((u) => u.roles.includes('member')).map((u) => u.key);
const addDays = (d: Date, days: number) => new Date(d.getTime() + days * DAY);

/**
 * What each fermenter is doing on the demo's today, and when its last finished booking ended (dates
 * as designed, for a today of 1 December 2026; the demo's calendar moves them).
 */
const fermenterPlan: Record<
  string,
  { final: VesselState; lastEnd?: string; endsBy?: string; currentOwner?: string; december?: { start: string; days: number; owner: string }[] }
> = {
  'F-01': { final: 'holding', currentOwner: 'member' },
  'F-02': { final: 'holding', december: [{ start: '2026-12-20', days: 21, owner: 'member7' }] },
  'F-03': { final: 'ready', lastEnd: '2026-11-19' },
  'F-04': { final: 'needs_cleaning', lastEnd: '2026-11-30' },
  'F-05': { final: 'out_of_service', lastEnd: '2026-10-20' },
  'F-06': { final: 'cleaned', lastEnd: '2026-11-29' },
  // F-07's batch has finished and its booking ends the day after tomorrow: the brewer's Today shows a transfer due.
  'F-07': { final: 'holding', endsBy: '2026-12-03' },
  'F-08': { final: 'ready', lastEnd: '2026-11-24', december: [{ start: '2026-12-14', days: 21, owner: 'member' }] },
  'F-09': { final: 'holding' },
  'F-10': { final: 'needs_cleaning', lastEnd: '2026-11-30' },
  'F-11': { final: 'holding', december: [{ start: '2026-12-28', days: 28, owner: 'member12' }] },
  'F-12': { final: 'ready', lastEnd: '2026-11-22', december: [{ start: '2026-12-04', days: 21, owner: 'member14' }] },
};

/** Items out of service on the demo's today, since when and why. */
const outOfServiceOn = (cal: DemoCalendar): Record<string, { at: Date; reason: string }> => ({
  'F-05': { at: cal.at('2026-10-23T11:00:00Z'), reason: 'Lid seal cracked; a replacement seal is on order' },
  'K-058': { at: cal.at('2026-09-12T14:00:00Z'), reason: 'Failed the leak test at the gas post; O-ring kit on order' },
  'K-059': { at: cal.at('2026-11-03T10:00:00Z'), reason: 'Dent in the shell near the base; to be pressure-tested by a licensed tester before reuse' },
  'T-6': { at: cal.at('2026-11-08T16:00:00Z'), reason: 'Faucet drips at the shank; new washer on order' },
  'C-6': { at: cal.at('2026-11-02T09:00:00Z'), reason: `Hydrostatic test was due ${cal.date('2026-11-01')}; sent for testing` },
});

function plan(cal: DemoCalendar): PlannedBooking[] {
  const random = rng(3003);
  const demoToday = cal.now;
  const seasonStart = cal.at('2026-09-01T10:00:00Z');
  const day10 = (iso: string) => cal.at(`${iso}T10:00:00Z`);
  const outOfService = outOfServiceOn(cal);
  const between = (lo: number, hi: number) => lo + Math.floor(random() * (hi - lo + 1));
  const pick = <T>(list: T[]) => list[Math.floor(random() * list.length)]!;
  const bookings: PlannedBooking[] = [];
  const fermenterBookings: (PlannedBooking & { capacity: number })[] = [];

  for (const [code, p] of Object.entries(fermenterPlan)) {
    const capacity = seedEquipment.find((e) => e.code === code)!.capacityLiters!;
    const length = () => (capacity >= 120 ? between(21, 32) : between(14, 26));
    const own: PlannedBooking[] = [];
    let anchor: Date; // the start of the booking after the ones still to fill in
    if (p.final === 'holding') {
      const plannedStart = addDays(day10('2026-12-01'), -between(3, 16));
      const days = length();
      const endsAt = p.endsBy
        ? day10(p.endsBy)
        : addDays(plannedStart, Math.max(days, Math.ceil((day10('2026-12-03').getTime() - plannedStart.getTime()) / DAY)));
      const startsAt = plannedStart;
      own.push({ code, owner: p.currentOwner ?? pick(members), startsAt, endsAt });
      anchor = startsAt;
    } else {
      const endsAt = day10(p.lastEnd!);
      const startsAt = addDays(endsAt, -length());
      own.push({ code, owner: pick(members), startsAt, endsAt });
      anchor = startsAt;
    }
    // Earlier bookings, back to the start of September, each with the cleaning buffer and a day or few between.
    for (;;) {
      const endsAt = new Date(anchor.getTime() - BUFFER - between(0, 4) * DAY);
      let startsAt = addDays(endsAt, -length());
      if (startsAt < seasonStart) {
        if (endsAt.getTime() - seasonStart.getTime() < 10 * DAY) break;
        startsAt = addDays(seasonStart, between(0, 2));
      }
      own.push({ code, owner: pick(members), startsAt, endsAt });
      anchor = startsAt;
    }
    for (const d of p.december ?? []) {
      const startsAt = day10(d.start);
      own.push({ code, owner: d.owner, startsAt, endsAt: addDays(startsAt, d.days) });
    }
    // The demo member brewed in F-03 last, so their kegs from it are out now.
    if (code === 'F-03') own[0]!.owner = 'member';
    for (const b of own) fermenterBookings.push({ ...b, capacity });
    bookings.push(...own);
  }

  // Kegs: when a batch comes out of its fermenter, its brewer takes kegs for a few weeks.
  const kegCodes = seedEquipment.filter((e) => e.kind === 'keg').map((e) => e.code);
  const tapCodes = seedEquipment.filter((e) => e.kind === 'tap').map((e) => e.code);
  const freeFrom = new Map<string, number>();
  const allocate = (codes: string[], start: Date, end: Date, count: number, excluded: (code: string) => boolean) => {
    const chosen: string[] = [];
    const offset = between(0, codes.length - 1);
    for (let i = 0; i < codes.length && chosen.length < count; i++) {
      const code = codes[(offset + i) % codes.length]!;
      if (excluded(code)) continue;
      if ((freeFrom.get(code) ?? 0) <= start.getTime()) chosen.push(code);
    }
    for (const code of chosen) freeFrom.set(code, end.getTime() + BUFFER);
    return chosen;
  };
  const kegExcluded = (code: string) => code === 'K-058' || code === 'K-059';
  const packaged = fermenterBookings
    .filter((b) => b.endsAt.getTime() <= addDays(demoToday, 31).getTime())
    .sort((a, b) => a.endsAt.getTime() - b.endsAt.getTime());
  for (const fb of packaged) {
    const count = fb.capacity >= 120 ? 6 : fb.capacity >= 60 ? 3 : fb.owner === 'member' ? 2 : between(1, 2);
    const startsAt = fb.endsAt;
    const endsAt = addDays(startsAt, between(14, 30));
    // Bookings may start at most 90 days ahead; these all start within the month.
    for (const code of allocate(kegCodes, startsAt, endsAt, count, kegExcluded)) {
      bookings.push({ code, owner: fb.owner, startsAt, endsAt, filledFrom: fb.code });
    }
    // About half put one keg on a tap in the cold room once it has carbonated.
    if (random() < 0.5) {
      const tapStart = addDays(startsAt, between(2, 5));
      const tapEnd = addDays(tapStart, between(14, 28));
      const tapExcluded = (code: string) => code === 'T-6' && tapEnd.getTime() + 4 * DAY > outOfService['T-6']!.at.getTime();
      for (const code of allocate(tapCodes, tapStart, tapEnd, 1, tapExcluded)) bookings.push({ code, owner: fb.owner, startsAt: tapStart, endsAt: tapEnd });
    }
  }

  // CO2 cylinders lent out for a week or two.
  for (const [code, starts] of [
    ['C-4', ['2026-09-07', '2026-10-05', '2026-11-09', '2026-12-07']],
    ['C-5', ['2026-09-21', '2026-10-19', '2026-11-23']],
  ] as const) {
    for (const s of starts) {
      const startsAt = day10(s);
      bookings.push({ code, owner: pick(members), startsAt, endsAt: addDays(startsAt, between(7, 14)) });
    }
  }

  // A few bookings that were cancelled (they no longer hold their slots).
  for (const [code, s, days] of [
    ['F-03', '2026-12-07', 21],
    ['F-09', '2026-10-12', 14],
    ['K-012', '2026-11-02', 28],
    ['T-2', '2026-12-10', 14],
  ] as const) {
    const startsAt = day10(s);
    bookings.push({ code, owner: pick(members), startsAt, endsAt: addDays(startsAt, days), cancelled: true });
  }
  return bookings;
}

function stateOf(b: PlannedBooking, demoToday: Date): BookingState {
  if (b.cancelled) return 'cancelled';
  if (b.endsAt <= demoToday) return 'finished';
  if (b.startsAt <= demoToday) return 'in_use';
  return 'booked';
}

interface Change {
  equipment_id: string;
  from_state: VesselState;
  to_state: VesselState;
  reason: string;
  actor_id: string;
  at: Date;
}

/**
 * Three months of bookings of the demo co-op (September to November 2026, and some in December, as
 * designed; the demo's calendar moves them to end on the seed's today),
 * and each item's history of states that follows from them: filled at the start, emptied at the
 * end, cleaned and sanitized before the next user.
 */
/** Larkspur Yard's own limit: a 120 L batch alone goes into six kegs, so members may hold up to 24 bookings at once. */
export const DEMO_MAX_ACTIVE_BOOKINGS = 24;

export async function seed(db: Database, cal: DemoCalendar): Promise<void> {
  const demoToday = cal.now;
  const outOfService = outOfServiceOn(cal);
  const rules = await db.selectFrom('setting').select('value').where('key', '=', 'booking_rules').executeTakeFirst();
  if (rules) {
    const value = { ...(rules.value as Record<string, unknown>), maxActiveBookingsPerMember: DEMO_MAX_ACTIVE_BOOKINGS };
    await db
      .updateTable('setting')
      .set({ value: JSON.stringify(value) })
      .where('key', '=', 'booking_rules')
      .execute();
  }
  const random = rng(3004);
  const bookings = plan(cal);
  const rows = bookings.map((b, i) => {
    const createdAt = new Date(Math.max(cal.at('2026-08-20T09:00:00Z').getTime(), b.startsAt.getTime() - (3 + Math.floor(random() * 18)) * DAY));
    const state = stateOf(b, demoToday);
    return {
      id: bookingSeedId(i + 1),
      equipment_id: equipmentId(b.code),
      owner_id: userId(b.owner),
      starts_at: b.startsAt,
      ends_at: b.endsAt,
      blocked_until: new Date(b.endsAt.getTime() + BUFFER),
      state,
      notes: b.filledFrom ? `Filled from ${b.filledFrom}` : '',
      created_by: userId(b.owner),
      cancelled_by: state === 'cancelled' ? userId(b.owner) : null,
      cancelled_at: state === 'cancelled' ? new Date(createdAt.getTime() + 2 * DAY) : null,
      created_at: createdAt,
      updated_at: createdAt,
    };
  });
  await insertInChunks(db, 'booking', rows, { size: 200, skipExisting: true });

  // Each item's states through its bookings, ending at the state it is in today.
  const changes: Change[] = [];
  const finalState = new Map<string, { state: VesselState; at: Date }>();
  const actor = () => rota[Math.floor(random() * rota.length)]!;
  for (const item of seedEquipment) {
    if (item.kind === 'co2_cylinder') continue;
    const id = equipmentId(item.code);
    const own = bookings
      .filter((b) => b.code === item.code && !b.cancelled && b.startsAt <= demoToday)
      .sort((a, b) => a.startsAt.getTime() - b.startsAt.getTime());
    const next = (i: number) => own[i + 1]?.startsAt ?? bookings.filter((b) => b.code === item.code && !b.cancelled && b.startsAt > demoToday)[0]?.startsAt;
    let state: VesselState = 'ready';
    let at = cal.at('2026-08-29T15:00:00Z');
    const push = (to: VesselState, when: Date, reason: string) => {
      changes.push({ equipment_id: id, from_state: state, to_state: to, reason, actor_id: actor(), at: when });
      state = to;
      at = when;
    };
    const override = fermenterPlan[item.code]?.final;
    own.forEach((b, i) => {
      const filled =
        item.kind === 'keg'
          ? `Filled from ${b.filledFrom ?? 'a fermenter'}; headspace purged, lid and posts leak-checked`
          : item.kind === 'tap'
            ? 'Keg connected; line balanced'
            : 'Filled with wort; airlock fitted';
      push('holding', b.startsAt, filled);
      if (b.endsAt > demoToday) return;
      push('needs_cleaning', b.endsAt, item.kind === 'keg' ? 'Returned empty' : item.kind === 'tap' ? 'Keg disconnected' : 'Emptied: beer transferred to kegs');
      const last = i === own.length - 1;
      if (last && (override === 'needs_cleaning' || (item.kind === 'keg' && demoToday.getTime() - b.endsAt.getTime() < 7 * DAY))) return;
      // Cleaning happens before the next user (or before today), never after it.
      const limit = Math.min(next(i)?.getTime() ?? demoToday.getTime(), demoToday.getTime());
      const cleanedAt = new Date(Math.min(b.endsAt.getTime() + (6 + Math.floor(random() * 48)) * HOUR, limit - 8 * HOUR));
      if (cleanedAt <= b.endsAt) return;
      push('cleaned', cleanedAt, item.kind === 'tap' ? 'Line flushed with alkaline line cleaner and rinsed' : 'Soaked in alkaline cleaner and rinsed');
      if (last && override === 'cleaned') return;
      const readyAt = new Date(Math.min(cleanedAt.getTime() + (2 + Math.floor(random() * 30)) * HOUR, limit - 2 * HOUR));
      if (readyAt <= cleanedAt) return;
      push('ready', readyAt, item.kind === 'tap' ? 'Line sanitized with acid sanitizer' : 'Sanitized with acid sanitizer and purged with CO2');
    });
    const oos = outOfService[item.code];
    if (oos) push('out_of_service', new Date(Math.max(oos.at.getTime(), at.getTime() + HOUR)), oos.reason);
    finalState.set(id, { state, at });
  }
  for (const [code, oos] of Object.entries(outOfService)) {
    if (!code.startsWith('C-')) continue;
    const id = equipmentId(code);
    changes.push({ equipment_id: id, from_state: 'ready', to_state: 'out_of_service', reason: oos.reason, actor_id: actor(), at: oos.at });
    finalState.set(id, { state: 'out_of_service', at: oos.at });
  }
  await insertInChunks(db, 'equipment_state_change', changes, { size: 200 });
  for (const [id, s] of finalState) {
    await db.updateTable('equipment').set({ state: s.state, state_changed_at: s.at, updated_at: s.at }).where('id', '=', id).execute();
  }
}
