import type { Database } from '../../backend/db/database.ts';
import { normaliseGravity, originalBrixOf, type GravityUnit } from '../../shared/brewing/readings.ts';
import { convertGravity, sgToPlato } from '../../shared/brewing/index.ts';
import { defaultFermentationSettings, type BatchStatus } from '../../shared/schemas/batches.ts';
import { userId } from './0001_users.ts';
import type { DemoCalendar } from './demo-calendar.ts';
import { rng, seedId } from './ids.ts';
import { insertInChunks } from './write.ts';

const HOUR = 3_600_000;
const DAY = 24 * HOUR;

export const batchSeedId = (key: string) => seedId('batch', key);

/** Invented recipes of the co-op's members: style, name, OG and the FG the yeast usually reaches. */
const recipes = [
  { style: 'Pale ale', name: 'Yard pale', og: 1.052, fg: 1.011 },
  { style: 'Porter', name: 'Lamplighter porter', og: 1.058, fg: 1.015 },
  { style: 'Saison', name: 'Hedgerow saison', og: 1.054, fg: 1.004 },
  { style: 'Best bitter', name: 'Gatepost bitter', og: 1.042, fg: 1.01 },
  { style: 'Oatmeal stout', name: 'Rook stout', og: 1.062, fg: 1.017 },
  { style: 'Pilsner', name: 'Lantern pils', og: 1.048, fg: 1.009 },
  { style: 'American IPA', name: 'Copper wire IPA', og: 1.064, fg: 1.012 },
  { style: 'Brown ale', name: 'Chestnut brown', og: 1.05, fg: 1.013 },
  { style: 'Wheat beer', name: 'Orchard wheat', og: 1.05, fg: 1.011 },
  { style: 'Red ale', name: 'Brick lane red', og: 1.056, fg: 1.014 },
  { style: 'Golden ale', name: 'Harvest gold', og: 1.045, fg: 1.009 },
  { style: 'Dry stout', name: 'Night shift stout', og: 1.044, fg: 1.01 },
  { style: 'Winter warmer', name: 'Hearthside warmer', og: 1.07, fg: 1.018 },
  { style: 'Amber lager', name: 'Ember lager', og: 1.052, fg: 1.012 },
];

interface SeedReading {
  taken_at: Date;
  gravity_sg: number;
  entered_value: number;
  entered_unit: GravityUnit;
  temperature_c: number | null;
  corrected: boolean;
  raw_sg: number | null;
  method: 'wort' | 'alcohol_corrected' | null;
  source: 'manual' | 'import';
  note: string;
  created_by: string;
}

const round = (v: number, d: number) => Math.round(v * 10 ** d) / 10 ** d;

/**
 * Batches of the demo co-op, one per fermenter booking of its last three months (linked to
 * that booking), with realistic gravity series: finished and packaged ones, ones still fermenting
 * or conditioning, one from a floating digital hydrometer every half hour, and one stuck well above
 * its target. Bookings still to come get planned batches.
 */
