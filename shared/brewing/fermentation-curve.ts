/**
 * Fermentation curve: stability of the gravity and a forecast of the final gravity.
 */
import { formatNumber, GRAVITY_MIN, requireFinite, requireGravity } from './validation.ts';

/** One gravity reading of a fermenting batch. */
export interface GravityReading {
  takenAt: Date | string;
  sg: number;
}

/** A point of a gravity curve, time as an ISO 8601 string. */
export interface GravityPoint {
  takenAt: string;
  sg: number;
}

const MS_PER_DAY = 86_400_000;
/** Floating-point slack when comparing gravity differences against a tolerance. */
const GRAVITY_EPSILON = 1e-9;

interface TimedReading {
  time: number;
  sg: number;
}

function normaliseReadings(readings: readonly GravityReading[]): TimedReading[] {
  const given: unknown = readings;
  if (!Array.isArray(given)) {
    throw new RangeError('readings must be an array of { takenAt, sg }');
  }
  return readings
    .map((reading, i) => {
      const time = reading.takenAt instanceof Date ? reading.takenAt.getTime() : Date.parse(reading.takenAt);
      if (!Number.isFinite(time)) {
        throw new RangeError(`readings[${i}].takenAt must be a valid date or ISO 8601 string; got ${String(reading.takenAt)}`);
      }
      requireGravity(`readings[${i}].sg`, reading.sg);
      return { time, sg: reading.sg };
    })
    .sort((a, b) => a.time - b.time);
}

/** Options of {@link stableGravity}. */
export interface StableGravityOptions {
  /** Allowed deviation from the latest reading, SG; above 0 and at most 0.010. Default 0.001. */
  toleranceSg?: number;
  /** How long the gravity must have held, days; above 0 and at most 60. Default 3. */
  spanDays?: number;
}

/**
 * Whether fermentation has finished by the common-practice test "same gravity within ±0.001 over
 * 2–3 days": the trailing run of readings that all lie within ±toleranceSg of the latest reading
 * must span at least spanDays. `since` is the time of the first reading of that run, given only
 * when stable. Fewer than two readings are never stable.
 */
export function stableGravity(
  readings: readonly GravityReading[],
  { toleranceSg = 0.001, spanDays = 3 }: StableGravityOptions = {},
): { stable: boolean; since?: string } {
  requireFinite('toleranceSg', toleranceSg);
  if (toleranceSg <= 0 || toleranceSg > 0.01) {
    throw new RangeError(`toleranceSg must be above 0 and at most 0.010; got ${toleranceSg}`);
  }
  requireFinite('spanDays', spanDays);
  if (spanDays <= 0 || spanDays > 60) {
    throw new RangeError(`spanDays must be above 0 and at most 60 days; got ${spanDays}`);
  }
  const sorted = normaliseReadings(readings);
  const latest = sorted[sorted.length - 1];
  if (sorted.length < 2 || latest === undefined) return { stable: false };

  let start = latest;
  for (let i = sorted.length - 2; i >= 0; i -= 1) {
    const reading = sorted[i];
    if (reading === undefined || Math.abs(reading.sg - latest.sg) > toleranceSg + GRAVITY_EPSILON) break;
    start = reading;
  }
  const heldDays = (latest.time - start.time) / MS_PER_DAY;
  if (heldDays + 1e-9 < spanDays) return { stable: false };
  return { stable: true, since: new Date(start.time).toISOString() };
}

/** Options of {@link forecastFinalGravity}. */
export interface ForecastOptions {
  /** The recipe's target final gravity (0.980–1.200); when given, the result says when the curve reaches it. */
  targetFg?: number;
  /** Number of points in the returned curve, 2–1000. Default 50. */
  curvePoints?: number;
}

/** Result of {@link forecastFinalGravity}. */
export interface GravityForecast {
  model: 'exponential-decay';
  /** Fitted asymptote FG∞. */
  predictedFg: number;
  /** When the fitted curve comes within 0.001 of predictedFg (the first reading's time if it already has). */
  readyAt: string;
  /** Fitted decay constant k, per day. */
  decayPerDay: number;
  /** Fitted curve from the first reading to the later of the last reading and readyAt. */
  curve: GravityPoint[];
  /**
   * Only when targetFg was given: when the curve comes within 0.001 of targetFg, or null when the
   * fitted asymptote stays more than 0.001 above it (the batch is not heading for its target).
   */
  targetReachedAt?: string | null;
}

/** Gravity within which the forecast curve counts as finished. */
const READY_TOLERANCE_SG = 0.001;
/** Decay constants searched: half-lives from 1 hour to 60 days. */
const K_MIN = Math.LN2 / 60;
const K_MAX = Math.LN2 * 24;
const K_GRID = 400;

interface DecayFit {
  k: number;
  fg: number;
  amplitude: number;
  sse: number;
}

