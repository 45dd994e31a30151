import { abv, apparentAttenuation, fermentationForecast, realAttenuation, stableGravity, type GravityReading } from '../../../shared/brewing/index.ts';
import { type BatchDetail, type BatchStatus, type FermentationSettings, type GravityPointDto } from '../../../shared/schemas/batches.ts';
import type { Database } from '../../db/database.ts';
import { getSetting } from '../settings/settings.service.ts';
import { batchFiguresRow } from './batches.repository.ts';
import { gravityRows } from './readings.repository.ts';

/** The co-op's fermentation settings (setting `fermentation`), completed from the common-practice defaults. */
export async function loadFermentationSettings(db: Database): Promise<FermentationSettings> {
  return (await getSetting(db, 'fermentation')).value;
}

/** Most points the chart and the forecast fit get; more readings are averaged into time buckets. */
export const SERIES_MAX_POINTS = 400;

/** Bucket means over equal time slices (readings sorted by time). */
export function downsample(readings: readonly { time: number; sg: number }[], max = SERIES_MAX_POINTS): GravityPointDto[] {
  if (readings.length <= max) return readings.map((r) => ({ takenAt: new Date(r.time).toISOString(), sg: r.sg }));
  const first = readings[0]!.time;
  const last = readings[readings.length - 1]!.time;
  const width = (last - first) / max || 1;
  const sums = new Map<number, { t: number; sg: number; n: number }>();
  for (const r of readings) {
    const b = Math.min(max - 1, Math.floor((r.time - first) / width));
    const s = sums.get(b) ?? { t: 0, sg: 0, n: 0 };
    s.t += r.time;
    s.sg += r.sg;
    s.n += 1;
    sums.set(b, s);
  }
  return [...sums.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([, s]) => ({ takenAt: new Date(Math.round(s.t / s.n)).toISOString(), sg: Math.round((s.sg / s.n) * 100_000) / 100_000 }));
}

export type GravityFigures = Pick<
  BatchDetail,
  | 'og'
  | 'fg'
  | 'currentGravity'
  | 'figuresFrom'
  | 'abv'
  | 'apparentAttenuation'
  | 'realAttenuation'
  | 'stable'
  | 'forecast'
  | 'series'
  | 'readingsCount'
  | 'firstReadingAt'
  | 'lastReadingAt'
>;

const round = (v: number, digits: number) => Math.round(v * 10 ** digits) / 10 ** digits;

/** Figures that need an OG above 1.000 and a later gravity not above it; null otherwise. */
function alcoholFigures(og: number | null, final: number | null) {
  if (og === null || final === null || !(og > 1) || final > og) return { abv: null, apparentAttenuation: null, realAttenuation: null };
  try {
    return {
      // Full precision to four places: the screens round for display.
      abv: round(abv(og, final), 4),
      apparentAttenuation: round(apparentAttenuation(og, final), 4),
      realAttenuation: round(realAttenuation(og, final), 4),
    };
  } catch {
    return { abv: null, apparentAttenuation: null, realAttenuation: null };
  }
}

/**
 * What the readings say, by the brewing maths of shared/brewing: OG is the first reading, the
 * current gravity the latest; FG is the latest once the gravity is stable (or the batch has moved
 * on to conditioning or packaging). ABV (F4.6) and apparent (F4.1) and real (F4.5) attenuation use
 * FG when known, else the current gravity ("so far"). The forecast fits an exponential decay (or, while the
 * readings still fall on a straight line, extends their trend) and is never dated before `now`.
 */
export function computeFigures(
  readings: readonly { time: number; sg: number }[],
  status: BatchStatus,
  targetFg: number | null,
  settings: FermentationSettings,
  now: Date,
): GravityFigures {
  const stableSettings = { toleranceSg: settings.stableToleranceSg, spanDays: settings.stableSpanDays };
  const first = readings[0];
  const last = readings[readings.length - 1];
  if (!first || !last) {
    return {
      og: null,
      fg: null,
      currentGravity: null,
      figuresFrom: null,
      abv: null,
      apparentAttenuation: null,
      realAttenuation: null,
      stable: { stable: false, since: null, ...stableSettings },
      forecast: null,
      series: [],
      readingsCount: 0,
      firstReadingAt: null,
      lastReadingAt: null,
    };
  }
  const asReadings: GravityReading[] = readings.map((r) => ({ takenAt: new Date(r.time), sg: r.sg }));
  const stable = stableGravity(asReadings, stableSettings);
  const og = first.sg;
  const current = last.sg;
  const finished = stable.stable || status === 'conditioning' || status === 'packaged';
  const fg = readings.length > 1 && finished ? current : null;
  const series = downsample(readings);
  let forecast: GravityFigures['forecast'] = null;
  try {
    // The fit starts where the gravity starts to fall: the lag phase before it would bend the curve.
    const peak = Math.max(...series.map((p) => p.sg));
    let from = 0;
    for (let i = 0; i < Math.floor(series.length / 2); i += 1) if (series[i]!.sg >= peak - 0.002) from = i;
    const f = fermentationForecast(
      series.slice(from).map((p) => ({ takenAt: p.takenAt, sg: p.sg })),
      targetFg !== null && targetFg >= 0.98 && targetFg <= 1.2 ? { targetFg, curvePoints: 60, now } : { curvePoints: 60, now },
    );
    if (f) {
      forecast = {
        model: f.model,
        predictedFg: round(f.predictedFg, 4),
        readyAt: f.readyAt,
        decayPerDay: round(f.decayPerDay, 4),
        targetReachedAt: f.targetReachedAt ?? null,
        curve: f.curve.map((p) => ({ takenAt: p.takenAt, sg: round(p.sg, 5) })),
      };
    }
  } catch {
    forecast = null;
  }
  return {
    og,
    fg,
    currentGravity: current,
    figuresFrom: readings.length > 1 ? (fg !== null ? 'fg' : 'current') : null,
    ...(readings.length > 1 ? alcoholFigures(og, fg ?? current) : alcoholFigures(null, null)),
    stable: { stable: stable.stable, since: stable.since ?? null, ...stableSettings },
    forecast,
    series,
    readingsCount: readings.length,
    firstReadingAt: new Date(first.time).toISOString(),
    lastReadingAt: new Date(last.time).toISOString(),
  };
}

/** Loads a batch's readings (time, gravity) in time order. */
export async function loadGravitySeries(db: Database, batchId: string): Promise<{ time: number; sg: number }[]> {
  const rows = await gravityRows(db, batchId);
  return rows.map((r) => ({ time: r.taken_at.getTime(), sg: Number(r.gravity_sg) }));
}

/**
 * OG, FG and ABV of one batch, for other capabilities (transfers copy them to kegs; the
 * production records print them).
 */
export async function batchGravityFigures(db: Database, batchId: string, now: Date) {
  const batch = await batchFiguresRow(db, batchId);
  if (!batch) return null;
  const [settings, series] = await Promise.all([loadFermentationSettings(db), loadGravitySeries(db, batchId)]);
  const f = computeFigures(series, batch.status, batch.target_fg, settings, now);
  return {
    og: f.og,
    fg: f.fg,
    currentGravity: f.currentGravity,
    abv: f.abv,
    apparentAttenuation: f.apparentAttenuation,
    realAttenuation: f.realAttenuation,
    stable: f.stable.stable,
  };
}
