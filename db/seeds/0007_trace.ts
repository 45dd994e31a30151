import { sql } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import { bestBeforeFrom, defaultShelfLifeSettings, shelfLifeDays } from '../../shared/cellar/trace.ts';
import { userId } from './0001_users.ts';
import type { DemoCalendar } from './demo-calendar.ts';

/**
 * Trace and recall in the demo: every batch notes its allergens (gluten from barley, and wheat,
 * oats or lactose where its style says so), every keg fill gets the best-before the co-op's shelf
 * life gives it, and one batch fined with gelatin has a keg out with the demo member and another on
 * a tap, near its best-before (a short shelf life of its own), so that Today, the keg, the tap
 * board and the trace show them.
 */

const HOUR = 3600_000;
const DAY = 24 * HOUR;

function allergensFor(style: string): string[] {
  const s = style.toLowerCase();
  const out = ['gluten (barley)'];
  if (/wheat|weiss|weizen|wit|hefe/.test(s)) out.push('gluten (wheat)');
  if (/oat/.test(s)) out.push('gluten (oats)');
  if (/milk|sweet stout|lactose|cream/.test(s)) out.push('lactose (milk)');
  return out;
}

export async function seed(db: Database, cal: DemoCalendar): Promise<void> {
  const now = cal.now;
  const batches = await db.selectFrom('batch').select(['id', 'style', 'owner_id']).orderBy('id').execute();
  for (const b of batches)
    await db
      .updateTable('batch')
      .set({ allergens: allergensFor(b.style) })
      .where('id', '=', b.id)
      .execute();

  // The gelatin batch: a transfer whose kegs still hold its beer, the demo member's if there is one.
  const open = await db
    .selectFrom('keg_fill as kf')
    .innerJoin('transfer as t', 't.id', 'kf.transfer_id')
    .innerJoin('batch as b', 'b.id', 'kf.batch_id')
    .leftJoin('keg_whereabouts as kw', 'kw.keg_id', 'kf.keg_id')
    .innerJoin('equipment as e', 'e.id', 'kf.keg_id')
    .select([
      'kf.id',
      'kf.keg_id',
      'kf.filled_at',
      'kf.transfer_id',
      'b.id as batch_id',
      'b.owner_id',
      't.finings_kind',
      'kw.whereabouts',
      'kw.tap_id',
      'kw.member_id',
      'kw.since',
      'e.state',
    ])
    .where('kf.emptied_at', 'is', null)
    .where('e.state', '=', 'holding')
    .orderBy('kf.transfer_id')
    .orderBy('e.code')
    .execute();
  const byTransfer = new Map<string, typeof open>();
  for (const f of open) byTransfer.set(f.transfer_id!, [...(byTransfer.get(f.transfer_id!) ?? []), f]);
  const demoMember = userId('member');
  const score = (fills: typeof open) =>
    (fills.length >= 2 ? 8 : 0) +
    (fills.some((f) => f.tap_id) ? 4 : 0) +
    (fills.some((f) => f.member_id === demoMember) ? 4 : fills.some((f) => f.member_id) ? 2 : 0) +
    (fills[0]!.owner_id === demoMember ? 2 : 0) +
    (fills[0]!.finings_kind === 'gelatin' ? 1 : 0);
  const chosen = [...byTransfer.values()].sort((a, b) => score(b) - score(a))[0];

  let chosenBatch: string | null;
  if (chosen) {
    const t = await db
      .selectFrom('transfer')
      .select(['id', 'packaged_liters', 'finings_kind'])
      .where('id', '=', chosen[0]!.transfer_id!)
      .executeTakeFirstOrThrow();
    chosenBatch = chosen[0]!.batch_id;
    if (t.finings_kind !== 'gelatin') {
      await db
        .updateTable('transfer')
        .set({ finings_kind: 'gelatin', finings_amount: Math.max(0.1, Math.round(Number(t.packaged_liters) * 0.15 * 10) / 10), finings_unit: 'g' })
        .where('id', '=', t.id)
        .execute();
    }
    // After the fill and after each keg's last move, and before the demo's now.
    const latest = Math.max(new Date(chosen[0]!.filled_at).getTime() + HOUR, ...chosen.map((f) => (f.since ? new Date(f.since).getTime() + 10 * 60_000 : 0)));
    const moveAt = new Date(Math.min(now.getTime() - 10 * 60_000, Math.max(now.getTime() - 3 * HOUR, latest)));
    const spare = () => chosen.find((f) => !f.tap_id && !f.member_id && f.whereabouts !== 'missing');
    // One keg out with the demo member, if none of its kegs is out with anyone.
    if (!chosen.some((f) => f.member_id)) {
      const f = chosen.length >= 2 || !chosen.some((x) => x.tap_id) ? spare() : undefined;
      if (f) {
        const due = new Date(now.getTime() + 14 * DAY);
        await db
          .updateTable('keg_whereabouts')
          .set({ whereabouts: 'with_member', tap_id: null, member_id: demoMember, checked_out_at: moveAt, due_at: due, since: moveAt })
          .where('keg_id', '=', f.keg_id)
          .execute();
        await db
          .insertInto('keg_movement')
          .values({
            keg_id: f.keg_id,
            action: 'checked_out',
            from_whereabouts: f.whereabouts ?? 'cellar',
            to_whereabouts: 'with_member',
            member_id: demoMember,
            due_at: due,
            note: 'For a tasting at home',
            at: moveAt,
          })
          .execute();
        f.member_id = demoMember;
      }
    }
    // One keg on a free tap, if none of its kegs is on one.
    if (!chosen.some((f) => f.tap_id)) {
      const f = spare();
      const tap = await db
        .selectFrom('equipment as tap')
        .select(['tap.id', 'tap.state'])
        .where('tap.kind', '=', 'tap')
        .where('tap.state', '<>', 'out_of_service')
        .where((eb) => eb.not(eb.exists(eb.selectFrom('keg_whereabouts as kw').select('kw.keg_id').whereRef('kw.tap_id', '=', 'tap.id'))))
        .orderBy('tap.code')
        .executeTakeFirst();
      if (f && tap) {
        await db
          .insertInto('keg_whereabouts')
          .values({ keg_id: f.keg_id, whereabouts: 'cold_room', tap_id: tap.id, member_id: null, checked_out_at: null, due_at: null, since: moveAt })
          .onConflict((oc) =>
            oc.column('keg_id').doUpdateSet({ whereabouts: 'cold_room', tap_id: tap.id, member_id: null, checked_out_at: null, due_at: null, since: moveAt }),
          )
          .execute();
        await db
          .insertInto('keg_movement')
          .values({ keg_id: f.keg_id, action: 'tapped', from_whereabouts: f.whereabouts ?? 'cellar', to_whereabouts: 'cold_room', tap_id: tap.id, at: moveAt })
          .execute();
        if (tap.state !== 'holding') {
          await db.updateTable('equipment').set({ state: 'holding', state_changed_at: moveAt }).where('id', '=', tap.id).execute();
          await db
            .insertInto('equipment_state_change')
            .values({ equipment_id: tap.id, from_state: tap.state, to_state: 'holding', reason: 'Keg connected', at: moveAt })
            .execute();
        }
        f.tap_id = tap.id;
      }
    }
    // A short shelf life of its own (a light, delicate beer), so its kegs are near best-before today.
    const filledAgoDays = Math.ceil((now.getTime() - new Date(chosen[0]!.filled_at).getTime()) / DAY);
    await db
      .updateTable('batch')
      .set({ shelf_life_days: filledAgoDays + 4 })
      .where('id', '=', chosenBatch)
      .execute();
  }

  // Best-before on every fill, as a fill made today would get it.
  const rows = await db
    .selectFrom('keg_fill as kf')
    .innerJoin('batch as b', 'b.id', 'kf.batch_id')
    .select(['kf.id', 'kf.filled_at', 'b.style', 'b.shelf_life_days'])
    .execute();
  for (const r of rows) {
    const days = shelfLifeDays({ style: r.style, shelfLifeDays: r.shelf_life_days }, defaultShelfLifeSettings).days;
    await db
      .updateTable('keg_fill')
      .set({ best_before: bestBeforeFrom(new Date(r.filled_at), days) })
      .where('id', '=', r.id)
      .execute();
  }
  await sql`analyze batch, keg_fill`.execute(db);
}