/** For a fixed k, sg = fg + amplitude·e^(−k t) is linear in (fg, amplitude): closed-form least squares. */
function fitAtK(days: readonly number[], sg: readonly number[], k: number): DecayFit | null {
  const n = days.length;
  const x = days.map((t) => Math.exp(-k * t));
  const meanX = x.reduce((s, v) => s + v, 0) / n;
  const meanY = sg.reduce((s, v) => s + v, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i += 1) {
    const dx = (x[i] ?? 0) - meanX;
    sxx += dx * dx;
    sxy += dx * ((sg[i] ?? 0) - meanY);
  }
  if (!(sxx > 1e-18)) return null;
  const amplitude = sxy / sxx;
  const fg = meanY - amplitude * meanX;
  let sse = 0;
  for (let i = 0; i < n; i += 1) {
    const r = (sg[i] ?? 0) - fg - amplitude * (x[i] ?? 0);
    sse += r * r;
  }
  return { k, fg, amplitude, sse };
}

/**
 * Forecasts the final gravity of a fermenting batch by fitting the exponential decay
 * sg(t) = FG∞ + (SG₀ − FG∞)·e^(−k t) to the readings by least squares: a log-spaced grid search
 * over k (half-lives 1 h – 60 days) refined by golden-section search, with FG∞ and SG₀ − FG∞ fitted
 * in closed form for each k. Returns null with fewer than 3 readings (at distinct times), when the
 * readings show no downward trend, or when they are still on a straight line so that no
 * asymptote can be fitted (best k at the slow end of the search, or FG∞ below 0.980).
 */
export function forecastFinalGravity(readings: readonly GravityReading[], { targetFg, curvePoints = 50 }: ForecastOptions = {}): GravityForecast | null {
  if (targetFg !== undefined) requireGravity('targetFg', targetFg);
  if (!Number.isInteger(curvePoints) || curvePoints < 2 || curvePoints > 1000) {
    throw new RangeError(`curvePoints must be a whole number from 2 to 1000; got ${formatNumber(curvePoints)}`);
  }
  const sorted = normaliseReadings(readings);
  const first = sorted[0];
  const last = sorted[sorted.length - 1];
  if (first === undefined || last === undefined) return null;
  if (new Set(sorted.map((r) => r.time)).size < 3) return null;

  const t0 = first.time;
  const days = sorted.map((r) => (r.time - t0) / MS_PER_DAY);
  const sg = sorted.map((r) => r.sg);

  // Downward trend: the least-squares straight line must fall.
  const meanT = days.reduce((s, v) => s + v, 0) / days.length;
  const meanY = sg.reduce((s, v) => s + v, 0) / sg.length;
  let sty = 0;
  days.forEach((t, i) => {
    sty += (t - meanT) * ((sg[i] ?? 0) - meanY);
  });
  if (!(sty < 0)) return null;

  // Grid search over k, then golden-section refinement inside the best bracket.
  const ratio = (K_MAX / K_MIN) ** (1 / (K_GRID - 1));
  let best: DecayFit | null = null;
  let bestIndex = -1;
  for (let i = 0; i < K_GRID; i += 1) {
    const fit = fitAtK(days, sg, K_MIN * ratio ** i);
    if (fit && (best === null || fit.sse < best.sse)) {
      best = fit;
      bestIndex = i;
    }
  }
  if (best === null || bestIndex === 0) return null;
  let lo = K_MIN * ratio ** Math.max(0, bestIndex - 1);
  let hi = K_MIN * ratio ** Math.min(K_GRID - 1, bestIndex + 1);
  const phi = (Math.sqrt(5) - 1) / 2;
  const sseAt = (k: number): number => fitAtK(days, sg, k)?.sse ?? Number.POSITIVE_INFINITY;
  let a = hi - phi * (hi - lo);
  let b = lo + phi * (hi - lo);
  let fa = sseAt(a);
  let fb = sseAt(b);
  for (let i = 0; i < 80; i += 1) {
    if (fa < fb) {
      hi = b;
      b = a;
      fb = fa;
      a = hi - phi * (hi - lo);
      fa = sseAt(a);
    } else {
      lo = a;
      a = b;
      fa = fb;
      b = lo + phi * (hi - lo);
      fb = sseAt(b);
    }
  }
  const refined = fitAtK(days, sg, (lo + hi) / 2);
  if (refined && refined.sse <= best.sse) best = refined;

  const { k, fg, amplitude } = best;
  if (!(amplitude > 0) || fg < GRAVITY_MIN) return null;

  const readyDays = amplitude > READY_TOLERANCE_SG ? Math.log(amplitude / READY_TOLERANCE_SG) / k : 0;
  const readyTime = t0 + readyDays * MS_PER_DAY;
  const endTime = Math.max(last.time, readyTime);
  const curve: GravityPoint[] = [];
  for (let i = 0; i < curvePoints; i += 1) {
    const time = t0 + ((endTime - t0) * i) / (curvePoints - 1);
    const t = (time - t0) / MS_PER_DAY;
    curve.push({ takenAt: new Date(time).toISOString(), sg: fg + amplitude * Math.exp(-k * t) });
  }

  const forecast: GravityForecast = {
    model: 'exponential-decay',
    predictedFg: fg,
    readyAt: new Date(readyTime).toISOString(),
    decayPerDay: k,
    curve,
  };
  if (targetFg !== undefined) {
    const gap = targetFg + READY_TOLERANCE_SG - fg;
    if (gap <= 0) {
      forecast.targetReachedAt = null;
    } else {
      const targetDays = amplitude > gap ? Math.log(amplitude / gap) / k : 0;
      forecast.targetReachedAt = new Date(t0 + targetDays * MS_PER_DAY).toISOString();
    }
  }
  return forecast;
}

