// Brewing maths, §2–§4 and the refractometer: gravity scales, hydrometer correction, attenuation and alcohol. Every check value names its source (REFERENCE.md).
import { describe, it, expect } from 'vitest';
import { abv, alcoholByWeight, apparentAttenuation, realAttenuation, realExtract } from '../alcohol.ts';
import { brixToSg, convertGravity, platoToSg, sgToPlato } from '../gravity.ts';
import { correctHydrometer, refractometerFinalGravity } from '../gravity-corrections.ts';
import { usBarrelsToLiters } from '../units.ts';
import { near, fToC } from './check-values.ts';

describe('§2 specific gravity ↔ °Plato / °Brix', () => {
  it('sgToPlato follows the ASBC polynomial F2.1', () => {
    near(sgToPlato(1.04), 9.99359, 0.0005); // [P] S2 (F2.1 gives 9.99353)
    near(sgToPlato(1.05), 12.388, 0.001); // [C:F2.1]
    near(sgToPlato(1.06), 14.741, 0.001); // [C:F2.1]
    near(sgToPlato(1.08), 19.331, 0.001); // [C:F2.1]
    near(sgToPlato(1.0), -0.003, 1e-9); // [C:F2.1] not exactly 0 at S = 1.000
  });

  it('platoToSg inverts F2.1 numerically', () => {
    near(platoToSg(10), 1.04003, 0.00001); // [M] Plato table; F2.1⁻¹ 1.04003 [C]
    near(platoToSg(20), 1.08297, 0.00002); // [M] Plato table; F2.1⁻¹ 1.08297 [C]
    for (const p of [0, 2.4, 5, 12, 18.5, 25, 40]) {
      near(sgToPlato(platoToSg(p)), p, 1e-9); // [C:F2.1⁻¹] round trip to 1e-9
    }
  });

  it('agrees with the other SG ↔ °P formulas within REFERENCE bounds', () => {
    const f22 = (p: number): number => 1 + p / (258.6 - (227.1 * p) / 258.2); // F2.2
    const f25 = (s: number): number => (463 - 205 * s) * (s - 1); // F2.5 Lincoln
    const f23 = (s: number): number => 260.4 - 260.4 / s; // F2.3 Buhl
    // REFERENCE says F2.2 agrees within 1×10⁻⁵ for 5–25 °P [C]; recomputed here the largest gap is
    // 1.5×10⁻⁵ (near 17 °P), so the bound used is 2×10⁻⁵. At its own check points it holds to 1e-5:
    for (let p = 5; p <= 25; p += 0.5) near(platoToSg(p), f22(p), 2e-5); // [C] F2.2 vs F2.1⁻¹, 5–25 °P
    near(f22(10), 1.04003, 0.00001); // [C] F2.2 1.04003 at 10 °P
    near(f22(20), 1.08298, 0.00001); // [C] F2.2 1.08298 at 20 °P
    for (let s = 1.0; s <= 1.0801; s += 0.005) {
      near(f25(s), sgToPlato(s), 0.02); // [C] F2.5 within ±0.02 °P for S 1.000–1.080
      near(f23(s), sgToPlato(s), 0.045); // [C] F2.3 within ±0.045 °P for S 1.000–1.080
    }
  });

  it('reproduces the extract per barrel of 12 °P wort', () => {
    // 0.12 × S(12 °P) × 31 gal × water 998.20 kg/m³ (20 °C, [M]) in lb × 0.99900 air buoyancy
    const lb = ((0.12 * platoToSg(12) * usBarrelsToLiters(1) * 0.9982) / 0.45359237) * 0.999;
    near(lb, 32.45, 0.05); // [P2] S5 (Mallett, Malt, quoting ASBC tables); [C:F2.1⁻¹] 32.456
  });

  it('converts Brix by F2.4 and its inverse', () => {
    near(convertGravity(1.04, 'sg', 'brix'), 9.99325, 0.0005); // [P] S2 (F2.4 gives 9.99341)
    near(convertGravity(1.17874, 'sg', 'brix'), 40, 0.001); // [P] S2 40 °Bx ↔ 1.17874 (F2.4 gives 40.0004)
    near(brixToSg(40), 1.17874, 0.001 / 194); // [P] S2, ±0.001 °Bx ≈ ±5e-6 SG (dBx/dS ≈ 194 there)
    for (const bx of [0, 5, 12, 21.5, 40]) {
      near(convertGravity(brixToSg(bx), 'sg', 'brix'), bx, 1e-9); // [C:F2.4] round trip
    }
  });

  it('convertGravity links all three scales', () => {
    near(convertGravity(1.04, 'sg', 'plato'), 9.99353, 0.00001); // [C:F2.1]
    near(convertGravity(10, 'plato', 'sg'), 1.04003, 0.00001); // [M] as platoToSg(10)
    near(convertGravity(12, 'brix', 'sg'), brixToSg(12), 1e-12); // [C:F2.4⁻¹]
    // °P and °Bx differ by less than ±0.0005 in the wort range (S2); F2.1 vs F2.4 here ≤ 0.001.
    near(convertGravity(10, 'plato', 'brix'), 10, 0.001); // [P] S2 °P − °Bx < ±0.0005, plus fit error
    near(convertGravity(10, 'brix', 'plato'), 10, 0.001); // [P] S2, as above
    expect(convertGravity(1.05, 'sg', 'sg')).toBe(1.05); // identity
    expect(convertGravity(7.5, 'plato', 'plato')).toBe(7.5); // identity
  });

  it('rejects gravities and extracts outside their ranges', () => {
    expect(() => sgToPlato(0.97)).toThrow(/sg.*0\.98.*1\.2/);
    expect(() => sgToPlato(1.25)).toThrow(RangeError);
    expect(() => sgToPlato(Number.NaN)).toThrow(/NaN/);
    expect(() => platoToSg(-1)).toThrow(/plato.*0.*40/);
    expect(() => platoToSg(41)).toThrow(RangeError);
    expect(() => brixToSg(40.5)).toThrow(/brix/);
    expect(() => convertGravity(1.19, 'sg', 'brix')).toThrow(/F2\.4 fit range/);
    expect(() => convertGravity(Number.POSITIVE_INFINITY, 'plato', 'sg')).toThrow(RangeError);
  });
});

