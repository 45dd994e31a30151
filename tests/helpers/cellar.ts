import type { Clock } from '../../backend/lib/clock.ts';
import { createBatch, createFermenter, createKeg, createSanitationCycle, DAY, HOUR } from '../../db/factories/index.ts';
import type { ApiClient, TestContext } from './context.ts';

/** Helpers shared by the cellar operations tests: ready kegs, a batch in a fermenter, the transfer checklist. */

/** An ISO time `m` minutes before the test clock's now. */
export const minutesAgo = (clock: Clock, m: number) => new Date(clock.now().getTime() - m * 60_000).toISOString();

/** The four steps of a cycle that meets the co-op's default rules, finishing `endMinutesAgo` before the clock's now. */
export function completeSteps(clock: Clock, endMinutesAgo = 30) {
  const s = endMinutesAgo + 80;
  return [
    { step: 'clean', chemical: 'alkaline-cleaner', concentration: 1.5, contactMinutes: 60, at: minutesAgo(clock, s) },
    { step: 'rinse', at: minutesAgo(clock, s - 65) },
    { step: 'sanitize', chemical: 'acid-sanitizer', concentration: 1.6, contactMinutes: 2, at: minutesAgo(clock, s - 75) },
    { step: 'purge', contactMinutes: 0.5, at: minutesAgo(clock, endMinutesAgo) },
  ];
}

export const fullChecklist = {
  drawMethod: 'bottom_valve',
  kegsSanitizedAndPurged: true,
  airlockRemoved: true,
  tubeToKegBottom: true,
  fittingsTight: true,
  finingsAdded: true,
  headspacePurged: true,
  lidSealed: true,
  gasInPostIdentified: true,
  leakChecked: true,
} as const;

/**
 * New kegs for a test: empty 19 L kegs in the cellar needing cleaning (no cycle on record), made
 * with the factories on each call, so no two tests ever share one.
 */
export function kegPool(ctx: TestContext) {
  return async function takeKegs(n: number): Promise<{ id: string; code: string }[]> {
    const kegs: { id: string; code: string }[] = [];
    for (let i = 0; i < n; i++) {
      const k = await createKeg(ctx.db);
      kegs.push({ id: k.id, code: k.code });
    }
    return kegs;
  };
}

/** Makes kegs ready through the API, as the brewer on duty would, finishing half an hour before the test clock's now. */
export async function makeReady(brewer: ApiClient, ids: string[], clock: Clock) {
  for (const id of ids) {
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: id, steps: completeSteps(clock) });
    if (res.status !== 201 || res.body.cycle.outcome !== 'ready') throw new Error(`could not ready ${id}: ${res.status} ${JSON.stringify(res.body)}`);
  }
}

export interface PooledBatch {
  batchId: string;
  name: string;
  fermenterId: string;
  fermenterCode: string;
  volume: number;
  ownerId: string;
}

/**
 * A new batch fermenting in a new fermenter on each call, dated from the test clock: a member's
 * (a new one unless `ownerId` is given) 50 L batch in a 60 L fermenter, sanitized the hour before, booked from 15 days ago to a
 * week ahead, with readings from OG 1.052 (14 days ago) down to a steady 1.011 (3 days and 1 day ago).
 */
export function batchPool(ctx: TestContext) {
  return async function takeBatch(o: { ownerId?: string; volumeLiters?: number; capacityLiters?: number } = {}): Promise<PooledBatch> {
    const now = ctx.clock.now().getTime();
    const at = (days: number) => new Date(now + days * DAY);
    const fermenter = await createFermenter(ctx.db, { capacityLiters: o.capacityLiters ?? 60 });
    // Cleaned and sanitized the hour before the wort went in.
    await createSanitationCycle(ctx.db, { equipmentId: fermenter.id, readyAt: new Date(at(-15).getTime() - HOUR) });
    const batch = await createBatch(ctx.db, {
      ...(o.ownerId ? { ownerId: o.ownerId } : {}),
      volumeLiters: o.volumeLiters ?? 50,
      readings: [
        { takenAt: at(-14), value: 1.052 },
        { takenAt: at(-7), value: 1.014 },
        { takenAt: at(-3), value: 1.011 },
        { takenAt: at(-1), value: 1.011 },
      ],
      fermenter: { equipmentId: fermenter.id, startsAt: at(-15), endsAt: at(7), now: at(0) },
    });
    return { batchId: batch.id, name: batch.name, fermenterId: fermenter.id, fermenterCode: fermenter.code, volume: Number(batch.volume_liters), ownerId: batch.owner_id };
  };
}

export async function count(ctx: TestContext, table: 'transfer' | 'keg_fill' | 'sanitation_cycle' | 'keg_movement' | 'carbonation_plan') {
  const r = await ctx.db.selectFrom(table).select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow();
  return r.n;
}

export async function states(ctx: TestContext, ids: string[]) {
  const rows = await ctx.db.selectFrom('equipment').select(['id', 'state']).where('id', 'in', ids).execute();
  return Object.fromEntries(rows.map((r) => [r.id, r.state]));
}