/** Apparent attenuation assumed for the straight-line forecast when a batch has no target FG (common practice for ale yeasts). */
export const TYPICAL_APPARENT_ATTENUATION_SG = 0.75;
/** Readings a fermentation forecast needs at the least (at distinct times, on a falling curve). */
export const FORECAST_MIN_READINGS = 3;

/** A forecast as the screens show it: {@link GravityForecast} or, while the curve is still straight, the trend line. */
export interface FermentationForecast {
  model: 'exponential-decay' | 'linear-trend';
  predictedFg: number;
  readyAt: string;
  /** k of the decay (per day); for the trend line, its fall in SG per day. */
  decayPerDay: number;
  targetReachedAt: string | null;
  curve: GravityPoint[];
}

/**
 * The forecast of a fermenting batch as of `now`, never dated before it:
 * - the exponential decay of {@link forecastFinalGravity} when the readings bend towards an asymptote;
 * - while they still fall on a straight line (no asymptote can be fitted yet), the least-squares
 *   trend line, extended to the target FG, or without one to the FG of a typical apparent
 *   attenuation (75 % in SG points of the first reading), so that steadily falling readings
 *   yield a forecast as soon as there are {@link FORECAST_MIN_READINGS} of them.
 * A forecast whose ready time has already passed (the readings stopped, or the curve says the
 * beer is done) is null: the stable-gravity rule speaks then. A target time that has passed is null.
 */
export function fermentationForecast(
  readings: readonly GravityReading[],
  { now, targetFg, curvePoints = 50 }: ForecastOptions & { now: Date },
): FermentationForecast | null {
  const nowMs = now.getTime();
  if (!Number.isFinite(nowMs)) throw new RangeError('now must be a valid date');
  const sorted = normaliseReadings(readings);
  if (new Set(sorted.map((r) => r.time)).size < FORECAST_MIN_READINGS) return null;
  const notPast = (iso: string | null | undefined) => (iso && Date.parse(iso) > nowMs ? iso : null);
  const decay = forecastFinalGravity(
    sorted.map((r) => ({ takenAt: new Date(r.time), sg: r.sg })),
    { ...(targetFg !== undefined ? { targetFg } : {}), curvePoints },
  );
  if (decay) {
    if (!notPast(decay.readyAt)) return null;
    return { ...decay, targetReachedAt: notPast(decay.targetReachedAt) };
  }
  const first = sorted[0]!;
  const last = sorted[sorted.length - 1]!;
  const days = sorted.map((r) => (r.time - first.time) / MS_PER_DAY);
  const meanT = days.reduce((s, v) => s + v, 0) / days.length;
  const meanY = sorted.reduce((s, r) => s + r.sg, 0) / sorted.length;
  let stt = 0;
  let sty = 0;
  days.forEach((t, i) => {
    stt += (t - meanT) ** 2;
    sty += (t - meanT) * (sorted[i]!.sg - meanY);
  });
  const slope = sty / stt;
  if (!(slope < 0)) return null;
  const expected = targetFg ?? first.sg - TYPICAL_APPARENT_ATTENUATION_SG * (first.sg - 1);
  const lineAt = (t: number) => meanY + slope * (t - meanT);
  const lastDay = days[days.length - 1]!;
  if (!(lineAt(lastDay) > expected)) return null;
  const readyDays = meanT + (expected - meanY) / slope;
  const readyTime = first.time + readyDays * MS_PER_DAY;
  if (!(readyTime > nowMs)) return null;
  const curve: GravityPoint[] = [];
  for (let i = 0; i < curvePoints; i += 1) {
    const time = last.time + ((readyTime - last.time) * i) / (curvePoints - 1);
    curve.push({ takenAt: new Date(time).toISOString(), sg: lineAt((time - first.time) / MS_PER_DAY) });
  }
  const readyAt = new Date(readyTime).toISOString();
  return { model: 'linear-trend', predictedFg: expected, readyAt, decayPerDay: -slope, targetReachedAt: targetFg !== undefined ? readyAt : null, curve };
}
