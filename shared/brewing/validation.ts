/**
 * Checks shared by the brewing formulas: each throws a RangeError naming the parameter and its valid range.
 */
export const GRAVITY_MIN = 0.98;
export const GRAVITY_MAX = 1.2;
const EXTRACT_MIN = 0;
export const EXTRACT_MAX = 40;
export const HYDROMETER_MIN_C = 0;
export const HYDROMETER_MAX_C = 60;
/**
 * F5.1 is a regression to a serving-range carbonation chart; −2 to 30 °C (28–86 °F) covers
 * cold storage through warm conditioning, which is the span the product accepts.
 */
export const CARBONATION_MIN_C = -2;
export const CARBONATION_MAX_C = 30;
/** Gauge pressures accepted by the carbonation formulas: 0–400 kPa (0–58 psig). */
export const CARBONATION_MAX_KPA = 400;
export const CARBONATION_MIN_VOLUMES = 0;
export const CARBONATION_MAX_VOLUMES = 6;
/** F5.5 is the ISA troposphere formula: valid from below sea level up to 11 km. */
export const ALTITUDE_MIN_M = -500;
export const ALTITUDE_MAX_M = 11_000;
/** F2.4 was fitted to the NBS sucrose table for S 1.00000–1.17874 (0–40 °Bx). */
export const BRIX_FIT_SG_MIN = 1.0;
export const BRIX_FIT_SG_MAX = 1.17874;
export const ABSOLUTE_ZERO_C = -273.15;
export const ABSOLUTE_ZERO_F = -459.67;

export function formatNumber(value: number): string {
  return Number.isNaN(value) ? 'NaN' : String(value);
}

export function requireFinite(name: string, value: number): void {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new RangeError(`${name} must be a finite number; got ${formatNumber(value)}`);
  }
}

export function requireRange(name: string, value: number, min: number, max: number, unit: string, digits?: number): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < min || value > max) {
    const lo = digits === undefined ? String(min) : min.toFixed(digits);
    const hi = digits === undefined ? String(max) : max.toFixed(digits);
    throw new RangeError(`${name} must be a finite number from ${lo} to ${hi}${unit ? ` ${unit}` : ''}; got ${formatNumber(value)}`);
  }
}

export function requireGravity(name: string, sg: number): void {
  requireRange(name, sg, GRAVITY_MIN, GRAVITY_MAX, '(specific gravity)', 3);
}

export function requireExtract(name: string, value: number, scale: '°P' | '°Bx'): void {
  requireRange(name, value, EXTRACT_MIN, EXTRACT_MAX, scale);
}

export function requireNonNegative(name: string, value: number, unit: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) {
    throw new RangeError(`${name} must be a finite number ≥ 0 ${unit}; got ${formatNumber(value)}`);
  }
}