// -----------------------------------------------------------------------------------------------
describe('§3 hydrometer temperature correction (F3.1)', () => {
  // Additive corrections for a hydrometer standardized at 59 °F / 15 °C: [P] S7 (AHA wiki table).
  const table: { f: number; correction: number; tol: number }[] = [
    { f: 68, correction: 0.0009, tol: 0.0003 }, // [P] S7 20 °C
    { f: 77, correction: 0.0021, tol: 0.0003 }, // [P] S7 25 °C
    { f: 86, correction: 0.0035, tol: 0.0003 }, // [P] S7 30 °C
    { f: 104, correction: 0.0069, tol: 0.0003 }, // [P] S7 40 °C
    { f: 120, correction: 0.0106, tol: 0.0005 }, // [P] S7 49 °C
  ];

  for (const { f, correction, tol } of table) {
    it(`matches the published correction at ${f} °F for SG 1.000 and 1.040`, () => {
      near(correctHydrometer(1.0, fToC(f), 15) - 1.0, correction, tol); // [P] S7
      near(correctHydrometer(1.04, fToC(f), 15) - 1.04, correction, tol); // [P] S7
    });
  }

  it('gives negative corrections below the calibration temperature', () => {
    // S7 prints these rows unsigned; physically they are negative.
    near(correctHydrometer(1.0, 4, 15) - 1.0, -0.001, 0.0001); // [C:F3.1] −0.0010 at 4 °C
    near(correctHydrometer(1.0, 10, 15) - 1.0, -0.0006, 0.0001); // [C:F3.1] −0.0006 at 10 °C
  });

  it('defaults to a 20 °C hydrometer and is the identity at the calibration temperature', () => {
    near(correctHydrometer(1.04, 20), 1.04, 1e-12); // [C:F3.1]
    near(correctHydrometer(1.012, 15, 15), 1.012, 1e-12); // [C:F3.1]
    expect(correctHydrometer(1.05, 30)).toBeGreaterThan(1.05); // [C:F3.1] warm sample reads low
  });

  it('rejects temperatures outside 0–60 °C and bad gravities', () => {
    expect(() => correctHydrometer(1.04, 61)).toThrow(/sampleC.*0.*60/);
    expect(() => correctHydrometer(1.04, -1)).toThrow(RangeError);
    expect(() => correctHydrometer(1.04, 20, 70)).toThrow(/calibrationC/);
    expect(() => correctHydrometer(1.3, 20)).toThrow(/sg/);
    expect(() => correctHydrometer(1.04, Number.NaN)).toThrow(/NaN/);
  });
});

