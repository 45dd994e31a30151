/**
 * Keg purging: oxygen left after pressure purges (REFERENCE §7).
 */
import { STANDARD_ATMOSPHERE_KPA } from './constants.ts';
import { formatNumber, requireRange } from './validation.ts';

/** Oxygen in air, % by volume (F7.1 x₀). */
const AIR_OXYGEN_PERCENT = 20.95;

/**
 * Oxygen left in a keg headspace after `cycles` fill-and-vent purges with CO₂ to a gauge
 * pressure, F7.1 (ideal full mixing): x_n = 20.95 % × (P_atm/(P_atm + P_g))^n, P_atm 101.325 kPa.
 * Pressure 0–1000 kPa gauge; cycles a whole number 0–100.
 */
export function purgeOxygenPercent(pressureKpaGauge: number, cycles: number): number {
  requireRange('pressureKpaGauge', pressureKpaGauge, 0, 1000, 'kPa gauge');
  if (!Number.isInteger(cycles) || cycles < 0 || cycles > 100) {
    throw new RangeError(`cycles must be a whole number from 0 to 100; got ${formatNumber(cycles)}`);
  }
  return AIR_OXYGEN_PERCENT * (STANDARD_ATMOSPHERE_KPA / (STANDARD_ATMOSPHERE_KPA + pressureKpaGauge)) ** cycles;
}
