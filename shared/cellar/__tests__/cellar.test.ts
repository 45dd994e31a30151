import { describe, expect, it } from 'vitest';
import { carbonationPressureKpa, feetToMetres, kpaToPsi, psiToKpa, publishedLineResistanceKpaPerM } from '../../brewing/index.ts';
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
    expect(ev.steps[0]).toMatchObject({
      chemicalId: null,
      chemicalName: 'Unlisted cleaner',
      concentration: 2,
      concentrationUnit: null,
      minimumContactMinutes: 30,
    });
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
    const fast = planCarbonation({
      ...base,
      method: 'fast_start',
      targetVolumes: 2.4,
      temperatureC: 3,
      fastStartPressureKpa: psiToKpa(30),
      fastStartHours: 72,
      settleDays: 2,
    });
    expect(fast.lowerPressureAt).toBe('2026-12-04T10:00:00.000Z');
    expect(fast.readyAt).toBe('2026-12-06T10:00:00.000Z');
    expect(fast.fastStartEquilibriumVolumes!).toBeGreaterThan(4);
    expect(fast.warnings.some((w) => /shake/i.test(w))).toBe(true);
  });

  it('refuses pressures above the co-op’s limit and a fast start below serving pressure', () => {
    expect(() =>
      planCarbonation({ ...base, method: 'fast_start', targetVolumes: 2.4, temperatureC: 3, fastStartPressureKpa: 350, fastStartHours: 72 }),
    ).toThrow(PlanError);
    expect(() => planCarbonation({ ...base, method: 'fast_start', targetVolumes: 2.4, temperatureC: 3, fastStartPressureKpa: 40, fastStartHours: 72 })).toThrow(
      /above the serving pressure/,
    );
    expect(() => planCarbonation({ ...base, targetVolumes: 4.4, temperatureC: 25 })).toThrow(/co-op's limit/);
  });

  it('balances a line by F6.1 (REFERENCE §6: 12 psi, 1/4" vinyl, no rise → 14.12 ft)', () => {
    const c = checkLine({ servingPressureKpa: psiToKpa(12), lengthM: feetToMetres(14), insideDiameterMm: 6.35, riseM: 0, fixedKpa: 0 });
    expect(c.tubing).toBe('vinyl-1/4');
    expect(c.balancedLengthM! / 0.3048).toBeCloseTo(14.12, 2);
    expect(c.suits).toBe(true);
    const dbqm = publishedLineResistanceKpaPerM('vinyl-3/16', 'S31'); // [P2] 3.0 psi/ft, S28, S30, S31
    const short = checkLine({
      servingPressureKpa: psiToKpa(12),
      lengthM: 0.4,
      insideDiameterMm: 4.8,
      riseM: feetToMetres(4),
      fixedKpa: psiToKpa(1),
      resistanceKpaPerM: dbqm,
    });
    expect(short.balancedLengthM! / 0.3048).toBeCloseTo(3.0, 2); // [C:F6.1] 12 psi, 4 ft rise, R 3.0, P_fixed 1 → 3.00 ft
    expect(short.suits).toBe(false);
    expect(short.verdict).toMatch(/too short/);
    expect(checkLine({ servingPressureKpa: 80, lengthM: 3, insideDiameterMm: 3.2, riseM: 0, fixedKpa: 0 }).suits).toBeNull();
  });

  it('takes the line type from material and diameter (REFERENCE §6 published examples)', () => {
    // [C:F6.1] 12 psi, no rise, 3/16" polyethylene or barrier at 2.2 psi/ft (S30, S33), P_fixed 1 → 5.00 ft
    for (const material of ['polyethylene', 'barrier'] as const) {
      const c = checkLine({ servingPressureKpa: psiToKpa(12), lengthM: feetToMetres(5), insideDiameterMm: 4.76, riseM: 0, fixedKpa: psiToKpa(1), material });
      expect(c.tubing).toBe(`${material}-3/16`);
      expect(c.balancedLengthM! / 0.3048).toBeCloseTo(5.0, 2);
      expect(c.suits).toBe(true);
    }
    // [P] S34: 20 ft of 5/16" barrier takes 2 psi, so 2 psi with no rise or allowance balances 20 ft.
    const barrier = checkLine({
      servingPressureKpa: psiToKpa(2),
      lengthM: feetToMetres(20),
      insideDiameterMm: 7.94,
      riseM: 0,
      fixedKpa: 0,
      material: 'barrier',
    });
    expect(barrier.balancedLengthM! / 0.3048).toBeCloseTo(20, 6);
    // [P] S34: 20 ft of 1/4" vinyl takes 17 psi.
    const vinyl = checkLine({ servingPressureKpa: psiToKpa(17), lengthM: feetToMetres(20), insideDiameterMm: 6.35, riseM: 0, fixedKpa: 0, material: 'vinyl' });
    expect(vinyl.balancedLengthM! / 0.3048).toBeCloseTo(20, 6);
    expect(checkLine({ servingPressureKpa: 80, lengthM: 3, insideDiameterMm: 12.7, riseM: 0, fixedKpa: 0, material: 'barrier' }).verdict).toMatch(
      /12.7 mm barrier/,
    );
  });

  it('the common line suits the house ale at serving pressure, where the old default called it too long', () => {
    // 2.4 volumes at 3 °C is about 9.9 psi (F5.1); 3/16" vinyl, 0.6 m rise, the co-op's 7 kPa allowance.
    const serving = carbonationPressureKpa(2.4, 3);
    const line = { servingPressureKpa: serving, insideDiameterMm: 4.8, riseM: 0.6, fixedKpa: 7 };
    const common = checkLine({ ...line, lengthM: 1.8 });
    expect(common.suits).toBe(true);
    expect(common.balancedLengthM!).toBeGreaterThan(1.5);
    expect(common.balancedLengthM!).toBeLessThan(2.1);
    // [CP] REFERENCE §8: about 8 ft at 12 psi, no rise
    expect(checkLine({ ...line, servingPressureKpa: psiToKpa(12), riseM: 0, lengthM: feetToMetres(8) }).suits).toBe(true);
    // The figure quoted from the draught quality manual (3.0 psi/ft) stays available as an override.
    const quoted = checkLine({ ...line, lengthM: 1.8, resistanceKpaPerM: publishedLineResistanceKpaPerM('vinyl-3/16', 'S30') });
    expect(quoted.verdict).toMatch(/too long/);
  });
});