// -----------------------------------------------------------------------------------------------
describe('§4 attenuation, real extract, alcohol (Balling family)', () => {
  const sg = (p: number): number => platoToSg(p);
  /** F4.3, Balling: OE from A and RE (used for round trips). */
  const ballingOe = (a: number, re: number): number => (100 * (2.0665 * a + re)) / (100 + 1.0665 * a);

  it('OE 12.0, AE 2.4', () => {
    const og = sg(12);
    const fg = sg(2.4);
    near(apparentAttenuation(og, fg), 80.0, 0.001); // [C:F4.1] ADF 80.000
    near(realExtract(og, fg), 4.1357, 0.001); // [C:F4.2] RE 4.1357
    near(alcoholByWeight(og, fg), 4.0569, 0.001); // [C:F4.4] A 4.0569
    near(realAttenuation(og, fg), 66.965, 0.001); // [C:F4.5] RDF 66.965
    near(0.8192 * apparentAttenuation(og, fg), 65.536, 0.001); // [C:F4.5s] uncorrected RDF 65.536 (not exported)
    near(ballingOe(alcoholByWeight(og, fg), realExtract(og, fg)), 12.0, 0.0001); // [C:F4.3] round trip 12.0000
  });

  it('OE 12.0, AE 3.0 and OE 15.0, AE 3.0', () => {
    near(realExtract(sg(12), sg(3)), 4.6272, 0.001); // [C:F4.2]
    near(alcoholByWeight(sg(12), sg(3)), 3.8033, 0.001); // [C:F4.4]
    near(apparentAttenuation(sg(12), sg(3)), 75.0, 0.001); // [C:F4.1]
    near(realAttenuation(sg(12), sg(3)), 62.943, 0.001); // [C:F4.5]
    near(realExtract(sg(15), sg(3)), 5.1696, 0.001); // [C:F4.2]
    near(alcoholByWeight(sg(15), sg(3)), 5.1562, 0.001); // [C:F4.4]
    near(realAttenuation(sg(15), sg(3)), 67.332, 0.001); // [C:F4.5]
    near(ballingOe(alcoholByWeight(sg(15), sg(3)), realExtract(sg(15), sg(3))), 15.0, 0.0001); // [C:F4.3] round trip
  });

  it('OE 12.0, A 3.9: both F4.5 forms agree (identity test)', () => {
    const a = 3.9;
    const re = (12 * (100 + 1.0665 * a)) / 100 - 2.0665 * a; // F4.3 solved for RE
    near(re, 4.43977, 0.00001); // [C] RE 4.43977 from F4.3
    const ae = (re - 0.1808 * 12) / 0.8192; // F4.2 solved for AE
    const og = sg(12);
    const fg = sg(ae);
    near(alcoholByWeight(og, fg), 3.9, 0.0001); // [C:F4.4] recovers A
    near(realAttenuation(og, fg), 64.479, 0.001); // [C] RDF 64.479 by F4.5
    near((100 * 2.0665 * a) / (2.0665 * a + re), 64.479, 0.001); // [C] RDF 64.479 by the 2.0665A form of F4.5
  });

  it('OG 1.050, FG 1.010', () => {
    near(sgToPlato(1.05), 12.388, 0.001); // [C:F2.1] OE
    near(sgToPlato(1.01), 2.561, 0.001); // [C:F2.1] AE
    near(realExtract(1.05, 1.01), 4.337, 0.001); // [C:F4.2] RE
    near(alcoholByWeight(1.05, 1.01), 4.162, 0.001); // [C:F4.4] A
    near(abv(1.05, 1.01), 5.316, 0.001); // [C:F4.6] (÷0.794 would give 5.294)
    near(apparentAttenuation(1.05, 1.01), 79.33, 0.005); // [C:F4.1] ADF 79.33 %
    near((100 * (1.05 - 1.01)) / (1.05 - 1), 80.0, 1e-9); // [C:F4.1] SG-form AA 80.00 % (reads higher; not exported)
    near(realAttenuation(1.05, 1.01), 66.47, 0.005); // [C:F4.5] RDF 66.47 %
    const hall = ((76.08 * (1.05 - 1.01)) / (1.775 - 1.05)) * (1.01 / 0.794); // F4.7
    near(hall, 5.339, 0.001); // [C:F4.7] Hall 5.339
    near(abv(1.05, 1.01), hall, 0.05); // [C] implementations with different fits agree within ±0.05 %ABV here
  });

  it('uses the density form F4.6, not the 131 × ΔSG shortcut', () => {
    near(abv(1.06, 1.012), 6.41, 0.001); // [C:F4.6] 6.410
    near(abv(1.08, 1.02), 8.095, 0.001); // [C:F4.6] 8.095
    near(131.25 * (1.08 - 1.02), 7.875, 1e-9); // [CP] F4.8 7.875 for comparison
    expect(abv(1.08, 1.02)).toBeGreaterThan(131.25 * (1.08 - 1.02) + 0.2); // [C] the shortcut under-reads at high OG
    near(131 * (1.055 - 1.0), 7.205, 1e-9); // [P] S15 README example of the shortcut (documents what abv() is not)
    expect(Math.abs(abv(1.055, 1.0) - 7.205)).toBeGreaterThan(0.05); // [C:F4.6] differs from the shortcut
  });

  it('keeps the Balling mass balance constants consistent', () => {
    near(1.0 + 0.9565 + 0.11, 2.0665, 1e-12); // [P] S9 2.0665 g extract → 1 g ethanol + 0.9565 g CO₂ + 0.11 g yeast
  });

  it('zero attenuation when fg equals og', () => {
    expect(apparentAttenuation(1.048, 1.048)).toBe(0); // [C:F4.1]
    near(alcoholByWeight(1.048, 1.048), 0, 1e-12); // [C:F4.4]
    near(realAttenuation(1.048, 1.048), 0, 1e-12); // [C:F4.5]
  });

  it('rejects fg above og, og at or below 1.000 and out-of-range gravities', () => {
    expect(() => apparentAttenuation(1.01, 1.05)).toThrow(/fg must not exceed og/);
    expect(() => abv(1.04, 1.041)).toThrow(RangeError);
    expect(() => realAttenuation(1.0, 0.998)).toThrow(/og must be above 1\.000/);
    expect(() => alcoholByWeight(1.21, 1.01)).toThrow(/og.*0\.98.*1\.2/);
    expect(() => realExtract(1.05, 0.97)).toThrow(/fg/);
    expect(() => abv(Number.NaN, 1.01)).toThrow(/og.*NaN/);
  });
});

