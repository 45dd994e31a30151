/**
 * Unit conversions at the boundary: volume, temperature, pressure and length (REFERENCE §1).
 *
 * Every pair is one linear relation, `small = big · per + offset`, read both ways by `linear()`;
 * each side checks what it is given first (a quantity ≥ 0, any finite number, or a temperature at or
 * above absolute zero) and throws a RangeError naming the parameter.
 */
import {
  KILOGRAMS_PER_POUND,
  KPA_PER_BAR,
  KPA_PER_PSI,
  LITRES_PER_US_BARREL,
  LITRES_PER_US_GALLON,
  METRES_PER_FOOT,
  MILLIMETRES_PER_INCH,
} from './constants.ts';
import { ABSOLUTE_ZERO_C, ABSOLUTE_ZERO_F, requireFinite, requireNonNegative } from './validation.ts';

type Check = (value: number) => void;
type Conversion = (value: number) => number;

/** A quantity that cannot be negative (a volume, a diameter, a weight). */
const quantity =
  (name: string, unit: string): Check =>
  (value) =>
    requireNonNegative(name, value, unit);

/** Any finite number (gauge pressures may be negative, a length may be a drop). */
const signed =
  (name: string): Check =>
  (value) =>
    requireFinite(name, value);

/** A temperature at or above absolute zero on its scale. */
const temperature =
  (name: string, absoluteZero: number, unit: string): Check =>
  (value) => {
    requireFinite(name, value);
    if (value < absoluteZero) {
      throw new RangeError(`${name} must be at or above absolute zero (${absoluteZero} ${unit}); got ${value}`);
    }
  };

/**
 * Both directions of `small = big · per + offset`: [big → small, small → big]. The factor is applied
 * as given (multiplied one way, divided the other), so exact constants stay exact.
 */
function linear(per: number, big: Check, small: Check, offset = 0): readonly [Conversion, Conversion] {
  return [
    (value) => {
      big(value);
      return value * per + offset;
    },
    (value) => {
      small(value);
      return (value - offset) / per;
    },
  ];
}

/** US beer barrels (31 US gal, 117.347765304 L; REFERENCE §1, 27 CFR 25.151) ↔ litres. */
export const [usBarrelsToLiters, litersToUsBarrels] = linear(LITRES_PER_US_BARREL, quantity('bbl', 'bbl'), quantity('l', 'L'));

/** US gallons ↔ litres (231 in³ = 3.785411784 L exactly; REFERENCE §1). */
export const [usGallonsToLiters, litersToUsGallons] = linear(LITRES_PER_US_GALLON, quantity('gal', 'US gal'), quantity('l', 'L'));

/** °C ↔ °F (°F = 1.8·°C + 32; REFERENCE §1 definition). */
export const [celsiusToFahrenheit, fahrenheitToCelsius] = linear(1.8, temperature('c', ABSOLUTE_ZERO_C, '°C'), temperature('f', ABSOLUTE_ZERO_F, '°F'), 32);

/** psi ↔ kPa (1 psi = 6.894757293 kPa; REFERENCE §1). Gauge values may be negative (vacuum). */
export const [psiToKpa, kpaToPsi] = linear(KPA_PER_PSI, signed('psi'), signed('kpa'));

/** bar ↔ kPa (1 bar = 100 kPa). */
export const [barToKpa, kpaToBar] = linear(KPA_PER_BAR, signed('bar'), signed('kpa'));

/** International feet ↔ metres (1 ft = 0.3048 m exactly). Negative values (a drop) are allowed. */
export const [feetToMetres, metresToFeet] = linear(METRES_PER_FOOT, signed('ft'), signed('m'));

/** International inches ↔ millimetres (1 in = 25.4 mm exactly); a line's inside diameter. */
export const [inchesToMillimetres, millimetresToInches] = linear(MILLIMETRES_PER_INCH, quantity('inches', 'in'), quantity('mm', 'mm'));

/** Avoirdupois pounds ↔ kilograms (1 lb = 0.45359237 kg exactly); a CO2 cylinder's fill. */
export const [poundsToKilograms, kilogramsToPounds] = linear(KILOGRAMS_PER_POUND, quantity('lb', 'lb'), quantity('kg', 'kg'));
