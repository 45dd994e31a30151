import type { Database } from '../../db/database.ts';

/**
 * Keg fills with the keg filled and where that keg is now: `kf` the fill, `e` the keg, `kw` its
 * whereabouts, `tap` the tap it is on and `m` the member holding it (read them with
 * `kegWhereaboutsColumns`). The trace and the best-before list start from it.
 */
export function kegFillsWithWhereabouts(db: Database) {
  return db
    .selectFrom('keg_fill as kf')
    .innerJoin('equipment as e', 'e.id', 'kf.keg_id')
    .leftJoin('keg_whereabouts as kw', 'kw.keg_id', 'kf.keg_id')
    .leftJoin('equipment as tap', 'tap.id', 'kw.tap_id')
    .leftJoin('app_user as m', 'm.id', 'kw.member_id');
}
