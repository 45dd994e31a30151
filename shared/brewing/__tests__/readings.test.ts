import { describe, expect, it } from 'vitest';
import { brixToSg, convertGravity, correctHydrometer, platoToSg, refractometerFinalGravity, sgToPlato, apparentPlatoToSg } from '../index.ts';
import { normaliseGravity, originalBrixOf } from '../readings.ts';

describe('apparentPlatoToSg (F2.1⁻¹ below 0 °P)', () => {
  it('inverts F2.1 for dry beers below 0 °P', () => {
    // Computed: F2.1 at SG 0.990 is −2.611 °P; its inverse gives the SG back.
    expect(sgToPlato(0.99)).toBeCloseTo(-2.611, 3); // computed, F2.1
    expect(apparentPlatoToSg(sgToPlato(0.99))).toBeCloseTo(0.99, 9); // computed, F2.1⁻¹
    expect(sgToPlato(apparentPlatoToSg(-1.2))).toBeCloseTo(-1.2, 9); // computed, round trip
  });

  it('agrees with platoToSg from 0 to 40 °P', () => {
    for (const p of [0, 2.5, 12, 20, 40]) expect(apparentPlatoToSg(p)).toBeCloseTo(platoToSg(p), 12); // same inverse
  });

  it('rejects extracts outside −5 to 40 °P and NaN', () => {
    expect(() => apparentPlatoToSg(-5.5)).toThrow(RangeError);
    expect(() => apparentPlatoToSg(41)).toThrow(RangeError);
    expect(() => apparentPlatoToSg(Number.NaN)).toThrow(/plato/);
  });
});

describe('normaliseGravity: from what was entered to the gravity the figures use', () => {
  it('keeps a plain SG reading as it is', () => {
    expect(normaliseGravity(1.048, 'sg', null)).toEqual({ sg: 1.048, rawSg: null, corrected: false, correction: null });
  });

  it('applies the F3.1 hydrometer correction to SG and °P readings with a temperature', () => {
    const r = normaliseGravity(1.05, 'sg', 30);
    expect(r.sg).toBeCloseTo(correctHydrometer(1.05, 30, 20), 4); // F3.1
    expect(r).toMatchObject({ rawSg: 1.05, corrected: true, correction: 'hydrometer-temperature' });
    expect(r.sg).toBeGreaterThan(1.05); // a warm sample reads low
    const p = normaliseGravity(12, 'plato', 15.56, { calibrationC: 15.56 });
    expect(p.sg).toBeCloseTo(platoToSg(12), 4); // at the calibration temperature the correction is nil
    expect(normaliseGravity(1.05, 'sg', 30, { correctTemperature: false })).toMatchObject({ sg: 1.05, corrected: false });
  });

  it('reads the first Brix reading as wort through the wort correction factor', () => {
    const r = normaliseGravity(12.5, 'brix', null, { wortCorrectionFactor: 1.04 });
    expect(r.sg).toBeCloseTo(brixToSg(12.5 / 1.04), 4); // F2.4⁻¹ of Brix ÷ WCF
    expect(r.correction).toBe('refractometer-wort-factor');
    expect(normaliseGravity(12.5, 'brix', null, { wortCorrectionFactor: 1 })).toMatchObject({ corrected: false, rawSg: null });
  });

  it('reads later Brix readings through alcohol with Terrill’s cubic', () => {
    const r = normaliseGravity(6.5, 'brix', 20, { originalBrix: 12.5 });
    expect(r.sg).toBeCloseTo(refractometerFinalGravity(12.5, 6.5, 1.04), 4); // Terrill cubic
    expect(r.correction).toBe('refractometer-alcohol');
    expect(() => normaliseGravity(13, 'brix', null, { originalBrix: 12.5 })).toThrow(/cannot be above the original/);
  });

  it('explains what cannot be a reading', () => {
    expect(() => normaliseGravity(1.3, 'sg', null)).toThrow(/0\.98 to 1\.2/);
    expect(() => normaliseGravity(45, 'plato', null)).toThrow(/°P/);
    expect(() => normaliseGravity(1.05, 'sg', 70)).toThrow(/0 to 60 °C/);
    expect(() => normaliseGravity(Number.NaN, 'sg', null)).toThrow(/not a number/);
  });
});

describe('originalBrixOf', () => {
  it('is the first reading itself in Brix, else what a refractometer would read on that wort', () => {
    expect(originalBrixOf({ enteredValue: 12.5, enteredUnit: 'brix', sg: 1.048 })).toBe(12.5);
    expect(originalBrixOf({ enteredValue: 1.048, enteredUnit: 'sg', sg: 1.048 }, 1.04)).toBeCloseTo(convertGravity(1.048, 'sg', 'brix') * 1.04, 9); // F2.4 × WCF
    expect(originalBrixOf({ enteredValue: 0.998, enteredUnit: 'sg', sg: 0.998 })).toBeNull();
    expect(originalBrixOf(null)).toBeNull();
  });
});
