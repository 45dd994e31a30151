import { describe, expect, it } from 'vitest';
import { FORECAST_MIN_READINGS, fermentationForecast, type GravityReading } from '../index.ts';

const DAY = 86_400_000;
const start = Date.parse('2026-11-20T09:00:00Z');
const daily = (sgs: number[]): GravityReading[] => sgs.map((sg, i) => ({ takenAt: new Date(start + i * DAY).toISOString(), sg }));
const dayAfterLast = (sgs: number[]) => new Date(start + (sgs.length - 1) * DAY + 3600_000);

describe('fermentationForecast', () => {
  it('forecasts eight steadily falling readings by their trend line', () => {
    // [C] synthetic: 1.052 falling 0.004 a day for a week.
    const sgs = [1.052, 1.048, 1.044, 1.04, 1.036, 1.032, 1.028, 1.024];
    const now = dayAfterLast(sgs);
    const f = fermentationForecast(daily(sgs), { now });
    expect(f).not.toBeNull();
    if (!f) return;
    expect(f.model).toBe('linear-trend');
    // [C] no target: 75 % apparent attenuation of 52 points leaves 1.013; (1.052 − 1.013)/0.004 = 9.75 days.
    expect(f.predictedFg).toBeCloseTo(1.013, 6);
    expect(Math.abs(Date.parse(f.readyAt) - (start + 9.75 * DAY))).toBeLessThan(60_000);
    expect(Date.parse(f.readyAt)).toBeGreaterThan(now.getTime());
    expect(f.decayPerDay).toBeCloseTo(0.004, 6);
    expect(f.curve[0]!.takenAt).toBe(new Date(start + 7 * DAY).toISOString());
  });

  it('runs the trend line to the target FG when there is one', () => {
    const sgs = [1.05, 1.046, 1.042, 1.038, 1.034, 1.03, 1.026, 1.022];
    const f = fermentationForecast(daily(sgs), { now: dayAfterLast(sgs), targetFg: 1.01 });
    // [C] synthetic: (1.050 − 1.010)/0.004 = 10 days after the first reading.
    expect(f?.predictedFg).toBe(1.01);
    expect(f?.readyAt).toBe(new Date(start + 10 * DAY).toISOString());
    expect(f?.targetReachedAt).toBe(f?.readyAt);
  });

  it('fits the decay once the curve bends', () => {
    // [C] synthetic: 1.010 + 0.040·e^(−0.5 t), one reading a day.
    const sgs = Array.from({ length: 6 }, (_, d) => 1.01 + 0.04 * Math.exp(-0.5 * d));
    const f = fermentationForecast(daily(sgs), { now: dayAfterLast(sgs) });
    expect(f?.model).toBe('exponential-decay');
    expect(f?.predictedFg).toBeCloseTo(1.01, 5);
    expect(Date.parse(f!.readyAt)).toBeGreaterThan(dayAfterLast(sgs).getTime());
  });

  it('is never dated in the past: readings that stopped long ago give no forecast', () => {
    const sgs = [1.052, 1.048, 1.044, 1.04, 1.036, 1.032, 1.028, 1.024];
    expect(fermentationForecast(daily(sgs), { now: new Date(start + 30 * DAY) })).toBeNull();
    const bending = Array.from({ length: 6 }, (_, d) => 1.01 + 0.04 * Math.exp(-0.5 * d));
    expect(fermentationForecast(daily(bending), { now: new Date(start + 60 * DAY) })).toBeNull();
  });

  it('drops a target time that has passed and keeps the rest', () => {
    // [C] synthetic: 1.010 + 0.040·e^(−0.5 t); the 1.030 target (within 0.001) is reached at t = 2·ln(40/21) ≈ 1.29 days.
    const sgs = Array.from({ length: 6 }, (_, d) => 1.01 + 0.04 * Math.exp(-0.5 * d));
    const f = fermentationForecast(daily(sgs), { now: dayAfterLast(sgs), targetFg: 1.03 });
    expect(f).not.toBeNull();
    expect(f?.targetReachedAt).toBeNull();
  });

  it(`needs ${FORECAST_MIN_READINGS} readings on a falling line`, () => {
    expect(fermentationForecast(daily([1.05, 1.045]), { now: new Date(start + DAY) })).toBeNull();
    expect(fermentationForecast(daily([1.05, 1.046, 1.042]), { now: new Date(start + 2 * DAY) })?.model).toBe('linear-trend');
    expect(fermentationForecast(daily([1.05, 1.05, 1.05, 1.05]), { now: new Date(start + 3 * DAY) })).toBeNull();
    expect(fermentationForecast(daily([1.04, 1.042, 1.044]), { now: new Date(start + 2 * DAY) })).toBeNull();
  });

  it('gives none when the line is already at or below the expected FG', () => {
    expect(fermentationForecast(daily([1.016, 1.014, 1.012, 1.01]), { now: new Date(start + 3 * DAY), targetFg: 1.012 })).toBeNull();
  });
});
