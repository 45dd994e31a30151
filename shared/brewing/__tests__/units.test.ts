// Brewing maths, §1: exact conversion facts, checked against the published figures and mathjs. Every check value names its source (REFERENCE.md).
import { describe, it, expect } from 'vitest';
import { unit } from 'mathjs';
import * as units from '../units.ts';
import { near, US_FLUID_OUNCE_L } from './check-values.ts';

describe('§1 units and exact conversion facts', () => {
  it('uses the exact gallon, beer-barrel and psi constants', () => {
    expect(units.usGallonsToLiters(1)).toBe(3.785411784); // [C] from S20 (231 in³)
    near(units.usBarrelsToLiters(1), 117.347765304, 1e-9); // [P] S19 31 gal; L value [C]
    near(units.litersToUsGallons(units.usBarrelsToLiters(1)), 31, 1e-12); // [P] S19, S20
    near(units.psiToKpa(1), 6.894757293, 1e-9); // [C] lbf 4.4482216152605 N / in² 0.0254² m²
    near(units.kpaToPsi(100), 14.50377377, 1e-8); // [C] 1 bar
    near(units.kpaToPsi(101.325), 14.69595, 1e-5); // [C] 1 atm
    expect(units.barToKpa(1)).toBe(100); // definition
    expect(units.kpaToBar(250)).toBe(2.5); // definition
    near(units.usGallonsToLiters(5), 18.92705892, 1e-9); // [C] 5 US gal soda keg
    near(units.usBarrelsToLiters(0.5), 58.6739, 5e-5); // [C] half barrel 15.5 gal
    near(units.usBarrelsToLiters(0.25), 29.3369, 5e-5); // [C] quarter barrel 7.75 gal
    near(units.usBarrelsToLiters(1 / 6), 19.558, 5e-5); // [C] sixth barrel 5.1667 gal
    near(units.usBarrelsToLiters(1) / 100, 1.17347765, 1e-8); // [C] 1 bbl in hL
    near(units.litersToUsBarrels(100), 0.85216791, 1e-8); // [C] 1 hL in bbl
  });

  it('reproduces the 27 CFR barrel equivalents to ±0.000005 bbl', () => {
    near(units.litersToUsBarrels(units.usGallonsToLiters(5)), 0.16129, 0.000005); // [P] S19, 27 CFR 25.156(a): 5 gal keg
    near(units.litersToUsBarrels(50), 0.42608, 0.000005); // [P] S19, 27 CFR 25.156(a): 50 L keg
    near(units.litersToUsBarrels(24 * 12 * US_FLUID_OUNCE_L), 0.07258, 0.000005); // [P] S19, 27 CFR 25.158(a): 24 × 12 fl oz
    near(units.litersToUsBarrels(24 * 0.5), 0.10226, 0.000005); // [P] S19, 27 CFR 25.158(b): 24 × 500 mL
  });

  it('converts temperatures and lengths', () => {
    expect(units.fahrenheitToCelsius(32)).toBe(0); // definition (°F − 32)/1.8
    expect(units.celsiusToFahrenheit(100)).toBe(212); // definition
    near(units.fahrenheitToCelsius(38), 3.3333333, 1e-7); // definition: serving temperature 38 °F ([P2] S24)
    near(units.celsiusToFahrenheit(units.fahrenheitToCelsius(-40)), -40, 1e-12); // definition
    expect(units.feetToMetres(1)).toBe(0.3048); // definition (international foot)
    near(units.metresToFeet(609.6), 2000, 1e-9); // [P] S27 "2,000 ft (609.6 m)"
  });

  it('agrees with mathjs units (outside cross-check, REFERENCE §11)', () => {
    // REFERENCE §11: mathjs@15.2.0 beerbarrel 117.3477653 L, gallon 3.785411784 L, psi 6.8947572928 kPa.
    // Not used here: js-quantities' `bbl` is the 42-gal petroleum barrel (158.987 L), not a beer barrel.
    near(units.usBarrelsToLiters(1), unit(1, 'beerbarrel').toNumber('L'), 1e-9); // [C] mathjs cross-check
    near(units.usGallonsToLiters(1), unit(1, 'gallon').toNumber('L'), 1e-12); // [C] mathjs cross-check
    expect(Math.abs(units.psiToKpa(1) / unit(1, 'psi').toNumber('kPa') - 1)).toBeLessThan(1e-9); // [C] mathjs, ≤1e-10 rel.
    near(units.litersToUsBarrels(unit(288, 'fluidounce').toNumber('L')), 0.07258, 0.000005); // [P] S19 via mathjs fl oz
    near(units.fahrenheitToCelsius(38), unit(38, 'degF').toNumber('degC'), 1e-9); // [C] mathjs cross-check
    near(units.metresToFeet(1), unit(1, 'm').toNumber('ft'), 1e-12); // [C] mathjs cross-check
  });

  it('converts line diameters and cylinder fills', () => {
    expect(units.inchesToMillimetres(1)).toBe(25.4); // definition (international inch)
    near(units.millimetresToInches(4.7625), 0.1875, 1e-12); // definition: 3/16 in line
    expect(units.poundsToKilograms(1)).toBe(0.45359237); // definition (international avoirdupois pound)
    near(units.kilogramsToPounds(1), unit(1, 'kg').toNumber('lb'), 1e-12); // [C] mathjs cross-check
    expect(() => units.millimetresToInches(-1)).toThrow(RangeError);
    expect(() => units.poundsToKilograms(Number.NaN)).toThrow(/lb.*NaN/);
  });

  it('rejects negative volumes, non-finite numbers and temperatures below absolute zero', () => {
    expect(() => units.litersToUsBarrels(-1)).toThrow(RangeError);
    expect(() => units.usGallonsToLiters(-0.5)).toThrow(/gal/);
    expect(() => units.usBarrelsToLiters(Number.NaN)).toThrow(/bbl.*NaN/);
    expect(() => units.litersToUsGallons(Number.POSITIVE_INFINITY)).toThrow(RangeError);
    expect(() => units.kpaToPsi(Number.NaN)).toThrow(/kpa/);
    expect(() => units.fahrenheitToCelsius(-500)).toThrow(/absolute zero/);
    expect(() => units.celsiusToFahrenheit(-300)).toThrow(RangeError);
    expect(() => units.metresToFeet(Number.NaN)).toThrow(RangeError);
  });
});
