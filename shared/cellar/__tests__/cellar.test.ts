import { describe, expect, it } from 'vitest';
import { feetToMetres, kpaToPsi, psiToKpa } from '../../brewing/index.ts';
import { defaultSanitationSettings } from '../../schemas/cellar-settings.ts';
import { checkLine, planCarbonation, PlanError } from '../carbonation-planner.ts';
import { evaluateCycle, outcomeReason } from '../sanitation-rules.ts';

const at = (h: number) => new Date(Date.UTC(2026, 10, 3, 8) + h * 3600_000).toISOString();
const full = [
  { step: 'clean' as const, chemical: 'alkaline-cleaner', contactMinutes: 60, at: at(0) },
  { step: 'rinse' as const, at: at(1.1) },
  { step: 'sanitize' as const, chemical: 'peracetic-sanitizer', contactMinutes: 1, at: at(1.2) },
  { step: 'purge' as const, purgeMethod: 'push_out' as const, at: at(1.3) },
];

describe('sanitation rules', () => {
  it('a complete cycle leaves the vessel ready for the freshness window', () => {
    const ev = evaluateCycle(full, defaultSanitationSettings);
    expect(ev).toMatchObject({ outcome: 'ready', complete: true, issues: [] });
    expect(ev.freshUntil!.getTime() - ev.completedAt.getTime()).toBe(7 * 86_400_000);
    expect(ev.steps[2]).toMatchObject({ chemicalId: 'peracetic-sanitizer', concentration: 150, concentrationUnit: 'ppm', minimumContactMinutes: 1 });
    expect(outcomeReason(ev, 7)).toMatch(/ready for 7 days/);
  });

  it('evaluates steps in time order, whatever order they were sent in', () => {
    const ev = evaluateCycle([...full].reverse(), defaultSanitationSettings);
    expect(ev.outcome).toBe('ready');
    expect(ev.steps.map((s) => s.step)).toEqual(['clean', 'rinse', 'sanitize', 'purge']);
  });

  it('a chemical’s own stricter minimum applies over the step’s', () => {
    const ev = evaluateCycle([{ ...full[0]!, chemical: 'caustic-cleaner', contactMinutes: 25 }, ...full.slice(1)], defaultSanitationSettings);
    expect(ev.steps[0]!.minimumContactMinutes).toBe(30);
    expect(ev.outcome).toBe('needs_cleaning');
    const stricter = { ...defaultSanitationSettings, minimumContactMinutes: { clean: 10, sanitize: 1 } };
    const ok = evaluateCycle([{ ...full[0]!, chemical: 'caustic-cleaner', contactMinutes: 25 }, ...full.slice(1)], stricter);
    expect(ok.steps[0]!.minimumContactMinutes).toBe(20);
    expect(ok.outcome).toBe('ready');
  });

  it('names the missing chemical, contact time or step, and a cleaner used as a sanitizer', () => {
    const ev = evaluateCycle(
      [
        { step: 'clean', contactMinutes: 60, at: at(0) },
        { step: 'rinse', at: at(1) },
      ],
      defaultSanitationSettings,
    );
    expect(ev.outcome).toBe('needs_cleaning');
    expect(ev.issues.map((i) => `${i.code}:${i.step}`)).toEqual(['no_chemical:clean', 'missing_step:sanitize', 'missing_step:purge']);
    const wrong = evaluateCycle([full[0]!, full[1]!, { ...full[2]!, chemical: 'alkaline-cleaner' }, full[3]!], defaultSanitationSettings);
    expect(wrong.outcome).toBe('cleaned');
    expect(wrong.issues[0]).toMatchObject({ code: 'wrong_chemical', step: 'sanitize' });
    const noTime = evaluateCycle([full[0]!, full[1]!, { ...full[2]!, contactMinutes: undefined }, full[3]!], defaultSanitationSettings);
    expect(noTime.issues[0]!.code).toBe('no_contact_time');
    expect(outcomeReason(noTime)).toMatch(/cleaned, not sanitized/);
  });

  it('records a chemical that is not on the list as given, with the step’s minimum', () => {
    const ev = evaluateCycle([{ ...full[0]!, chemical: 'Unlisted cleaner', concentration: 2 }, ...full.slice(1)], defaultSanitationSettings);
    expect(ev.steps[0]).toMatchObject({ chemicalId: null, chemicalName: 'Unlisted cleaner', concentration: 2, concentrationUnit: null, minimumContactMinutes: 30 });
    expect(ev.outcome).toBe('ready');
  });
});

