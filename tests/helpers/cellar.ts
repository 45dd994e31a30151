import { createBatch, createFermenter, createKeg, createMember, cycleSteps, DAY, MINUTE } from '../../db/factories/index.ts';
import type { ApiClient, TestContext } from './context.ts';

/**
 * Helpers shared by the cellar operations tests: ready kegs, a batch in a fermenter, the transfer
 * checklist. The kegs and batches are made with the factories (db/factories), dated from the
 * test's clock, so they work on the fixture template whatever the machine's date.
 */

/** The four steps of a cycle that meets the co-op's default rules, finishing `endMinutesAgo` before `now` (the test's clock). */
export function completeSteps(now: Date, endMinutesAgo = 30) {
  return cycleSteps(new Date(now.getTime() - endMinutesAgo * MINUTE));
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

/** New empty kegs in the cellar (19 L, needing cleaning, no fill), made for the caller each time. */
export function kegPool(ctx: TestContext) {
  return async function takeKegs(n: number): Promise<{ id: string; code: string }[]> {
    const kegs: { id: string; code: string }[] = [];
    for (let i = 0; i < n; i++) {
      const keg = await createKeg(ctx.db);
      kegs.push({ id: keg.id, code: keg.code });
    }
    return kegs;
  };
}

/** The server's "now" (its clock), as the Today screen reports it. */
async function serverNow(client: ApiClient): Promise<Date> {
  const res = await client.get('/api/today');
  if (res.status !== 200 || !res.body.generatedAt) throw new Error(`no server time: ${res.status}`);
  return new Date(res.body.generatedAt);
}

/** Makes kegs ready through the API, as the brewer on duty would, with a cycle finished half an hour before `now` (default: the server's clock). */
export async function makeReady(brewer: ApiClient, ids: string[], now?: Date) {
  const at = now ?? (await serverNow(brewer));
  for (const id of ids) {
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: id, steps: completeSteps(at) });
    if (res.status !== 201 || res.body.cycle.outcome !== 'ready') throw new Error(`could not ready ${id}: ${res.status} ${JSON.stringify(res.body)}`);
  }
}

/**
 * A batch still in its fermenter, made for the caller each time: a new member's 50 L pale ale,
 * fermenting for ten days before the test's now and nearly done (OG 1.052, last readings 1.011),
 * in a new 60 L fermenter booked for it (holding).
 */
export function batchPool(ctx: TestContext) {
  return async function takeBatch(): Promise<{ batchId: string; name: string; fermenterId: string; fermenterCode: string; volume: number; ownerId: string }> {
    const now = ctx.clock.now().getTime();
    const t = (days: number) => new Date(now + days * DAY);
    const owner = await createMember(ctx.db);
    const fermenter = await createFermenter(ctx.db, { capacityLiters: 60 });
    const batch = await createBatch(ctx.db, {
      ownerId: owner.id,
      style: 'Pale ale',
      volumeLiters: 50,
      readings: [
        { takenAt: t(-10), value: 1.052 },
        { takenAt: t(-6), value: 1.02 },
        { takenAt: t(-3), value: 1.012 },
        { takenAt: t(-2), value: 1.011 },
        { takenAt: t(-1), value: 1.011 },
      ],
      fermenter: { equipmentId: fermenter.id, startsAt: t(-11), endsAt: t(10), now: t(0) },
    });
    return { batchId: batch.id, name: batch.name, fermenterId: fermenter.id, fermenterCode: fermenter.code, volume: Number(batch.volume_liters), ownerId: owner.id };
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
