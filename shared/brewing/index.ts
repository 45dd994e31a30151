/**
 * Brewing math for Cellarwright: gravity scales, attenuation and alcohol, hydrometer and
 * refractometer corrections, keg carbonation, draught line balance, keg purging, unit
 * conversions and fermentation-curve helpers.
 *
 * Pure functions, SI units in and out (litres, °C, kPa gauge, metres); gravities are specific
 * gravity 20 °C/20 °C unless a name says otherwise. Formula ids (F2.1, F4.5, …) refer to the
 * brewing reference sheet (REFERENCE.md). Formulas published in US units
 * (°F, psi, ft) are evaluated in those units internally and converted at the boundary.
 *
 * Bad input throws a RangeError whose message names the parameter and its valid range.
 */

export * from './units.ts';
export * from './gravity.ts';
export * from './gravity-corrections.ts';
export * from './alcohol.ts';
export * from './carbonation.ts';
export * from './line-balance.ts';
export * from './purging.ts';
export * from './fermentation-curve.ts';
