import type { Clock } from '../../backend/lib/clock.ts';
import { createBatch, createBooking, createFermenter, createKeg, createSanitationCycle, cycleSteps, DAY, HOUR, MINUTE } from '../../db/factories/index.ts';
import { fixtureEquipmentId, fixtureUserId } from '../../db/fixtures/index.ts';
import type { ApiClient, TestContext } from './context.ts';
import { rowCounts } from './counts.ts';

/**
 * Helpers shared by the cellar operations tests: ready kegs, a batch in a fermenter, the transfer
 * checklist. The kegs and batches are made with the factories (db/factories), dated from the
 * test's clock, so they work on the fixture template whatever the machine's date.
 */

/** An instant, or the clock to read it from (a test context's `ctx.clock`). */
export type NowSource = Date | Clock;
const nowOf = (at: NowSource): Date => (at instanceof Date ? at : at.now());

/** An ISO time `m` minutes before `now` (a Date, or the test's clock read now). */
export const minutesAgo = (now: NowSource, m: number) => new Date(nowOf(now).getTime() - m * MINUTE).toISOString();

/** The four steps of a cycle that meets the co-op's default rules, finishing `endMinutesAgo` before `now` (the test's clock). */
export function completeSteps(now: NowSource, endMinutesAgo = 30) {
  return cycleSteps(minutesAgo(now, endMinutesAgo));
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

/** New empty kegs in the cellar (19 L, needing cleaning, no cycle, no fill), made for the caller each time. */
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

/**
 * Makes kegs ready through the API, as the brewer on duty would, with a cycle finished half an
 * hour before `now` (a Date or the test's clock; default: the server's clock).
 */
export async function makeReady(brewer: ApiClient, ids: string[], now?: NowSource) {
  for (const id of ids) {
    const at = now === undefined ? await serverNow(brewer) : nowOf(now);
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: id, steps: completeSteps(at) });
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
 * A batch still in its fermenter, made for the caller each time, dated from the test's clock: a
 * member's (a new one unless `ownerId` is given) 50 L pale ale, in a new 60 L fermenter sanitized
 * the hour before it was filled 15 days ago and booked for it until a week ahead (holding), with
 * readings from OG 1.052 (14 days ago) down to a steady 1.011 (4 days and 1 day ago: stable by the co-op's default rule).
 */
export function batchPool(ctx: TestContext) {
  return async function takeBatch(o: { ownerId?: string; volumeLiters?: number; capacityLiters?: number } = {}): Promise<PooledBatch> {
    const now = ctx.clock.now().getTime();
    const t = (days: number) => new Date(now + days * DAY);
    const fermenter = await createFermenter(ctx.db, { capacityLiters: o.capacityLiters ?? 60 });
    await createSanitationCycle(ctx.db, { equipmentId: fermenter.id, readyAt: new Date(t(-15).getTime() - HOUR) });
    const batch = await createBatch(ctx.db, {
      ...(o.ownerId ? { ownerId: o.ownerId } : {}),
      style: 'Pale ale',
      volumeLiters: o.volumeLiters ?? 50,
      readings: [
        { takenAt: t(-14), value: 1.052 },
        { takenAt: t(-7), value: 1.014 },
        { takenAt: t(-4), value: 1.011 },
        { takenAt: t(-1), value: 1.011 },
      ],
      fermenter: { equipmentId: fermenter.id, startsAt: t(-15), endsAt: t(7), now: t(0) },
    });
    return {
      batchId: batch.id,
      name: batch.name,
      fermenterId: fermenter.id,
      fermenterCode: fermenter.code,
      volume: Number(batch.volume_liters),
      ownerId: batch.owner_id,
    };
  };
}

/** New kegs, made ready through the API by `brewer` (a cycle finished half an hour before the test's clock), made for the caller each time. */
export function readyKegPool(ctx: TestContext, brewer: ApiClient) {
  const takeKegs = kegPool(ctx);
  return async function takeReadyKegs(n: number): Promise<{ id: string; code: string }[]> {
    const kegs = await takeKegs(n);
    await makeReady(
      brewer,
      kegs.map((k) => k.id),
      ctx.clock,
    );
    return kegs;
  };
}

/** The body of a transfer of `batch` from its fermenter into `kegs`, 19 L a keg with the full checklist; `extra` adds or replaces fields. */
export function transferBody(batch: PooledBatch, kegs: { id: string }[], extra: Record<string, unknown> = {}) {
  return {
    batchId: batch.batchId,
    fromEquipmentId: batch.fermenterId,
    toKegIds: kegs.map((k) => k.id),
    volumeLiters: 19 * kegs.length,
    checklist: fullChecklist,
    ...extra,
  };
}

/** Transfers `batch` into `kegs` through the API (see transferBody); throws unless the transfer was made, else gives it. */
export async function transferInto(brewer: ApiClient, batch: PooledBatch, kegs: { id: string }[], extra: Record<string, unknown> = {}) {
  const res = await brewer.post('/api/transfers', transferBody(batch, kegs, extra));
  if (res.status !== 201) throw new Error(`transfer refused: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.transfer as { id: string; transferredAt: string } & Record<string, unknown>;
}

/** `n` new kegs made ready and filled from `batch` through the API (see transferBody): the kegs and the transfer. */
export async function fillNewKegs(ctx: TestContext, brewer: ApiClient, batch: PooledBatch, n: number, extra: Record<string, unknown> = {}) {
  const kegs = await readyKegPool(ctx, brewer)(n);
  const transfer = await transferInto(brewer, batch, kegs, extra);
  return { kegs, transfer };
}

/** How many rows a table holds (tests/helpers/counts.ts). */
export { countRows as count } from './counts.ts';

export async function states(ctx: TestContext, ids: string[]) {
  const rows = await ctx.db.selectFrom('equipment').select(['id', 'state']).where('id', 'in', ids).execute();
  return Object.fromEntries(rows.map((r) => [r.id, r.state]));
}

/** Everything a transfer may touch, to show that a refused one changed nothing. */
export async function transferSnapshot(ctx: TestContext, batchId: string, vesselIds: string[]) {
  const batch = await ctx.db.selectFrom('batch').select(['status', 'packaged_at', 'packaged_liters']).where('id', '=', batchId).executeTakeFirstOrThrow();
  const audits = await ctx.db
    .selectFrom('audit_log')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('subject_type', '=', 'Transfer')
    .executeTakeFirstOrThrow();
  return { ...(await rowCounts(ctx, ['transfer', 'keg_fill', 'equipment_state_change'])), states: await states(ctx, vesselIds), batch, audits: audits.n };
}

/** Gravity readings on days before (negative) or after now: `readingsOn(at, [-10, 1.05], [-1, 1.011])`. */
export function readingsOn<T>(at: (offsetMs: number) => T, ...days: [number, number][]): { takenAt: T; value: number }[] {
  return days.map(([day, value]) => ({ takenAt: at(day * DAY), value }));
}

/** A booking of a fixture vessel by a fixture account, from `fromDay` to `toDay` days after the test clock's now. */
export function bookFixture(ctx: TestContext, code: string, owner: string, fromDay: number, toDay: number, extra: { notes?: string } = {}) {
  const now = ctx.clock.now();
  const at = (days: number) => new Date(now.getTime() + days * DAY);
  return createBooking(ctx.db, {
    equipmentId: fixtureEquipmentId(code),
    ownerId: fixtureUserId(owner),
    startsAt: at(fromDay),
    endsAt: at(toDay),
    now,
    ...extra,
  });
}
