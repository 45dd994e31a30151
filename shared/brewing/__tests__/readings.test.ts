import { describe, expect, it } from 'vitest';
import { brixToSg, convertGravity, correctHydrometer, platoToSg, refractometerFinalGravity, sgToPlato, apparentPlatoToSg } from '../index.ts';
import { checkAgainstOriginal, defaultBrixMethod, MAX_PLAUSIBLE_ATTENUATION, normaliseGravity, originalBrixOf } from '../readings.ts';

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
    expect(normaliseGravity(1.048, 'sg', null)).toEqual({ sg: 1.048, rawSg: null, corrected: false, correction: null, method: null });
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

describe('Brix readings by method: wort or alcohol-corrected', () => {
  it('defaults to wort while the batch has no OG and to alcohol-corrected after', () => {
    expect(defaultBrixMethod(null)).toBe('wort');
    expect(defaultBrixMethod(12.5)).toBe('alcohol_corrected');
    expect(normaliseGravity(12.5, 'brix', null).method).toBe('wort');
    expect(normaliseGravity(6.5, 'brix', null, { originalBrix: 12.5 }).method).toBe('alcohol_corrected');
    expect(normaliseGravity(1.048, 'sg', null).method).toBeNull();
  });

  it('reads wort by plain Brix → SG (F2.4⁻¹) with the wort correction factor', () => {
    // WCF 1: the refractometer reads the sucrose scale itself.
    expect(normaliseGravity(9.99325, 'brix', null, { method: 'wort', wortCorrectionFactor: 1 }).sg).toBeCloseTo(1.04, 4); // [P] S2 1.040 ↔ 9.99325 °Bx
    expect(normaliseGravity(40, 'brix', null, { method: 'wort', wortCorrectionFactor: 1 }).sg).toBeCloseTo(1.1787, 4); // [P] S2 40 °Bx ↔ 1.17874
    // WCF 1.04 (common practice): the same wort reads 1.04 times higher on the refractometer.
    expect(normaliseGravity(9.99325 * 1.04, 'brix', null, { method: 'wort', wortCorrectionFactor: 1.04 }).sg).toBeCloseTo(1.04, 4); // [P] S2, scaled by the WCF [CP]
    // Wort chosen explicitly on a batch with an OG stays wort (a second wort sample, e.g. after a top-up).
    expect(normaliseGravity(12, 'brix', null, { method: 'wort', originalBrix: 12.5 })).toMatchObject({
      method: 'wort',
      correction: 'refractometer-wort-factor',
    });
  });

  it('needs the original gravity for an alcohol-corrected reading, and refuses one that shows no fermentation', () => {
    expect(() => normaliseGravity(6, 'brix', null, { method: 'alcohol_corrected' })).toThrow(/needs the batch’s original gravity/);
    // 0 % attenuation: the sample still reads the original Brix. The cubic was fitted to fermented beer and is
    // off by −9 to +90 points on wort (below), so the reading is refused and wort suggested.
    expect(refractometerFinalGravity(12, 12)).toBeCloseTo(1.0374, 4); // [C:Terrill cubic] wort 12 °Bx is 1.0464 [C:F2.4⁻¹]
    expect(refractometerFinalGravity(20, 20)).toBeCloseTo(1.17, 3); // [C:Terrill cubic] wort 20 °Bx is 1.0796 [C:F2.4⁻¹]
    expect(() => normaliseGravity(12, 'brix', null, { method: 'alcohol_corrected', originalBrix: 12 })).toThrow(/shows no fermentation yet/);
  });

  it('refuses a mid-fermentation reading the correction puts above the OG (20 → 18 °Bx)', () => {
    const og = normaliseGravity(20, 'brix', null).sg;
    expect(og).toBeCloseTo(1.0796, 4); // [C:F2.4⁻¹] 20 °Bx ÷ 1.04
    const r = normaliseGravity(18, 'brix', null, { originalBrix: 20 });
    expect(r.sg).toBeCloseTo(1.1147, 4); // [C:Terrill cubic] far outside the range it was fitted to
    const check = checkAgainstOriginal(r.sg, og);
    expect(check.refusal).toMatch(/above the batch’s original gravity 1\.0796/);
    expect(checkAgainstOriginal(r.sg, og, true)).toMatchObject({ confirmable: false, refusal: expect.any(String) }); // confirming does not lift it
  });
});

describe('checkAgainstOriginal: apparent attenuation (F4.1) within a plausible range', () => {
  it('accepts 0 %, 50 % and 80 % apparent attenuation', () => {
    expect(checkAgainstOriginal(1.04, 1.04)).toMatchObject({ apparentAttenuation: 0, refusal: null }); // [C:F4.1] S8
    expect(checkAgainstOriginal(1.02, 1.04).apparentAttenuation).toBeCloseTo(50, 9); // [C:F4.1] S8: (1.040 − 1.020)/(1.040 − 1)
    expect(checkAgainstOriginal(1.02, 1.04).refusal).toBeNull();
    expect(checkAgainstOriginal(1.01, 1.05).apparentAttenuation).toBeCloseTo(80, 9); // [C:F4.1] S8: (1.050 − 1.010)/(1.050 − 1)
    expect(checkAgainstOriginal(1.01, 1.05).refusal).toBeNull();
  });

  it('reads a fermented refractometer sample through alcohol at about 50 % and 80 % attenuation', () => {
    // OG 12 °Bx ÷ 1.04 → 1.0464 [C:F2.4⁻¹]; 6 °Bx later → 1.0114 [C:Terrill cubic, coefficients from memory], 75 % apparent.
    const og = normaliseGravity(12, 'brix', null).sg;
    const half = normaliseGravity(8.5, 'brix', null, { originalBrix: 12 });
    const mostly = normaliseGravity(6, 'brix', null, { originalBrix: 12 });
    expect(mostly.sg).toBeCloseTo(1.0114, 4); // [C:Terrill cubic] as in brewing.test.ts
    expect(checkAgainstOriginal(mostly.sg, og)).toMatchObject({ refusal: null });
    expect(checkAgainstOriginal(mostly.sg, og).apparentAttenuation).toBeGreaterThan(70);
    expect(checkAgainstOriginal(half.sg, og).apparentAttenuation).toBeGreaterThan(35);
    expect(checkAgainstOriginal(half.sg, og).apparentAttenuation).toBeLessThan(65);
  });

  it('refuses a gravity above the OG outright and an attenuation beyond 105 % unless confirmed', () => {
    expect(checkAgainstOriginal(1.0401, 1.04)).toMatchObject({ confirmable: false, refusal: expect.stringMatching(/above the batch’s original gravity/) });
    expect(MAX_PLAUSIBLE_ATTENUATION).toBe(105); // common practice: very dry beers finish a few percent past 100 %
    expect(checkAgainstOriginal(0.998, 1.04).refusal).toBeNull(); // 105 % [C:F4.1]
    const dry = checkAgainstOriginal(0.996, 1.04); // 110 % [C:F4.1]
    expect(dry.apparentAttenuation).toBeCloseTo(110, 9);
    expect(dry).toMatchObject({ confirmable: true, refusal: expect.stringMatching(/beyond the plausible 105 %/) });
    expect(checkAgainstOriginal(0.996, 1.04, true).refusal).toBeNull();
  });
});