// -----------------------------------------------------------------------------------------------
describe('refractometer (Terrill cubic; not in REFERENCE.md)', () => {
  it('brixToSg matches F2.4 (wort before fermentation)', () => {
    near(brixToSg(9.99325), 1.04, 0.000005); // [P] S2 1.040 ↔ 9.99325 °Bx
  });

  it('corrects readings taken after fermentation began', () => {
    // Expected values computed from Terrill's published cubic (seanterrill.com 2011-04-07); the
    // coefficients are from memory and not in REFERENCE.md, so these only pin the implementation.
    near(refractometerFinalGravity(12, 6), 1.011375, 0.000005); // [C:Terrill cubic] from memory, WCF 1.04
    near(refractometerFinalGravity(20, 9), 1.011373, 0.000005); // [C:Terrill cubic] from memory, WCF 1.04
    near(refractometerFinalGravity(15, 7.5, 1.0), 1.013471, 0.000005); // [C:Terrill cubic] from memory, WCF 1.00
    expect(refractometerFinalGravity(12, 6)).toBe(refractometerFinalGravity(12, 6, 1.04)); // default WCF 1.04 (from memory)
    // Sanity: a typical 12 °Bx wort read at 6 °Bx after fermentation finished lands near 1.010 [CP].
    expect(refractometerFinalGravity(12, 6)).toBeGreaterThan(1.005);
    expect(refractometerFinalGravity(12, 6)).toBeLessThan(1.015);
  });

  it('rejects a final reading above the original and out-of-range inputs', () => {
    expect(() => refractometerFinalGravity(10, 12)).toThrow(/finalBrix must not exceed originalBrix/);
    expect(() => refractometerFinalGravity(45, 6)).toThrow(/originalBrix.*0.*40/);
    expect(() => refractometerFinalGravity(12, 6, 0.5)).toThrow(/wortCorrectionFactor/);
    expect(() => refractometerFinalGravity(12, Number.NaN)).toThrow(/finalBrix.*NaN/);
  });
});
