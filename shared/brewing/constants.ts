/**
 * Exact unit constants: the one place the conversion factors are written, with their sources (REFERENCE §1).
 */
/** US gallon = 231 in³ = 3.785411784 L exactly. */
export const LITRES_PER_US_GALLON = 3.785411784;
/** US beer barrel = 31 US gallons (27 CFR 25.151). */
const US_GALLONS_PER_US_BARREL = 31;
export const LITRES_PER_US_BARREL = LITRES_PER_US_GALLON * US_GALLONS_PER_US_BARREL;
/** 1 psi = 4.4482216152605 N / (0.0254 m)² = 6.894757293 kPa. */
export const KPA_PER_PSI = 4.4482216152605 / (0.0254 * 0.0254) / 1000;
export const KPA_PER_BAR = 100;
export const METRES_PER_FOOT = 0.3048;
/** International inch = 25.4 mm exactly. */
export const MILLIMETRES_PER_INCH = 25.4;
/** International avoirdupois pound = 0.45359237 kg exactly. */
export const KILOGRAMS_PER_POUND = 0.45359237;
/** Standard atmosphere, 101.325 kPa (= 14.69595 psi). */
export const STANDARD_ATMOSPHERE_KPA = 101.325;