describe('carbonation planner', () => {
  const base = { altitudeM: 0, method: 'set_and_hold' as const, startedAt: '2026-12-01T10:00:00Z', holdDays: 14, maxPressureKpa: 310 };
  const fToC = (f: number) => (f - 32) / 1.8;

  it('gives the published regulator settings (REFERENCE §5: S26 chart ±0.25 psi, S17 table ±0.05 psi)', () => {
    const p = (v: number, f: number) => kpaToPsi(planCarbonation({ ...base, targetVolumes: v, temperatureC: fToC(f) }).servingPressureKpa);
    expect(Math.abs(p(2.5, 38) - 11.3)).toBeLessThanOrEqual(0.25); // [P] S26
    expect(Math.abs(p(2.5, 40) - 12.4)).toBeLessThanOrEqual(0.25); // [P] S26
    expect(Math.abs(p(2.5, 50) - 17.6)).toBeLessThanOrEqual(0.05); // [P] S17
    expect(Math.abs(p(3.0, 38) - 16.5)).toBeLessThanOrEqual(0.05); // [P] S17
    expect(Math.abs(p(2.0, 32) - 3.5)).toBeLessThanOrEqual(0.05); // [P] S17
  });

  it('plans a set and hold for about two weeks and a fast start lowered on time', () => {
    const hold = planCarbonation({ ...base, targetVolumes: 2.4, temperatureC: 3 });
    expect(hold.readyAt).toBe('2026-12-15T10:00:00.000Z');
    expect(hold.lowerPressureAt).toBeNull();
    const fast = planCarbonation({ ...base, method: 'fast_start', targetVolumes: 2.4, temperatureC: 3, fastStartPressureKpa: psiToKpa(30), fastStartHours: 72, settleDays: 2 });
    expect(fast.lowerPressureAt).toBe('2026-12-04T10:00:00.000Z');
    expect(fast.readyAt).toBe('2026-12-06T10:00:00.000Z');
    expect(fast.fastStartEquilibriumVolumes!).toBeGreaterThan(4);
    expect(fast.warnings.some((w) => /shake/i.test(w))).toBe(true);
  });

  it('refuses pressures above the co-op’s limit and a fast start below serving pressure', () => {
    expect(() => planCarbonation({ ...base, method: 'fast_start', targetVolumes: 2.4, temperatureC: 3, fastStartPressureKpa: 350, fastStartHours: 72 })).toThrow(PlanError);
    expect(() => planCarbonation({ ...base, method: 'fast_start', targetVolumes: 2.4, temperatureC: 3, fastStartPressureKpa: 40, fastStartHours: 72 })).toThrow(/above the serving pressure/);
    expect(() => planCarbonation({ ...base, targetVolumes: 4.4, temperatureC: 25 })).toThrow(/co-op's limit/);
  });

  it('balances a line by F6.1 (REFERENCE §6: 12 psi, 1/4" vinyl, no rise → 14.12 ft)', () => {
    const c = checkLine({ servingPressureKpa: psiToKpa(12), lengthM: feetToMetres(14), insideDiameterMm: 6.35, riseM: 0, fixedKpa: 0 });
    expect(c.tubing).toBe('vinyl-1/4');
    expect(c.balancedLengthM! / 0.3048).toBeCloseTo(14.12, 2);
    expect(c.suits).toBe(true);
    const short = checkLine({ servingPressureKpa: psiToKpa(12), lengthM: 0.4, insideDiameterMm: 4.8, riseM: feetToMetres(4), fixedKpa: psiToKpa(1) });
    expect(short.balancedLengthM! / 0.3048).toBeCloseTo(3.0, 2); // [C:F6.1] 12 psi, 4 ft rise, R 3.0, P_fixed 1 → 3.00 ft
    expect(short.suits).toBe(false);
    expect(short.verdict).toMatch(/too short/);
    expect(checkLine({ servingPressureKpa: 80, lengthM: 3, insideDiameterMm: 3.2, riseM: 0, fixedKpa: 0 }).suits).toBeNull();
  });
});
