import { describe, expect, it } from 'vitest';
import { defaultSanitationSettings, sanitationSettingsSchema } from '../../schemas/cellar-settings.ts';
import { blockingViolations, checkSteps, evaluateCycle, exceptionsOf, type StepForRules } from '../sanitation-rules.ts';

const settings = defaultSanitationSettings;
const at = (min: number) => new Date(Date.UTC(2026, 10, 3, 8) + min * 60_000).toISOString();
/** A cycle inside every default rule: clean 60 min, rinse, sanitize 2 min, a 30 s flush. */
const good = (): StepForRules[] => [
  { step: 'clean', chemical: 'alkaline-cleaner', concentration: 1.5, contactMinutes: 60, at: at(0) },
  { step: 'rinse', at: at(65) },
  { step: 'sanitize', chemical: 'acid-sanitizer', concentration: 1.6, contactMinutes: 2, at: at(75) },
  { step: 'purge', purgeMethod: 'flush', contactMinutes: 0.5, at: at(80) },
];
const rules = (steps: StepForRules[]) => checkSteps(steps, settings).map((v) => `${v.rule}@${v.index}`);
const withStep = (i: number, patch: Partial<StepForRules>) => good().map((s, j) => (j === i ? { ...s, ...patch } : s));

describe('checked sanitation steps', () => {
  it('passes a cycle inside the ranges, and the default chemicals keep their usual strength inside their own range', () => {
    expect(checkSteps(good(), settings)).toEqual([]);
    for (const c of settings.chemicals) {
      expect(c.minConcentration).toBeLessThanOrEqual(c.defaultConcentration);
      expect(c.defaultConcentration).toBeLessThanOrEqual(c.maxConcentration);
    }
    expect(sanitationSettingsSchema.safeParse(settings).success).toBe(true);
  });

  it('refuses the reviewed cycle: 0.1 % cleaner, 0.01 mL/L sanitizer and a 0-second purge', () => {
    const steps = good();
    steps[0] = { ...steps[0]!, concentration: 0.1 };
    steps[2] = { ...steps[2]!, concentration: 0.01 };
    steps[3] = { ...steps[3]!, contactMinutes: 0 };
    const found = checkSteps(steps, settings);
    expect(found.map((v) => `${v.rule}@${v.index}`)).toEqual(['strength_low@0', 'strength_low@2', 'short_purge@3']);
    expect(found[0]!.message).toBe('Clean step: 0.1 % is below the working strength of Alkaline cleaner (oxygen-based powder) (0.75–3 %).');
    expect(found[1]!.message).toMatch(/^Sanitize step: 0\.01 mL\/L is below the working strength .*\(1\.2–2 mL\/L\)/);
    expect(found[2]!.message).toBe("Purge step: a CO2 flush of 0 s is below the co-op's minimum of 20 s.");
    expect(found.every((v) => v.exceptable)).toBe(true);
    expect(blockingViolations(steps, settings)).toHaveLength(3);
  });

  it('refuses a strength above the range, a short contact, and the strength a step leaves out is the usual one', () => {
    expect(rules(withStep(0, { concentration: 5 }))).toEqual(['strength_high@0']);
    expect(rules(withStep(0, { contactMinutes: 10 }))).toEqual(['short_contact@0']);
    // The chemical's own minimum applies when it is stricter than the co-op's (peracetic 1 min, acid 1 min, step 1 min).
    expect(rules(withStep(2, { contactMinutes: 0.5 }))).toEqual(['short_contact@2']);
    expect(rules(withStep(2, { concentration: undefined }))).toEqual([]);
  });

  it('refuses a cleaner used to sanitize, one chemical for both steps, and names not in the list', () => {
    expect(rules(withStep(2, { chemical: 'alkaline-cleaner', concentration: 1.5 }))).toEqual(['wrong_chemical@2', 'same_chemical@2']);
    const freeText = good();
    freeText[0] = { ...freeText[0]!, chemical: 'Kitchen soap', concentration: 1 };
    freeText[2] = { ...freeText[2]!, chemical: 'kitchen soap ', concentration: 1 };
    expect(rules(freeText)).toEqual(['unknown_chemical@0', 'unknown_chemical@2', 'same_chemical@2']);
    const wrongWay = checkSteps(withStep(0, { chemical: 'peracetic-sanitizer', concentration: 150 }), settings);
    expect(wrongWay.map((v) => v.rule)).toEqual(['wrong_chemical']);
    expect(wrongWay[0]!.exceptable).toBe(false);
  });

  it('holds stated contact times to the step times: each must end before the next step begins', () => {
    // Clean at 0 with 60 min, rinse 45 min later.
    const found = checkSteps(withStep(1, { at: at(45) }), settings);
    expect(found.map((v) => v.rule)).toEqual(['contact_exceeds_gap']);
    expect(found[0]!.message).toBe(
      'Clean step: a contact time of 60 min does not fit before the rinse step, 45 min later; correct the times or the contact time.',
    );
    expect(found[0]!.exceptable).toBe(false);
    // Exactly the contact time fits.
    expect(rules(withStep(1, { at: at(60) }))).toEqual([]);
    // A flush of 30 s before a step 10 s later does not.
    const flush = [...good(), { step: 'rinse' as const, at: new Date(new Date(at(80)).getTime() + 10_000).toISOString() }];
    expect(rules(flush)).toEqual(['contact_exceeds_gap@3']);
    // The last step has no bound.
    expect(rules(withStep(3, { contactMinutes: 5 }))).toEqual([]);
  });

  it('needs a push-out purge to name its keg, and a caustic clean to be vented first', () => {
    expect(rules(withStep(3, { purgeMethod: 'push_out', contactMinutes: undefined }))).toEqual(['push_out_without_keg@3']);
    expect(rules(withStep(3, { purgeMethod: 'push_out', contactMinutes: undefined, pushedIntoEquipmentId: '00000000-0000-4000-8000-000000000001' }))).toEqual(
      [],
    );
    const caustic = withStep(0, { chemical: 'caustic-cleaner', concentration: 2, contactMinutes: 30 });
    const v = checkSteps(caustic, settings);
    expect(v.map((x) => x.rule)).toEqual(['not_vented']);
    expect(v[0]).toMatchObject({ field: 'vented', exceptable: false });
    expect(v[0]!.message).toMatch(/vent the vessel to atmospheric pressure first/);
    expect(rules(withStep(0, { chemical: 'caustic-cleaner', concentration: 2, contactMinutes: 30, vented: true }))).toEqual([]);
  });

  it('records a step with a reason as an exception: it counts as done and the cycle lists it', () => {
    const steps = withStep(2, { concentration: 0.8, exceptionReason: 'Last of the sanitizer; made up at what was left' });
    expect(blockingViolations(steps, settings)).toEqual([]);
    expect([...exceptionsOf(steps, settings)]).toEqual([[2, { reason: 'Last of the sanitizer; made up at what was left', rules: ['strength_low'] }]]);
    const ev = evaluateCycle(steps, settings);
    expect(ev.outcome).toBe('ready');
    expect(ev.steps[2]).toMatchObject({ ok: true, exception: { rules: ['strength_low'] } });
    expect(ev.issues).toEqual([
      {
        code: 'exception',
        step: 'sanitize',
        message: expect.stringMatching(/^Recorded as an exception: Sanitize step: 0\.8 mL\/L is below .* Reason given: Last of the sanitizer/),
      },
    ]);
    // A short contact with a reason is an exception too, not a short_contact issue.
    const short = evaluateCycle(withStep(2, { contactMinutes: 0.5, exceptionReason: 'Drained early' }), settings);
    expect(short.issues.map((i) => i.code)).toEqual(['exception']);
    // A reason does not excuse what cannot be excepted, nor a blank reason anything.
    expect(blockingViolations(withStep(1, { at: at(45), exceptionReason: 'In a hurry' }), settings).map((v) => v.rule)).toEqual(['contact_exceeds_gap']);
    expect(blockingViolations(withStep(0, { concentration: 0.1, exceptionReason: '   ' }), settings).map((v) => v.rule)).toEqual(['strength_low']);
  });

  it('keeps a working range the right way round in Settings', () => {
    const bad = structuredClone(settings);
    bad.chemicals[0] = { ...bad.chemicals[0]!, minConcentration: 3, maxConcentration: 1 };
    const res = sanitationSettingsSchema.safeParse(bad);
    expect(res.success).toBe(false);
    expect(res.error!.issues.map((i) => i.path.join('.'))).toContain('chemicals.0.maxConcentration');
    const outside = structuredClone(settings);
    outside.chemicals[0] = { ...outside.chemicals[0]!, defaultConcentration: 5 };
    expect(sanitationSettingsSchema.safeParse(outside).error!.issues.map((i) => i.path.join('.'))).toContain('chemicals.0.defaultConcentration');
  });
});
