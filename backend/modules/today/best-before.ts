import { bestBeforeState } from '../../../shared/cellar/trace.ts';
import type { TodayBestBefore } from '../../../shared/schemas/today.ts';
import type { Database } from '../../db/database.ts';
import { loadShelfLifeSettings } from '../batches/shelf-life.ts';
import { bestBeforeRows } from './today.repository.ts';

const DAY = 86_400_000;

/**
 * Kegs still holding beer whose best-before is past or within the co-op's warning days
 * (Settings, shelf life: 7 by default), soonest first; `memberId` limits it to kegs that member has out.
 */
export async function bestBeforeKegs(db: Database, now: Date, o: { memberId?: string; showOwners: boolean; limit?: number }): Promise<TodayBestBefore> {
  const { nearDays } = await loadShelfLifeSettings(db);
  const until = new Date(now.getTime() + nearDays * DAY);
  const { total, items } = await bestBeforeRows(db, until, { memberId: o.memberId, limit: o.limit ?? 10 });
  return {
    total: Number(total),
    nearDays,
    items: items.map((r) => ({
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