export async function seed(db: Database, cal: DemoCalendar): Promise<void> {
  const demoToday = cal.now;
  const random = rng(4004);
  const between = (lo: number, hi: number) => lo + random() * (hi - lo);
  const bookings = await db
    .selectFrom('booking')
    .innerJoin('equipment', 'equipment.id', 'booking.equipment_id')
    .select(['booking.id', 'booking.owner_id', 'booking.starts_at', 'booking.ends_at', 'booking.state', 'equipment.code', 'equipment.capacity_liters'])
    .where('equipment.kind', '=', 'fermenter')
    .where('booking.state', '<>', 'cancelled')
    .orderBy('booking.starts_at')
    .orderBy('equipment.code')
    .execute();
  if (bookings.length === 0) return;
  const brewers = [userId('brewer'), userId('member5'), userId('member10')];
  const settings = defaultFermentationSettings;

  // The one stuck batch, the digital hydrometer one and the refractometer one: chosen among those in the fermenter now.
  const inUse = bookings.filter((b) => b.state === 'in_use');
  const digitalId = (inUse.find((b) => b.owner_id === userId('member')) ?? inUse[0])?.id;
  const stuckId = inUse.find((b) => b.id !== digitalId && b.owner_id !== userId('member'))?.id;
  const refractometerIds = new Set(bookings.filter((_, i) => i % 5 === 2).map((b) => b.id));
  const platoOwners = new Set([userId('member4'), userId('member9')]);

  let recipeIndex = 0;
  for (const b of bookings) {
    const recipe = recipes[recipeIndex++ % recipes.length]!;
    const capacity = Number(b.capacity_liters ?? 30);
    const volume = capacity >= 120 ? 100 : capacity >= 60 ? 50 : 23;
    const id = batchSeedId(b.id);
    const brewedAt = new Date(b.starts_at.getTime() + 4 * HOUR);
    const planned = b.state === 'booked';
    const stuck = b.id === stuckId;
    const digital = b.id === digitalId;
    const og = round(recipe.og + between(-0.003, 0.003), 3);
    const fgTarget = recipe.fg;
    const fgReached = stuck ? 1.03 : round(fgTarget + between(-0.002, 0.002), 3);
    const k = between(0.35, 0.65); // per day
    const lag = between(0.4, 1.0); // days before the gravity starts to fall
    const gravityAt = (days: number) => (days < lag ? og : fgReached + (og - fgReached) * Math.exp(-k * (days - lag)));

    // Where the batch stands on the demo's today.
    let status: BatchStatus;
    let packagedAt: Date | null = null;
    let packagedLiters: number | null = null;
    const endReadings = planned ? brewedAt : new Date(Math.min(b.ends_at.getTime() - 12 * HOUR, demoToday.getTime() - 2 * HOUR));
    if (planned) status = 'planned';
    else if (b.state === 'finished') {
      status = 'packaged';
      packagedAt = new Date(b.ends_at.getTime() - 6 * HOUR);
      packagedLiters = round(volume - between(1.2, 3.5), 1);
    } else {
      const daysIn = (endReadings.getTime() - brewedAt.getTime()) / DAY;
      status = !stuck && daysIn > 12 ? 'conditioning' : 'fermenting';
    }

    const ownerId = b.owner_id;
    const readings: SeedReading[] = [];
    const addReading = (
      takenAt: Date,
      value: number,
      unit: GravityUnit,
      temperatureC: number | null,
      note: string,
      source: 'manual' | 'import',
      by: string,
    ) => {
      const first = readings[0];
      const firstInfo = first ? { enteredValue: first.entered_value, enteredUnit: first.entered_unit, sg: first.gravity_sg } : null;
      const g = normaliseGravity(value, unit, temperatureC, {
        calibrationC: settings.hydrometerCalibrationC,
        wortCorrectionFactor: settings.wortCorrectionFactor,
        originalBrix: first ? originalBrixOf(firstInfo, settings.wortCorrectionFactor) : null,
      });
      readings.push({
        taken_at: takenAt,
        gravity_sg: g.sg,
        entered_value: value,
        entered_unit: unit,
        temperature_c: temperatureC,
        corrected: g.corrected,
        raw_sg: g.rawSg,
        method: g.method,
        source,
        note,
        created_by: by,
      });
    };

    if (!planned) {
      const days = (endReadings.getTime() - brewedAt.getTime()) / DAY;
      if (digital) {
        // A floating digital hydrometer every 30 minutes: its own temperature compensation, a little noise.
        for (let t = 0; t <= days; t += 0.5 / 24) {
          const sg = round(gravityAt(t) + between(-0.0004, 0.0004), 4);
          const temp = round(19 + 1.6 * Math.exp(-((t - 2) ** 2) / 2) + between(-0.2, 0.2), 1);
          addReading(new Date(brewedAt.getTime() + t * DAY), sg, 'sg', temp, t === 0 ? 'Digital hydrometer floated at pitching' : '', 'import', ownerId);
        }
        // Its temperature compensation is built in: keep the values as exported.
        for (const r of readings) {
          r.gravity_sg = r.entered_value;
          r.corrected = false;
          r.raw_sg = null;
        }
      } else {
        // By hand: brew day, then every day or two, denser near the end to check stability.
        const times: number[] = [0];
        let t = between(0.8, 1.5);
        while (t < days) {
          times.push(t);
          t += t > days - 5 ? between(0.9, 1.1) : between(1.2, 2.6);
        }
        if (days - times[times.length - 1]! > 0.4) times.push(days);
        const plato = platoOwners.has(ownerId);
        const refractometer = refractometerIds.has(b.id);
        times.forEach((d, i) => {
          const at = new Date(brewedAt.getTime() + d * DAY + (i === 0 ? 0 : Math.round(between(-2, 2)) * HOUR));
          const temp = round(between(17.5, 22.5), 1);
          const sg = round(gravityAt(d), 3);
          const by = i > 0 && random() < 0.3 ? brewers[Math.floor(random() * brewers.length)]! : ownerId;
          let note = i === 0 ? 'Brew day: pitched the yeast' : '';
          if (stuck && d > 6 && note === '') note = i === times.length - 1 ? 'Still 1.030: roused the yeast and moved to a warmer spot' : '';
          if (i === 0 && refractometer) {
            // Refractometer on brew day: wort Brix that reads back as the OG.
            const brix = round(convertGravity(og, 'sg', 'brix') * settings.wortCorrectionFactor, 1);
            addReading(at, brix, 'brix', null, 'Brew day: refractometer on the wort', 'manual', by);
          } else if (plato) {
            addReading(at, round(sgToPlato(sg), 1), 'plato', temp, note, 'manual', by);
          } else {
            // What the hydrometer showed at the sample's temperature, so that the correction gives the gravity back.
            const shown = round(sg + (sg - normaliseGravity(sg, 'sg', temp).sg), 3);
            addReading(at, shown, 'sg', temp, note, 'manual', by);
          }
        });
      }
    }

    await db
      .insertInto('batch')
      .values({
        id,
        owner_id: ownerId,
        name: recipe.name,
        style: recipe.style,
        volume_liters: volume,
        target_og: recipe.og,
        target_fg: recipe.fg,
        status,
        packaged_at: packagedAt,
        packaged_liters: packagedLiters,
        notes: stuck
          ? `Gravity has sat at 1.030 for days, well above the ${recipe.fg.toFixed(3)} target.`
          : digital
            ? 'Logged by a floating digital hydrometer; readings imported from its CSV export.'
            : '',
        created_by: ownerId,
        created_at: new Date(b.starts_at.getTime() - 3 * DAY),
        updated_at: packagedAt ?? endReadings,
      })
      .onConflict((oc) => oc.doNothing())
      .execute();
    await db.updateTable('booking').set({ batch_id: id }).where('id', '=', b.id).where('batch_id', 'is', null).execute();
    const rows = readings.map((r) => ({ ...r, batch_id: id, created_at: r.taken_at }));
    await insertInChunks(db, 'reading', rows, { size: 2000, skipExisting: true });
  }
}
