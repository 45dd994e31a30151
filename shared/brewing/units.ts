/**
 * Unit conversions at the boundary: volume, temperature, pressure and length (REFERENCE §1).
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

/** Litres → US beer barrels (31 US gal, 117.347765304 L; REFERENCE §1, 27 CFR 25.151). */
export function litersToUsBarrels(l: number): number {
  requireNonNegative('l', l, 'L');
  return l / LITRES_PER_US_BARREL;
}

/** US beer barrels (31 US gal) → litres (REFERENCE §1). */
export function usBarrelsToLiters(bbl: number): number {
  requireNonNegative('bbl', bbl, 'bbl');
  return bbl * LITRES_PER_US_BARREL;
}

/** Litres → US gallons (231 in³ = 3.785411784 L exactly; REFERENCE §1). */
export function litersToUsGallons(l: number): number {
  requireNonNegative('l', l, 'L');
  return l / LITRES_PER_US_GALLON;
}

/** US gallons → litres (3.785411784 L/gal exactly; REFERENCE §1). */
export function usGallonsToLiters(gal: number): number {
  requireNonNegative('gal', gal, 'US gal');
  return gal * LITRES_PER_US_GALLON;
}

/** °C → °F (°F = 1.8·°C + 32; REFERENCE §1 definition). */
export function celsiusToFahrenheit(c: number): number {
  requireFinite('c', c);
  if (c < ABSOLUTE_ZERO_C) {
    throw new RangeError(`c must be at or above absolute zero (${ABSOLUTE_ZERO_C} °C); got ${c}`);
  }
  return c * 1.8 + 32;
}

/** °F → °C (°C = (°F − 32)/1.8; REFERENCE §1 definition). */
export function fahrenheitToCelsius(f: number): number {
  requireFinite('f', f);
  if (f < ABSOLUTE_ZERO_F) {
    throw new RangeError(`f must be at or above absolute zero (${ABSOLUTE_ZERO_F} °F); got ${f}`);
  }
  return (f - 32) / 1.8;
}

/** kPa → psi (1 psi = 6.894757293 kPa; REFERENCE §1). Gauge values may be negative (vacuum). */
export function kpaToPsi(kpa: number): number {
  requireFinite('kpa', kpa);
  return kpa / KPA_PER_PSI;
}

/** psi → kPa (1 psi = 6.894757293 kPa; REFERENCE §1). */
export function psiToKpa(psi: number): number {
  requireFinite('psi', psi);
  return psi * KPA_PER_PSI;
}

/** kPa → bar (1 bar = 100 kPa). */
export function kpaToBar(kpa: number): number {
  requireFinite('kpa', kpa);
  return kpa / KPA_PER_BAR;
}

/** bar → kPa (1 bar = 100 kPa). */
export function barToKpa(bar: number): number {
  requireFinite('bar', bar);
  return bar * KPA_PER_BAR;
}

/** Metres → international feet (1 ft = 0.3048 m exactly). Negative values (a drop) are allowed. */
export function metresToFeet(m: number): number {
  requireFinite('m', m);
  return m / METRES_PER_FOOT;
}

/** International feet → metres (1 ft = 0.3048 m exactly). */
export function feetToMetres(ft: number): number {
  requireFinite('ft', ft);
  return ft * METRES_PER_FOOT;
}

/** Millimetres → international inches (1 in = 25.4 mm exactly); a line's inside diameter. */
export function millimetresToInches(mm: number): number {
  requireNonNegative('mm', mm, 'mm');
  return mm / MILLIMETRES_PER_INCH;
}

/** International inches → millimetres (1 in = 25.4 mm exactly). */
export function inchesToMillimetres(inches: number): number {
  requireNonNegative('inches', inches, 'in');
  return inches * MILLIMETRES_PER_INCH;
}

/** Kilograms → avoirdupois pounds (1 lb = 0.45359237 kg exactly); a CO2 cylinder's fill. */
export function kilogramsToPounds(kg: number): number {
  requireNonNegative('kg', kg, 'kg');
  return kg / KILOGRAMS_PER_POUND;
}

/** Avoirdupois pounds → kilograms (1 lb = 0.45359237 kg exactly). */
export function poundsToKilograms(lb: number): number {
  requireNonNegative('lb', lb, 'lb');
  return lb * KILOGRAMS_PER_POUND;
}
