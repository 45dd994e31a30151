import { sql } from 'kysely';
import { bestBeforeState } from '../../../shared/cellar/trace.ts';
import type { TodayBestBefore } from '../../../shared/schemas/today.ts';
import type { Database } from '../../db/database.ts';
import { loadShelfLifeSettings } from '../batches/shelf-life.ts';

const DAY = 86_400_000;

/**
 * Kegs still holding beer whose best-before is past or within the co-op's warning days
 * (Settings, shelf life: 7 by default), soonest first; `memberId` limits it to kegs that member has out.
 */
export async function bestBeforeKegs(db: Database, now: Date, o: { memberId?: string; showOwners: boolean; limit?: number }): Promise<TodayBestBefore> {
  const { nearDays } = await loadShelfLifeSettings(db);
  const until = new Date(now.getTime() + nearDays * DAY);
  let base = db
    .selectFrom('keg_fill as kf')
    .innerJoin('equipment as e', 'e.id', 'kf.keg_id')
    .innerJoin('batch as b', 'b.id', 'kf.batch_id')
    .leftJoin('keg_whereabouts as kw', 'kw.keg_id', 'kf.keg_id')
    .leftJoin('equipment as tap', 'tap.id', 'kw.tap_id')
    .leftJoin('app_user as m', 'm.id', 'kw.member_id')
    .where('kf.emptied_at', 'is', null)
    .where('kf.best_before', '<=', until);
  if (o.memberId) base = base.where('kw.member_id', '=', o.memberId).where('kw.whereabouts', '=', 'with_member');
  const [{ n }, rows] = await Promise.all([
    base.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    base
      .select([
        'e.id',
        'e.code',
        'b.id as batch_id',
        'b.name as batch_name',
        'kf.best_before',
        sql<string>`coalesce(kw.whereabouts, 'cellar')`.as('whereabouts'),
        'tap.code as tap_code',
        'm.name as member_name',
      ])
      .orderBy('kf.best_before')
      .orderBy('e.code')
      .limit(o.limit ?? 10)
      .execute(),
  ]);
  return {
    total: Number(n),
    nearDays,
    items: rows.map((r) => ({
      kegId: r.id,
      code: r.code,
      batchId: r.batch_id,
      batchName: r.batch_name,
      bestBefore: new Date(r.best_before!).toISOString(),
      state: bestBeforeState(r.best_before!, now, nearDays) === 'past' ? 'past' : 'near',
      whereabouts: r.whereabouts,
      tapCode: r.tap_code ?? null,
      memberName: o.showOwners ? (r.member_name ?? null) : null,
    })),
  };
}
