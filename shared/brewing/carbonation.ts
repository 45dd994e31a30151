/**
 * Keg carbonation: CO2 volumes from pressure and temperature, and the pressure for a target (REFERENCE §5).
 */
import { KPA_PER_PSI, METRES_PER_FOOT } from './constants.ts';
import {
  ALTITUDE_MAX_M,
  ALTITUDE_MIN_M,
  CARBONATION_MAX_C,
  CARBONATION_MAX_KPA,
  CARBONATION_MAX_VOLUMES,
  CARBONATION_MIN_C,
  CARBONATION_MIN_VOLUMES,
  requireRange,
} from './validation.ts';

/** F5.1 sea-level gauge pressure in psi, T in °F. */
function carbonationPsig(volumes: number, tempF: number): number {
  return -16.6999 - 0.0101059 * tempF + 0.00116512 * tempF * tempF + 0.173354 * tempF * volumes + 4.24267 * volumes - 0.0684226 * volumes * volumes;
}

/** F5.5: the drop of atmospheric pressure at `altitudeFt`, in psi (ISA troposphere). */
function altitudeCorrectionPsi(altitudeFt: number): number {
  const seaLevelPsia = 14.696;
  return seaLevelPsia - seaLevelPsia * (1 - 6.87559e-6 * altitudeFt) ** 5.25588;
}

/**
 * Dissolved CO₂ in volumes at equilibrium with a gauge head pressure, F5.2 (the inverse of F5.1,
 * the smaller root of the quadratic in V): a = −0.0684226, b = 0.173354·T + 4.24267,
 * c = −16.6999 − 0.0101059·T + 0.00116512·T² − P, V = (−b + √(b² − 4ac))/(2a), T °F, P psig.
 * Sea-level gauge pressure 0–400 kPa; beer temperature −2 to 30 °C.
 */
export function co2Volumes(pressureKpaGauge: number, tempC: number): number {
  requireRange('pressureKpaGauge', pressureKpaGauge, 0, CARBONATION_MAX_KPA, 'kPa gauge');
  requireRange('tempC', tempC, CARBONATION_MIN_C, CARBONATION_MAX_C, '°C');
  const t = tempC * 1.8 + 32;
  const p = pressureKpaGauge / KPA_PER_PSI;
  const a = -0.0684226;
  const b = 0.173354 * t + 4.24267;
  const c = -16.6999 - 0.0101059 * t + 0.00116512 * t * t - p;
  // Discriminant stays positive over the accepted ranges (it reaches zero only near 280 psig).
  return (-b + Math.sqrt(b * b - 4 * a * c)) / (2 * a);
}

/**
 * Regulator (gauge) pressure in kPa that carbonates beer at `tempC` to `volumes` of CO₂:
 * F5.1 at sea level, plus the F5.5 altitude correction (gauges read against the thinner local
 * atmosphere, so the setting rises by about 1 psi per 2,000 ft — REFERENCE §8).
 * Volumes 0–6, beer temperature −2 to 30 °C, altitude −500 to 11 000 m. A result at or below 0
 * means the beer already holds that much CO₂ at atmospheric pressure.
 */
export function carbonationPressureKpa(volumes: number, tempC: number, altitudeM = 0): number {
  requireRange('volumes', volumes, CARBONATION_MIN_VOLUMES, CARBONATION_MAX_VOLUMES, 'volumes CO₂');
  requireRange('tempC', tempC, CARBONATION_MIN_C, CARBONATION_MAX_C, '°C');
  requireRange('altitudeM', altitudeM, ALTITUDE_MIN_M, ALTITUDE_MAX_M, 'm');
  const psig = carbonationPsig(volumes, tempC * 1.8 + 32) + altitudeCorrectionPsi(altitudeM / METRES_PER_FOOT);
  return psig * KPA_PER_PSI;
}
