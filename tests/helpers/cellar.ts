import type { ApiClient, TestContext } from './context.ts';

/** Helpers shared by the cellar operations tests: ready kegs, a batch in a fermenter, the transfer checklist. */

const minutesAgo = (m: number) => new Date(Date.now() - m * 60_000).toISOString();

/** The four steps of a cycle that meets the co-op's default rules, finishing `endMinutesAgo` ago. */
export function completeSteps(endMinutesAgo = 30) {
  const s = endMinutesAgo + 80;
  return [
    { step: 'clean', chemical: 'alkaline-cleaner', concentration: 1.5, contactMinutes: 60, at: minutesAgo(s) },
    { step: 'rinse', at: minutesAgo(s - 65) },
    { step: 'sanitize', chemical: 'acid-sanitizer', concentration: 1.6, contactMinutes: 2, at: minutesAgo(s - 75) },
    { step: 'purge', contactMinutes: 0.5, at: minutesAgo(endMinutesAgo) },
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

/** Empty, in-service kegs in the cellar with no open fill, not yet used by this test file. */
export function kegPool(ctx: TestContext) {
  const used = new Set<string>();
  return async function takeKegs(n: number): Promise<{ id: string; code: string }[]> {
    const rows = await ctx.db
      .selectFrom('equipment as e')
      .leftJoin('keg_whereabouts as kw', 'kw.keg_id', 'e.id')
      .select(['e.id', 'e.code'])
      .where('e.kind', '=', 'keg')
      .where('e.state', 'in', ['needs_cleaning', 'cleaned', 'ready'])
      .where((eb) => eb.or([eb('kw.whereabouts', 'is', null), eb('kw.whereabouts', '=', 'cellar')]))
      .where((eb) => eb.not(eb.exists(eb.selectFrom('keg_fill as kf').select('kf.id').whereRef('kf.keg_id', '=', 'e.id').where('kf.emptied_at', 'is', null))))
      .orderBy('e.code')
      .execute();
    const free = rows.filter((r) => !used.has(r.id)).slice(0, n);
    if (free.length < n) throw new Error(`only ${free.length} spare kegs`);
    for (const k of free) used.add(k.id);
    return free;
  };
}

/** Makes kegs ready through the API, as the brewer on duty would. */
export async function makeReady(brewer: ApiClient, ids: string[]) {
  for (const id of ids) {
    const res = await brewer.post('/api/sanitation-cycles', { equipmentId: id, steps: completeSteps() });
    if (res.status !== 201 || res.body.cycle.outcome !== 'ready') throw new Error(`could not ready ${id}: ${res.status} ${JSON.stringify(res.body)}`);
  }
}

/** Seeded batches still in a fermenter (fermenting or conditioning), with that fermenter, not yet used by this file. */
export function batchPool(ctx: TestContext) {
  const used = new Set<string>();
  return async function takeBatch(): Promise<{ batchId: string; name: string; fermenterId: string; fermenterCode: string; volume: number; ownerId: string }> {
    const rows = await ctx.db
      .selectFrom('batch as b')
      .innerJoin('booking as bk', 'bk.batch_id', 'b.id')
      .innerJoin('equipment as f', 'f.id', 'bk.equipment_id')
      .select(['b.id as batchId', 'b.name', 'f.id as fermenterId', 'f.code as fermenterCode', 'b.volume_liters as volume', 'b.owner_id as ownerId'])
      .where('b.status', 'in', ['fermenting', 'conditioning'])
      .where('f.kind', '=', 'fermenter')
      .where('f.state', '<>', 'out_of_service')
      .where((eb) => eb.exists(eb.selectFrom('reading as r').select('r.id').whereRef('r.batch_id', '=', 'b.id')))
      .orderBy('f.code')
      .execute();
    const row = rows.find((r) => !used.has(r.batchId));
    if (!row) throw new Error('no seeded batch in a fermenter left');
    used.add(row.batchId);
    return { ...row, volume: Number(row.volume) };
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
