import { applyInspectionLapses } from '../../backend/modules/equipment/inspections.service.ts';
import { sql } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import type { InspectionKind } from '../../backend/db/tables/inspections.ts';
import { userId } from './0001_users.ts';
import { equipmentId, seedEquipment } from './0002_equipment.ts';
import type { DemoCalendar } from './demo-calendar.ts';

/** 130 psi, the rating stamped on the co-op's 19 L soda kegs (from memory: the usual figure for such kegs). */
const KEG_RATED_KPA = 896;

/**
 * The pressure-vessel records: every keg was pressure-tested, its relief valve checked and its seals
 * replaced when it came into service in August, and stamped with its rating. One idle keg's pressure
 * test (bought second-hand, tested two years before) fell due on 28 November, so it may not be filled
 * until it is tested again; one keg's seals are due within the fortnight. Each cylinder's last
 * hydrostatic test is on record five years before its registry test date (C-6's fell due on
 * 1 November). C-1 was put on the gas line on 20 November in place of C-4, which came off at 35 %.
 */
export async function seed(db: Database, cal: DemoCalendar): Promise<void> {
  const commissioned = cal.at('2026-08-20T10:00:00Z');
  const overdueAt = cal.at('2026-11-28T00:00:00Z');
  const admin = userId('admin');
  const brewer = userId('brewer');
  const kegs = seedEquipment.filter((e) => e.kind === 'keg');
  // An idle keg not filled since before its test fell due (the latest code that fits).
  const idle = await sql<{ id: string; code: string }>`
    select e.id, e.code from equipment e
    where e.kind = 'keg' and e.state <> 'holding'
      and not exists (select 1 from keg_fill f where f.keg_id = e.id and f.filled_at >= ${overdueAt})
    order by e.code desc limit 1`.execute(db);
  const overdueKeg = idle.rows[0]?.id;
  const soonKeg = equipmentId('K-012');

  const rows: {
    equipment_id: string;
    kind: InspectionKind;
    at: Date;
    passed: boolean;
    next_due_at: Date;
    note: string;
    recorded_by: string;
    created_at: Date;
  }[] = [];
  const months = (d: Date, n: number) => {
    const out = new Date(d);
    out.setUTCMonth(out.getUTCMonth() + n);
    return out;
  };
  for (const k of kegs) {
    const id = equipmentId(k.code);
    if (id === overdueKeg) {
      const at = cal.at('2024-11-28T00:00:00Z');
      rows.push({
        equipment_id: id,
        kind: 'pressure_test',
        at,
        passed: true,
        next_due_at: overdueAt,
        note: 'Tested by the seller before we bought it second-hand',
        recorded_by: admin,
        created_at: commissioned,
      });
    } else {
      rows.push({
        equipment_id: id,
        kind: 'pressure_test',
        at: commissioned,
        passed: true,
        next_due_at: months(commissioned, 24),
        note: 'Held at 60 psi for 10 minutes, no drop',
        recorded_by: admin,
        created_at: commissioned,
      });
    }
    rows.push({
      equipment_id: id,
      kind: 'relief_valve',
      at: commissioned,
      passed: true,
      next_due_at: months(commissioned, 12),
      note: 'Pulls and reseats',
      recorded_by: admin,
      created_at: commissioned,
    });
    const sealsDue = id === soonKeg ? cal.at('2026-12-10T00:00:00Z') : months(commissioned, 12);
    rows.push({
      equipment_id: id,
      kind: 'seals',
      at: id === soonKeg ? cal.at('2025-12-10T00:00:00Z') : commissioned,
      passed: true,
      next_due_at: sealsDue,
      note: 'Lid and post o-rings',
      recorded_by: admin,
      created_at: commissioned,
    });
  }
  for (const c of seedEquipment.filter((e) => e.kind === 'co2_cylinder')) {
    const due = cal.date(c.attributes.hydroTestDue as string);
    const dueAt = new Date(`${due}T00:00:00Z`);
    rows.push({
      equipment_id: equipmentId(c.code),
      kind: 'hydrostatic_test',
      at: months(dueAt, -60),
      passed: true,
      next_due_at: dueAt,
      note: 'Stamped by the test station',
      recorded_by: admin,
      created_at: commissioned,
    });
  }
  await db.insertInto('equipment_inspection').values(rows).execute();
  await sql`update equipment set attributes = attributes || jsonb_build_object('ratedPressureKpa', ${KEG_RATED_KPA}::int) where kind = 'keg'`.execute(db);

  // The gas line: C-4 came off at 35 %, C-1 (full) went on.
  const swapAt = cal.at('2026-11-20T09:00:00Z');
  await db
    .insertInto('co2_cylinder_supply')
    .values([
      { cylinder_id: equipmentId('C-4'), remaining_kg: 2.1, connected: false, connected_at: null, updated_at: swapAt },
      { cylinder_id: equipmentId('C-1'), remaining_kg: 6, connected: true, connected_at: swapAt, updated_at: swapAt },
    ])
    .execute();
  await db
    .insertInto('co2_cylinder_event')
    .values([
      { cylinder_id: equipmentId('C-4'), action: 'disconnected', remaining_kg: 2.1, note: 'Low: swapped for a full one', actor_id: brewer, at: swapAt },
      {
        cylinder_id: equipmentId('C-1'),
        action: 'connected',
        remaining_kg: 6,
        replaced_cylinder_id: equipmentId('C-4'),
        note: 'Leak-checked the fittings after the swap',
        actor_id: brewer,
        at: swapAt,
      },
    ])
    .execute();

  // The periodic pass has run: what is past due and idle is out of service, with its history row.
  await applyInspectionLapses(db, cal.now);
}
