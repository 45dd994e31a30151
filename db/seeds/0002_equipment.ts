import { sql } from 'kysely';
import type { Database } from '../../backend/db/database.ts';
import type { EquipmentKind, VesselState } from '../../shared/schemas/equipment.ts';
import { userId } from './0001_users.ts';
import type { DemoCalendar } from './demo-calendar.ts';
import { rng, seedId } from './ids.ts';
import { insertInChunks } from './write.ts';

/** The stable id of a seeded item, by its label code (`F-07`, `K-031`, `T-3`, `C-1`). */
export const equipmentId = (code: string) => seedId('equipment', code);

export interface SeedEquipment {
  code: string;
  kind: EquipmentKind;
  name: string;
  capacityLiters: number | null;
  attributes: Record<string, unknown>;
  notes: string;
}

const pad = (n: number, width: number) => String(n).padStart(width, '0');

const fermenter = (code: string, name: string, capacityLiters: number, attributes: Record<string, unknown>, notes: string): SeedEquipment => ({
  code,
  kind: 'fermenter',
  name,
  capacityLiters,
  attributes,
  notes,
});

function fermenters(): SeedEquipment[] {
  const list: SeedEquipment[] = [];
  for (let i = 1; i <= 12; i++) {
    const code = `F-${pad(i, 2)}`;
    if (i <= 6) {
      const hasValve = i % 2 === 1;
      const notes = hasValve ? 'Spigot at the bottom; check the seal before filling.' : 'No valve: rack with a siphon.';
      list.push(fermenter(code, `30 L bucket fermenter ${i}`, 30, { style: 'bucket', hasValve }, notes));
    } else if (i <= 10) {
      list.push(fermenter(code, `60 L fermenter ${i - 6}`, 60, { style: 'bucket', hasValve: true }, 'Bottom valve and a lid with an airlock grommet.'));
    } else {
      const notes = 'Stainless conical with a dump valve and a racking arm. Pressure-capable lid: use its relief valve.';
      list.push(fermenter(code, `120 L conical ${i - 10}`, 120, { style: 'conical', hasValve: true }, notes));
    }
  }
  return list;
}

function kegs(): SeedEquipment[] {
  const list: SeedEquipment[] = [];
  for (let i = 1; i <= 60; i++) {
    const lock = i <= 40 ? 'ball' : 'pin';
    list.push({
      code: `K-${pad(i, 3)}`,
      kind: 'keg',
      name: `19 L ${lock} lock keg ${i}`,
      capacityLiters: 19,
      attributes: { serial: `LY19-${lock === 'ball' ? 'B' : 'P'}${pad(1000 + i * 7, 5)}`, lock },
      notes: '',
    });
  }
  return list;
}

function taps(): SeedEquipment[] {
  const list: SeedEquipment[] = [];
  // 3/16" vinyl balanced for the house ales (2.4 volumes at 3 °C, 0.6 m rise): about 1.75 m at the common-practice resistance.
  const lengths = [1.7, 1.7, 1.8, 1.8, 1.9, 1.9, 2.0, 2.0];
  for (let i = 1; i <= 8; i++) {
    list.push({
      code: `T-${i}`,
      kind: 'tap',
      name: `Tap position ${i}`,
      capacityLiters: null,
      attributes: {
        position: `Cold room, tap board ${i <= 4 ? 'left' : 'right'}, ${i}`,
        lineLengthM: lengths[i - 1],
        lineInsideDiameterMm: 4.8,
        riseM: 0.6,
        coldRoomTempC: 3,
      },
      notes: 'Cold room at 3 °C. CO2 displaces air in the closed cold room: keep the fan on and heed the CO2 alarm.',
    });
  }
  return list;
}

/** Cylinders' next hydrostatic tests as designed (the seed moves them with the demo's calendar): C-6's fell due a month ago. */
function cylinders(): SeedEquipment[] {
  const sizes = [6, 6, 6, 6, 10, 10];
  const fills = [100, 85, 60, 35, 100, 90];
  const due = ['2028-03-31', '2027-09-30', '2029-01-31', '2027-02-28', '2030-06-30', '2026-11-01'];
  return sizes.map((sizeKg, i) => ({
    code: `C-${i + 1}`,
    kind: 'co2_cylinder' as const,
    name: `${sizeKg} kg CO2 cylinder ${i + 1}`,
    capacityLiters: null,
    attributes: { sizeKg, fillPercent: fills[i], hydroTestDue: due[i] },
    notes: "Keep chained upright. Never exceed the regulator's rated pressure.",
  }));
}

export const seedEquipment: SeedEquipment[] = [...fermenters(), ...kegs(), ...taps(), ...cylinders()];

/** Whoever is on the brewers' rota made the seeded state changes. */
export const rota = [userId('brewer'), userId('member5'), userId('member10')];

/**
 * The co-op's equipment as it came into service in late August: every vessel registered, cleaned
 * and sanitized. The bookings seed then walks each item through three months of use.
 */
export async function seed(db: Database, cal: DemoCalendar): Promise<void> {
  const random = rng(2002);
  const registeredAt = cal.at('2026-08-15T09:00:00Z');
  const attributes = (e: SeedEquipment) =>
    e.kind === 'co2_cylinder' ? { ...e.attributes, hydroTestDue: cal.date(e.attributes.hydroTestDue as string) } : e.attributes;
  await db
    .insertInto('equipment')
    .values(
      seedEquipment.map((e) => ({
        id: equipmentId(e.code),
        code: e.code,
        kind: e.kind,
        name: e.name,
        capacity_liters: e.capacityLiters,
        state: 'ready',
        attributes: sql`${JSON.stringify(attributes(e))}::jsonb`,
        notes: e.notes,
        state_changed_at: cal.at('2026-08-29T15:00:00Z'),
        created_at: registeredAt,
        updated_at: registeredAt,
      })),
    )
    .onConflict((oc) => oc.doNothing())
    .execute();

  const changes: { equipment_id: string; from_state: VesselState | null; to_state: VesselState; reason: string; actor_id: string; at: Date }[] = [];
  for (const e of seedEquipment) {
    const id = equipmentId(e.code);
    const actor = () => rota[Math.floor(random() * rota.length)]!;
    const hour = (d: string, h: number) => cal.at(`${d}T${String(h).padStart(2, '0')}:00:00Z`);
    if (e.kind === 'co2_cylinder') {
      changes.push({
        equipment_id: id,
        from_state: null,
        to_state: 'ready',
        reason: 'Added to the registry, filled and leak-checked',
        actor_id: userId('admin'),
        at: registeredAt,
      });
      continue;
    }
    changes.push({
      equipment_id: id,
      from_state: null,
      to_state: 'needs_cleaning',
      reason: 'Added to the registry',
      actor_id: userId('admin'),
      at: registeredAt,
    });
    changes.push({
      equipment_id: id,
      from_state: 'needs_cleaning',
      to_state: 'cleaned',
      reason: e.kind === 'tap' ? 'Line flushed with alkaline line cleaner and rinsed' : 'Soaked in alkaline cleaner and rinsed',
      actor_id: actor(),
      at: hour('2026-08-28', 10 + Math.floor(random() * 6)),
    });
    changes.push({
      equipment_id: id,
      from_state: 'cleaned',
      to_state: 'ready',
      reason: e.kind === 'tap' ? 'Line sanitized with acid sanitizer' : 'Sanitized with acid sanitizer and purged with CO2',
      actor_id: actor(),
      at: cal.at('2026-08-29T15:00:00Z'),
    });
  }
  await insertInChunks(db, 'equipment_state_change', changes, { size: 200 });
}
