// Brewing maths, The fermentation curve: when the gravity is stable, and the forecast final gravity. Every check value names its source (REFERENCE.md).
import { describe, it, expect } from 'vitest';
import { forecastFinalGravity, stableGravity, type GravityReading } from '../index.ts';
import { near } from './check-values.ts';

describe('fermentation curve: stableGravity and forecastFinalGravity', () => {
  // Synthetic series computed here from a known curve: sg(t) = 1.010 + 0.040·e^(−0.5 t), t in days.
  const start = Date.parse('2026-03-01T08:00:00.000Z');
  const DAY = 86_400_000;
  const known = (t: number): number => 1.01 + 0.04 * Math.exp(-0.5 * t);
  const series = (days: number[], round = false): GravityReading[] =>
    days.map((t) => ({
      takenAt: new Date(start + t * DAY).toISOString(),
      sg: round ? Math.round(known(t) * 1000) / 1000 : known(t),
    }));
  const range = (from: number, to: number, step: number): number[] => {
    const out: number[] = [];
    for (let t = from; t <= to + 1e-9; t += step) out.push(t);
    return out;
  };

  describe('stableGravity', () => {
    // Daily readings rounded to 0.001 like a hydrometer: day 6 reads 1.012, days 7–8 read 1.011 and
    // days 9+ read 1.010 (computed from the curve above), so the run within ±0.001 starts on day 7.
    it('finds the plateau of a finished fermentation', () => {
      const readings = series(range(0, 12, 1), true);
      expect(stableGravity(readings)).toEqual({ stable: true, since: new Date(start + 7 * DAY).toISOString() }); // common practice ±0.001 over 3 days
    });

    it('is not stable before the gravity has held for spanDays', () => {
      const readings = series(range(0, 9, 1), true);
      expect(stableGravity(readings)).toEqual({ stable: false }); // common practice: held only 2 days (days 7–9)
      expect(stableGravity(readings, { spanDays: 2 })).toEqual({
        stable: true,
        since: new Date(start + 7 * DAY).toISOString(),
      }); // common practice: 2-day window
    });

    it('does not call a slow steady drift stable', () => {
      // 0.0005 per day for 6 days: every step is within ±0.001 but the gravity is still falling.
      const readings = range(0, 6, 1).map((t) => ({ takenAt: new Date(start + t * DAY), sg: 1.015 - 0.0005 * t }));
      expect(stableGravity(readings).stable).toBe(false); // common practice
      expect(stableGravity(readings, { toleranceSg: 0.005 }).stable).toBe(true); // wider tolerance
    });

    it('accepts unsorted mixed Date/string readings and needs two of them', () => {
      const readings = series(range(0, 12, 1), true).reverse();
      const mixed: GravityReading[] = readings.map((r, i) => (i % 2 ? { ...r, takenAt: new Date(r.takenAt) } : r));
      expect(stableGravity(mixed).since).toBe(new Date(start + 7 * DAY).toISOString());
      expect(stableGravity([])).toEqual({ stable: false });
      expect(stableGravity(series([0]))).toEqual({ stable: false });
    });

    it('rejects bad readings and options', () => {
      expect(() => stableGravity([{ takenAt: 'not a date', sg: 1.01 }])).toThrow(/readings\[0\]\.takenAt/);
      expect(() => stableGravity([{ takenAt: new Date(start), sg: 1.5 }])).toThrow(/readings\[0\]\.sg/);
      expect(() => stableGravity(series([0, 1]), { toleranceSg: 0 })).toThrow(/toleranceSg/);
      expect(() => stableGravity(series([0, 1]), { spanDays: Number.NaN })).toThrow(/spanDays/);
    });
  });

  describe('forecastFinalGravity', () => {
    it('recovers the known curve from exact readings', () => {
      const forecast = forecastFinalGravity(series(range(0, 6, 0.5)));
      expect(forecast).not.toBeNull();
      if (!forecast) return;
      expect(forecast.model).toBe('exponential-decay');
      near(forecast.predictedFg, 1.01, 1e-6); // [C] synthetic: FG∞ of the known curve
      near(forecast.decayPerDay, 0.5, 1e-4); // [C] synthetic: k of the known curve
      // Within 0.001 of FG∞ when 0.040·e^(−0.5 t) = 0.001 → t = 2·ln 40 = 7.378 days.
      const expectedReady = start + 2 * Math.log(40) * DAY;
      near(Date.parse(forecast.readyAt), expectedReady, 5 * 60_000); // [C] synthetic, ±5 min
      expect(forecast.curve).toHaveLength(50);
      expect(forecast.curve[0]?.takenAt).toBe(new Date(start).toISOString());
      near(forecast.curve[0]?.sg ?? 0, 1.05, 1e-6); // [C] SG₀ of the known curve
      near(forecast.curve[49]?.sg ?? 0, 1.011, 1e-6); // [C] curve ends at readyAt, 0.001 above FG∞
      expect(forecast.targetReachedAt).toBeUndefined();
    });

    it('reports when the target FG is reached, or null when it will not be', () => {
      const readings = series(range(0, 6, 0.5));
      const onTarget = forecastFinalGravity(readings, { targetFg: 1.012 });
      // Within 0.001 of 1.012 when 0.040·e^(−0.5 t) = 0.003 → t = 2·ln(40/3) = 5.181 days.
      near(Date.parse(onTarget?.targetReachedAt ?? ''), start + 2 * Math.log(40 / 3) * DAY, 5 * 60_000); // [C] synthetic
      expect(forecastFinalGravity(readings, { targetFg: 1.005 })?.targetReachedAt).toBeNull(); // [C] FG∞ 1.010 > 1.006
    });

    it('tolerates hydrometer rounding to 0.001', () => {
      const forecast = forecastFinalGravity(series(range(0, 6, 0.5), true).reverse(), { curvePoints: 10 });
      expect(forecast).not.toBeNull();
      if (!forecast) return;
      near(forecast.predictedFg, 1.01, 0.001); // [C] synthetic, rounded readings
      near(Date.parse(forecast.readyAt), start + 2 * Math.log(40) * DAY, 0.75 * DAY); // [C] synthetic, ±18 h
      expect(forecast.curve).toHaveLength(10);
    });

    it('returns null without enough readings or without a downward trend', () => {
      expect(forecastFinalGravity(series([0, 1]))).toBeNull(); // fewer than 3 readings
      expect(forecastFinalGravity([])).toBeNull();
      const flat = range(0, 4, 1).map((t) => ({ takenAt: new Date(start + t * DAY), sg: 1.012 }));
      expect(forecastFinalGravity(flat)).toBeNull(); // no downward trend
      const rising = range(0, 4, 1).map((t) => ({ takenAt: new Date(start + t * DAY), sg: 1.01 + 0.001 * t }));
      expect(forecastFinalGravity(rising)).toBeNull(); // no downward trend
      const sameTime = [1.05, 1.04, 1.03].map((sg) => ({ takenAt: new Date(start), sg }));
      expect(forecastFinalGravity(sameTime)).toBeNull(); // fewer than 3 distinct times
    });

    it('returns null while the readings are still on a straight line (no asymptote yet)', () => {
      const linear = range(0, 3, 0.5).map((t) => ({ takenAt: new Date(start + t * DAY), sg: 1.06 - 0.008 * t }));
      expect(forecastFinalGravity(linear)).toBeNull();
    });

    it('rejects bad input', () => {
      expect(() => forecastFinalGravity(series(range(0, 3, 1)), { targetFg: 1.3 })).toThrow(/targetFg/);
      expect(() => forecastFinalGravity(series(range(0, 3, 1)), { curvePoints: 1 })).toThrow(/curvePoints/);
      expect(() => forecastFinalGravity([{ takenAt: 'yesterday', sg: 1.02 }])).toThrow(/takenAt/);
    });
  });
});
