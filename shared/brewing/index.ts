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

// ---------------------------------------------------------------------------------------------
// Exact unit constants (REFERENCE §1)
// ---------------------------------------------------------------------------------------------

/** US gallon = 231 in³ = 3.785411784 L exactly. */
const LITRES_PER_US_GALLON = 3.785411784;
/** US beer barrel = 31 US gallons (27 CFR 25.151). */
const US_GALLONS_PER_US_BARREL = 31;
const LITRES_PER_US_BARREL = LITRES_PER_US_GALLON * US_GALLONS_PER_US_BARREL;
/** 1 psi = 4.4482216152605 N / (0.0254 m)² = 6.894757293 kPa. */
const KPA_PER_PSI = 4.4482216152605 / (0.0254 * 0.0254) / 1000;
const KPA_PER_BAR = 100;
const METRES_PER_FOOT = 0.3048;
/** International inch = 25.4 mm exactly. */
const MILLIMETRES_PER_INCH = 25.4;
/** International avoirdupois pound = 0.45359237 kg exactly. */
const KILOGRAMS_PER_POUND = 0.45359237;
/** Standard atmosphere, 101.325 kPa (= 14.69595 psi). */
const STANDARD_ATMOSPHERE_KPA = 101.325;

// ---------------------------------------------------------------------------------------------
// Validation
// ---------------------------------------------------------------------------------------------

const GRAVITY_MIN = 0.98;
const GRAVITY_MAX = 1.2;
const EXTRACT_MIN = 0;
const EXTRACT_MAX = 40;
const HYDROMETER_MIN_C = 0;
const HYDROMETER_MAX_C = 60;
/**
 * F5.1 is a regression to a serving-range carbonation chart; −2 to 30 °C (28–86 °F) covers
 * cold storage through warm conditioning, which is the span the product accepts.
 */
const CARBONATION_MIN_C = -2;
const CARBONATION_MAX_C = 30;
/** Gauge pressures accepted by the carbonation formulas: 0–400 kPa (0–58 psig). */
const CARBONATION_MAX_KPA = 400;
const CARBONATION_MIN_VOLUMES = 0;
const CARBONATION_MAX_VOLUMES = 6;
/** F5.5 is the ISA troposphere formula: valid from below sea level up to 11 km. */
const ALTITUDE_MIN_M = -500;
const ALTITUDE_MAX_M = 11_000;
/** F2.4 was fitted to the NBS sucrose table for S 1.00000–1.17874 (0–40 °Bx). */
const BRIX_FIT_SG_MIN = 1.0;
const BRIX_FIT_SG_MAX = 1.17874;
const ABSOLUTE_ZERO_C = -273.15;
const ABSOLUTE_ZERO_F = -459.67;

function formatNumber(value: number): string {
  return Number.isNaN(value) ? 'NaN' : String(value);
}

function requireFinite(name: string, value: number): void {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new RangeError(`${name} must be a finite number; got ${formatNumber(value)}`);
  }
}

function requireRange(name: string, value: number, min: number, max: number, unit: string, digits?: number): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < min || value > max) {
    const lo = digits === undefined ? String(min) : min.toFixed(digits);
    const hi = digits === undefined ? String(max) : max.toFixed(digits);
    throw new RangeError(`${name} must be a finite number from ${lo} to ${hi}${unit ? ` ${unit}` : ''}; got ${formatNumber(value)}`);
  }
}

function requireGravity(name: string, sg: number): void {
  requireRange(name, sg, GRAVITY_MIN, GRAVITY_MAX, '(specific gravity)', 3);
}

function requireExtract(name: string, value: number, scale: '°P' | '°Bx'): void {
  requireRange(name, value, EXTRACT_MIN, EXTRACT_MAX, scale);
}

function requireNonNegative(name: string, value: number, unit: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) {
    throw new RangeError(`${name} must be a finite number ≥ 0 ${unit}; got ${formatNumber(value)}`);
  }
}

/** Validates an OG/FG pair for attenuation and alcohol: both gravities, og above 1.000, fg ≤ og. */
function requireGravityPair(og: number, fg: number): { oe: number; ae: number } {
  requireGravity('og', og);
  requireGravity('fg', fg);
  if (fg > og) {
    throw new RangeError(`fg must not exceed og (fg ${fg} > og ${og})`);
  }
  const oe = plato(og);
  if (!(oe > 0)) {
    throw new RangeError(`og must be above 1.000 so that the original extract is above 0 °P; got ${og}`);
  }
  return { oe, ae: plato(fg) };
}

// ---------------------------------------------------------------------------------------------
// Unit conversions
// ---------------------------------------------------------------------------------------------

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

// ---------------------------------------------------------------------------------------------
// Gravity scales (REFERENCE §2)
// ---------------------------------------------------------------------------------------------

/** F2.1 without validation (internal). */
function plato(sg: number): number {
  return -616.868 + 1111.14 * sg - 630.272 * sg * sg + 135.997 * sg * sg * sg;
}

/** F2.4 without validation (internal). */
function brix(sg: number): number {
  return ((182.4601 * sg - 775.6821) * sg + 1262.7794) * sg - 669.5622;
}

/**
 * Inverts a polynomial that is strictly increasing on [GRAVITY_MIN, GRAVITY_MAX] (true of F2.1
 * and F2.4: their derivatives stay above 180 per unit SG there) by bisection to 1e-12 in SG.
 */
function invertIncreasing(f: (sg: number) => number, target: number): number {
  let lo = GRAVITY_MIN;
  let hi = GRAVITY_MAX;
  for (let i = 0; i < 200 && hi - lo > 1e-12; i += 1) {
    const mid = (lo + hi) / 2;
    if (f(mid) < target) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Specific gravity → degrees Plato by the ASBC polynomial, F2.1:
 * °P = −616.868 + 1111.14·S − 630.272·S² + 135.997·S³.
 * Accepts SG 0.980–1.200; below about 1.000 the result is negative (apparent extract of a
 * finished beer can be), and F2.1 gives −0.003 °P at exactly 1.000.
 */
export function sgToPlato(sg: number): number {
  requireGravity('sg', sg);
  return plato(sg);
}

/**
 * Degrees Plato (0–40) → specific gravity: numerical inverse of F2.1 (F2.1⁻¹, bisection;
 * the result reproduces the input through F2.1 to better than 1e-9 °P).
 */
export function platoToSg(p: number): number {
  requireExtract('plato', p, '°P');
  return invertIncreasing(plato, p);
}

/** Apparent extract accepted by {@link apparentPlatoToSg}: F2.1 over SG 0.980–1.200 spans about −5.26 to 43.9 °P. */
const APPARENT_EXTRACT_MIN = -5;

/**
 * Apparent extract in °P (−5 to 40) → specific gravity: the numerical inverse of F2.1 like
 * {@link platoToSg}, but also below 0 °P, where a hydrometer or digital hydrometer scaled in °P
 * reads a dry finished beer (F2.1 gives −2.61 °P at SG 0.990).
 */
export function apparentPlatoToSg(p: number): number {
  requireRange('plato', p, APPARENT_EXTRACT_MIN, EXTRACT_MAX, '°P');
  return invertIncreasing(plato, p);
}

/**
 * Degrees Brix (0–40) → specific gravity: numerical inverse of the NBS-table fit F2.4,
 * °Bx = 182.4601·S³ − 775.6821·S² + 1262.7794·S − 669.5622 (fit range S 1.00000–1.17874).
 */
export function brixToSg(brixValue: number): number {
  requireExtract('brix', brixValue, '°Bx');
  return invertIncreasing(brix, brixValue);
}

/** Gravity scales understood by {@link convertGravity}. */
export type GravityScale = 'sg' | 'plato' | 'brix';

/**
 * Converts between specific gravity, °Plato and °Brix. SG ↔ °P uses F2.1 / F2.1⁻¹, SG ↔ °Bx uses
 * F2.4 / its inverse, and °P ↔ °Bx goes through SG. Inputs: SG 0.980–1.200 (1.000–1.17874 when
 * converting SG to Brix, F2.4's fit range), °P and °Bx 0–40. In the wort range the two scales agree
 * within about 0.001; the fits drift apart at high extract (40 °P converts to about 40.11 °Bx).
 */
export function convertGravity(value: number, from: GravityScale, to: GravityScale): number {
  let sg: number;
  switch (from) {
    case 'sg':
      requireGravity('value', value);
      if (to === 'brix') {
        requireRange('value', value, BRIX_FIT_SG_MIN, BRIX_FIT_SG_MAX, '(specific gravity, F2.4 fit range)', 5);
      }
      sg = value;
      break;
    case 'plato':
      requireExtract('value', value, '°P');
      sg = invertIncreasing(plato, value);
      break;
    case 'brix':
      requireExtract('value', value, '°Bx');
      sg = invertIncreasing(brix, value);
      break;
    default:
      throw new RangeError(`from must be 'sg', 'plato' or 'brix'; got ${String(from)}`);
  }
  switch (to) {
    case 'sg':
      return from === 'sg' ? value : sg;
    case 'plato':
      return from === 'plato' ? value : plato(sg);
    case 'brix':
      return from === 'brix' ? value : brix(sg);
    default:
      throw new RangeError(`to must be 'sg', 'plato' or 'brix'; got ${String(to)}`);
  }
}

// ---------------------------------------------------------------------------------------------
// Hydrometer temperature correction (REFERENCE §3)
// ---------------------------------------------------------------------------------------------

/** F3.1 water-density factor c(T), T in °F. */
function hydrometerFactor(tempF: number): number {
  return 1.00130346 - 1.34722124e-4 * tempF + 2.04052596e-6 * tempF ** 2 - 2.32820948e-9 * tempF ** 3;
}

/**
 * Corrects a hydrometer reading taken at `sampleC` for an instrument calibrated at
 * `calibrationC` (default 20 °C), F3.1: SG = SG_read × c(T_read)/c(T_cal), with c(T) the cubic
 * water-density fit in °F. Temperatures 0–60 °C.
 */
export function correctHydrometer(sg: number, sampleC: number, calibrationC = 20): number {
  requireGravity('sg', sg);
  requireRange('sampleC', sampleC, HYDROMETER_MIN_C, HYDROMETER_MAX_C, '°C');
  requireRange('calibrationC', calibrationC, HYDROMETER_MIN_C, HYDROMETER_MAX_C, '°C');
  return (sg * hydrometerFactor(sampleC * 1.8 + 32)) / hydrometerFactor(calibrationC * 1.8 + 32);
}

// ---------------------------------------------------------------------------------------------
// Refractometer (Brix readings after fermentation began)
// ---------------------------------------------------------------------------------------------

const WCF_MIN = 0.9;
const WCF_MAX = 1.2;

/**
 * Final (or current) specific gravity from refractometer readings once fermentation has begun,
 * by Sean Terrill's "simplified cubic" (seanterrill.com, "Refractometer FG Results",
 * 2011-04-07), with both readings first divided by the wort correction factor:
 *
 * FG = 1 − 0.0044993·Ri + 0.011774·Rf + 0.00027581·Ri² − 0.0012717·Rf² − 0.0000072800·Ri³
 *      + 0.000063293·Rf³, Ri = originalBrix/WCF, Rf = finalBrix/WCF.
 *
 * Not in REFERENCE.md: the coefficients are from memory, matched against the source text.
 * Terrill fitted it to finished beers above roughly 50 % real attenuation; it is less reliable
 * mid-fermentation. Brix 0–40, finalBrix ≤ originalBrix, WCF 0.9–1.2 (1.04 is the usual
 * default, from memory).
 */
export function refractometerFinalGravity(originalBrix: number, finalBrix: number, wortCorrectionFactor = 1.04): number {
  requireExtract('originalBrix', originalBrix, '°Bx');
  requireExtract('finalBrix', finalBrix, '°Bx');
  requireRange('wortCorrectionFactor', wortCorrectionFactor, WCF_MIN, WCF_MAX, '');
  if (finalBrix > originalBrix) {
    throw new RangeError(`finalBrix must not exceed originalBrix (${finalBrix} > ${originalBrix} °Bx)`);
  }
  const ri = originalBrix / wortCorrectionFactor;
  const rf = finalBrix / wortCorrectionFactor;
  return 1 - 0.0044993 * ri + 0.011774 * rf + 0.00027581 * ri ** 2 - 0.0012717 * rf ** 2 - 0.00000728 * ri ** 3 + 0.000063293 * rf ** 3;
}

// ---------------------------------------------------------------------------------------------
// Attenuation, extract and alcohol (REFERENCE §4)
// ---------------------------------------------------------------------------------------------

/** F4.2 without validation (internal), °P. */
function balling(oe: number, ae: number): number {
  return 0.1808 * oe + 0.8192 * ae;
}

/** F4.4 without validation (internal), % w/w. */
function abwFromExtracts(oe: number, re: number): number {
  return (oe - re) / (2.0665 - 0.010665 * oe);
}

/**
 * Apparent degree of fermentation in %, F4.1 on °Plato: ADF = 100·(OE − AE)/OE, with OE and AE
 * from og and fg by F2.1. (The SG form 100·(OG − FG)/(OG − 1) reads about 0.7 point higher.)
 */
export function apparentAttenuation(og: number, fg: number): number {
  const { oe, ae } = requireGravityPair(og, fg);
  return (100 * (oe - ae)) / oe;
}

/** Real extract in °P by the Balling relation, F4.2: RE = 0.1808·OE + 0.8192·AE (OE, AE by F2.1). */
export function realExtract(og: number, fg: number): number {
  const { oe, ae } = requireGravityPair(og, fg);
  return balling(oe, ae);
}

/** Alcohol by weight (% w/w), F4.4: A = (OE − RE)/(2.0665 − 0.010665·OE), RE by F4.2. */
export function alcoholByWeight(og: number, fg: number): number {
  const { oe, ae } = requireGravityPair(og, fg);
  return abwFromExtracts(oe, balling(oe, ae));
}

/** Densities at 20 °C used by F4.6 (kg/m³; values from memory, REFERENCE §4 tags them [M]). */
const ETHANOL_DENSITY_20C = 789.24;
const WATER_DENSITY_20C = 998.2;

/**
 * The ABV method {@link abv} uses, named wherever an ABV is shown (screens, PDFs, exports): the
 * density form of the Balling relations (F4.6 from F4.4 and F4.2), not the 131 × (OG − FG) shortcut.
 */
export const abvMethod = { id: 'F4.6', name: 'ASBC/Balling' } as const;

/**
 * Alcohol by volume (% v/v), F4.6 density form: ABV = A × ρ_beer/ρ_ethanol with
 * ρ_beer = FG × ρ_water, i.e. ABV = A × FG × 998.20/789.24 = A × FG / 0.79066 (20/20 °C).
 * A by F4.4. Not the 131 × (OG − FG) shortcut, which under-reads at high gravity.
 */
export function abv(og: number, fg: number): number {
  const { oe, ae } = requireGravityPair(og, fg);
  const a = abwFromExtracts(oe, balling(oe, ae));
  return (a * fg * WATER_DENSITY_20C) / ETHANOL_DENSITY_20C;
}

/**
 * Real degree of fermentation in %, F4.5 (the corrected form used for ASBC Beer-6):
 * RDF = 100·(OE − RE)/OE × 1/(1 − 0.005161·RE), identical to 100·2.0665A/(2.0665A + RE).
 * The uncorrected F4.5s (100·(OE − RE)/OE = 0.8192 × ADF) reads 1.3–1.8 points lower; REFERENCE's
 * RDF check values (62.943, 67.332, 66.47) are F4.5.
 */
export function realAttenuation(og: number, fg: number): number {
  const { oe, ae } = requireGravityPair(og, fg);
  const re = balling(oe, ae);
  return (100 * (oe - re)) / oe / (1 - 0.005161 * re);
}

// ---------------------------------------------------------------------------------------------
// Carbonation (REFERENCE §5)
// ---------------------------------------------------------------------------------------------

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

// ---------------------------------------------------------------------------------------------
// Draught line balance (REFERENCE §6)
// ---------------------------------------------------------------------------------------------

/** Tubing kinds with a nominal resistance in {@link lineResistanceKpaPerM}; sizes are inside diameters unless `-od`. */
export type LineTubing =
  | 'vinyl-3/16'
  | 'vinyl-1/4'
  | 'vinyl-5/16'
  | 'vinyl-3/8'
  | 'vinyl-1/2'
  | 'polyethylene-3/16'
  | 'barrier-3/16'
  | 'polyethylene-1/4'
  | 'barrier-5/16'
  | 'stainless-1/4-od'
  | 'stainless-5/16-od'
  | 'stainless-3/8-od';

const psiPerFtToKpaPerM = (psiPerFt: number): number => (psiPerFt * KPA_PER_PSI) / METRES_PER_FOOT;

/** What a beer line is made of; stainless sizes are outside diameters, the rest inside diameters. */
export const lineMaterials = ['vinyl', 'polyethylene', 'barrier', 'stainless'] as const;
export type LineMaterial = (typeof lineMaterials)[number];

/** One published resistance figure for a tubing kind (psi per foot, nominal, cold carbonated beer). */
export interface PublishedLineResistance {
  psiPerFt: number;
  /** Upper end when the source gives a range. */
  psiPerFtMax?: number;
  /** Source ids of REFERENCE §6 (and §8 for common practice). */
  source: string;
}

/** A row of the line resistance table: the figures sources publish and the default the product uses. */
export interface LineTubingFigures {
  tubing: LineTubing;
  material: LineMaterial;
  /** Nominal diameter in inches (inside, or outside for stainless) and in mm. */
  diameterIn: string;
  diameterMm: number;
  published: readonly PublishedLineResistance[];
  /** The default resistance, psi/ft. */
  defaultPsiPerFt: number;
  /** Why the default: a source id, or "common practice" with the rule it reproduces. */
  defaultBasis: string;
}

/**
 * The line resistance table of REFERENCE §6, by tubing inside diameter and material, with the
 * source of every figure. Values vary by maker, temperature and flow, so every default can be
 * overridden per tap and per plan.
 *
 * 3/16" vinyl: sources disagree. The figure quoted from the draught quality manual is 3.0 psi/ft
 * (S28, S30, S31); measured homebrew values run 1.8–2.7 (S32) and 2.2 (S33). At 3.0 a 12 psi
 * line would be about 3.7 ft long, while common practice serves 10–12 psi through 5–10 ft, most
 * often about 8 ft (REFERENCE §8). The default is the common-practice figure: 1.375 psi/ft, so
 * 12 psi less the usual 1 psi faucet and coupler allowance balances 8 ft with no rise.
 */
export const lineTubingTable: readonly LineTubingFigures[] = Object.freeze([
  {
    tubing: 'vinyl-3/16',
    material: 'vinyl',
    diameterIn: '3/16',
    diameterMm: 4.76,
    published: [
      { psiPerFt: 3.0, source: 'S28, S30, S31' },
      { psiPerFt: 1.8, psiPerFtMax: 2.7, source: 'S32' },
      { psiPerFt: 2.2, source: 'S33' },
    ],
    defaultPsiPerFt: 1.375,
    defaultBasis: 'common practice: about 8 ft at 12 psi with a 1 psi allowance',
  },
  {
    tubing: 'vinyl-1/4',
    material: 'vinyl',
    diameterIn: '1/4',
    diameterMm: 6.35,
    published: [{ psiPerFt: 0.85, source: 'S34' }],
    defaultPsiPerFt: 0.85,
    defaultBasis: 'S34',
  },
  {
    tubing: 'vinyl-5/16',
    material: 'vinyl',
    diameterIn: '5/16',
    diameterMm: 7.94,
    published: [{ psiPerFt: 0.4, source: 'S33' }],
    defaultPsiPerFt: 0.4,
    defaultBasis: 'S33',
  },
  {
    tubing: 'vinyl-3/8',
    material: 'vinyl',
    diameterIn: '3/8',
    diameterMm: 9.53,
    published: [{ psiPerFt: 0.2, source: 'S33' }],
    defaultPsiPerFt: 0.2,
    defaultBasis: 'S33',
  },
  {
    tubing: 'vinyl-1/2',
    material: 'vinyl',
    diameterIn: '1/2',
    diameterMm: 12.7,
    published: [{ psiPerFt: 0.025, source: 'S32' }],
    defaultPsiPerFt: 0.025,
    defaultBasis: 'S32',
  },
  {
    tubing: 'polyethylene-3/16',
    material: 'polyethylene',
    diameterIn: '3/16',
    diameterMm: 4.76,
    published: [{ psiPerFt: 2.2, source: 'S30, S33' }],
    defaultPsiPerFt: 2.2,
    defaultBasis: 'S30, S33',
  },
  {
    tubing: 'polyethylene-1/4',
    material: 'polyethylene',
    diameterIn: '1/4',
    diameterMm: 6.35,
    published: [{ psiPerFt: 0.5, source: 'S33' }],
    defaultPsiPerFt: 0.5,
    defaultBasis: 'S33',
  },
  {
    tubing: 'barrier-3/16',
    material: 'barrier',
    diameterIn: '3/16',
    diameterMm: 4.76,
    published: [{ psiPerFt: 2.2, source: 'S30, S33' }],
    defaultPsiPerFt: 2.2,
    defaultBasis: 'S30, S33',
  },
  {
    tubing: 'barrier-5/16',
    material: 'barrier',
    diameterIn: '5/16',
    diameterMm: 7.94,
    published: [{ psiPerFt: 0.1, source: 'S34' }],
    defaultPsiPerFt: 0.1,
    defaultBasis: 'S34',
  },
  // Stainless: one source (S31); another lists 5/16" ID 0.3 and 3/8" 0.12 (S33), so low confidence.
  {
    tubing: 'stainless-1/4-od',
    material: 'stainless',
    diameterIn: '1/4',
    diameterMm: 6.35,
    published: [{ psiPerFt: 2.0, source: 'S31' }],
    defaultPsiPerFt: 2.0,
    defaultBasis: 'S31 (low confidence)',
  },
  {
    tubing: 'stainless-5/16-od',
    material: 'stainless',
    diameterIn: '5/16',
    diameterMm: 7.94,
    published: [
      { psiPerFt: 0.5, source: 'S31' },
      { psiPerFt: 0.3, source: 'S33' },
    ],
    defaultPsiPerFt: 0.5,
    defaultBasis: 'S31 (low confidence)',
  },
  {
    tubing: 'stainless-3/8-od',
    material: 'stainless',
    diameterIn: '3/8',
    diameterMm: 9.53,
    published: [
      { psiPerFt: 0.2, source: 'S31' },
      { psiPerFt: 0.12, source: 'S33' },
    ],
    defaultPsiPerFt: 0.2,
    defaultBasis: 'S31 (low confidence)',
  },
] satisfies LineTubingFigures[]);

/** Default resistance of each tubing kind, kPa per metre (the `defaultPsiPerFt` of {@link lineTubingTable}). */
export const lineResistanceKpaPerM: Readonly<Record<LineTubing, number>> = Object.freeze(
  Object.fromEntries(lineTubingTable.map((t) => [t.tubing, psiPerFtToKpaPerM(t.defaultPsiPerFt)])) as Record<LineTubing, number>,
);

/** A published figure converted to kPa per metre (the lower end of a range). */
export function publishedLineResistanceKpaPerM(tubing: LineTubing, source: string): number {
  const hit = lineTubingTable.find((t) => t.tubing === tubing)?.published.find((p) => p.source.split(', ').includes(source));
  if (!hit) throw new RangeError(`No figure from ${source} for ${tubing}`);
  return psiPerFtToKpaPerM(hit.psiPerFt);
}

/** The tubing kind of a material and nominal diameter (mm, within 0.4 mm), or null when the table has none. */
export function lineTubingFor(material: LineMaterial, diameterMm: number): LineTubing | null {
  return lineTubingTable.find((t) => t.material === material && Math.abs(t.diameterMm - diameterMm) <= 0.4)?.tubing ?? null;
}

/** Static lift of beer, 0.5 psi per foot of rise (DBQM rounding, F6.1), in kPa per metre. */
const LIFT_KPA_PER_M = psiPerFtToKpaPerM(0.5);

/** Inputs of {@link balancedLineLength}. */
export interface LineBalanceInput {
  /** Applied (regulator) gauge pressure, kPa, 0–700. */
  pressureKpa: number;
  /** Resistance of the beer line, kPa/m, above 0 and at most 200 (see {@link lineResistanceKpaPerM}). */
  resistanceKpaPerM: number;
  /** Rise from keg to faucet in metres, −50 to 50 (negative for a drop); default 0. */
  riseM?: number;
  /** Faucet, shank and coupler allowance, kPa, ≥ 0; default 0. */
  fixedKpa?: number;
}

/**
 * Beer-line length in metres that balances the applied pressure, F6.1:
 * L = (P_applied − lift·H_rise − P_fixed)/R, lift = 0.5 psi/ft (11.31 kPa/m).
 * Throws a RangeError when the pressure cannot even cover the rise and fixed allowance.
 */
export function balancedLineLength({ pressureKpa, resistanceKpaPerM, riseM = 0, fixedKpa = 0 }: LineBalanceInput): number {
  requireRange('pressureKpa', pressureKpa, 0, 700, 'kPa gauge');
  requireFinite('resistanceKpaPerM', resistanceKpaPerM);
  if (resistanceKpaPerM <= 0 || resistanceKpaPerM > 200) {
    throw new RangeError(`resistanceKpaPerM must be above 0 and at most 200 kPa/m; got ${resistanceKpaPerM}`);
  }
  requireRange('riseM', riseM, -50, 50, 'm');
  requireRange('fixedKpa', fixedKpa, 0, 700, 'kPa');
  const available = pressureKpa - LIFT_KPA_PER_M * riseM - fixedKpa;
  if (available <= 0) {
    throw new RangeError(
      `pressureKpa (${pressureKpa}) must exceed the lift (${(LIFT_KPA_PER_M * riseM).toFixed(2)} kPa) plus fixedKpa (${fixedKpa}) for a positive line length`,
    );
  }
  return available / resistanceKpaPerM;
}

/**
 * Volume of beer held by a line, F6.2: V = π/4·d²·L. With d in mm and L in m the result is in mL.
 * Length ≥ 0 m; inside diameter above 0 and at most 100 mm.
 */
export function lineVolumeMl(lengthM: number, insideDiameterMm: number): number {
  requireNonNegative('lengthM', lengthM, 'm');
  requireFinite('insideDiameterMm', insideDiameterMm);
  if (insideDiameterMm <= 0 || insideDiameterMm > 100) {
    throw new RangeError(`insideDiameterMm must be above 0 and at most 100 mm; got ${insideDiameterMm}`);
  }
  return (Math.PI / 4) * insideDiameterMm * insideDiameterMm * lengthM;
}

// ---------------------------------------------------------------------------------------------
// Keg purging (REFERENCE §7)
// ---------------------------------------------------------------------------------------------

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

// ---------------------------------------------------------------------------------------------
// Fermentation curve: stability and forecast
// ---------------------------------------------------------------------------------------------

/** One gravity reading of a fermenting batch. */
export interface GravityReading {
  takenAt: Date | string;
  sg: number;
}

/** A point of a gravity curve, time as an ISO 8601 string. */
export interface GravityPoint {
  takenAt: string;
  sg: number;
}

const MS_PER_DAY = 86_400_000;
/** Floating-point slack when comparing gravity differences against a tolerance. */
const GRAVITY_EPSILON = 1e-9;

interface TimedReading {
  time: number;
  sg: number;
}

function normaliseReadings(readings: readonly GravityReading[]): TimedReading[] {
  const given: unknown = readings;
  if (!Array.isArray(given)) {
    throw new RangeError('readings must be an array of { takenAt, sg }');
  }
  return readings
    .map((reading, i) => {
      const time = reading.takenAt instanceof Date ? reading.takenAt.getTime() : Date.parse(reading.takenAt);
      if (!Number.isFinite(time)) {
        throw new RangeError(`readings[${i}].takenAt must be a valid date or ISO 8601 string; got ${String(reading.takenAt)}`);
      }
      requireGravity(`readings[${i}].sg`, reading.sg);
      return { time, sg: reading.sg };
    })
    .sort((a, b) => a.time - b.time);
}

/** Options of {@link stableGravity}. */
export interface StableGravityOptions {
  /** Allowed deviation from the latest reading, SG; above 0 and at most 0.010. Default 0.001. */
  toleranceSg?: number;
  /** How long the gravity must have held, days; above 0 and at most 60. Default 3. */
  spanDays?: number;
}

/**
 * Whether fermentation has finished by the common-practice test "same gravity within ±0.001 over
 * 2–3 days": the trailing run of readings that all lie within ±toleranceSg of the latest reading
 * must span at least spanDays. `since` is the time of the first reading of that run, given only
 * when stable. Fewer than two readings are never stable.
 */
export function stableGravity(
  readings: readonly GravityReading[],
  { toleranceSg = 0.001, spanDays = 3 }: StableGravityOptions = {},
): { stable: boolean; since?: string } {
  requireFinite('toleranceSg', toleranceSg);
  if (toleranceSg <= 0 || toleranceSg > 0.01) {
    throw new RangeError(`toleranceSg must be above 0 and at most 0.010; got ${toleranceSg}`);
  }
  requireFinite('spanDays', spanDays);
  if (spanDays <= 0 || spanDays > 60) {
    throw new RangeError(`spanDays must be above 0 and at most 60 days; got ${spanDays}`);
  }
  const sorted = normaliseReadings(readings);
  const latest = sorted[sorted.length - 1];
  if (sorted.length < 2 || latest === undefined) return { stable: false };

  let start = latest;
  for (let i = sorted.length - 2; i >= 0; i -= 1) {
    const reading = sorted[i];
    if (reading === undefined || Math.abs(reading.sg - latest.sg) > toleranceSg + GRAVITY_EPSILON) break;
    start = reading;
  }
  const heldDays = (latest.time - start.time) / MS_PER_DAY;
  if (heldDays + 1e-9 < spanDays) return { stable: false };
  return { stable: true, since: new Date(start.time).toISOString() };
}

/** Options of {@link forecastFinalGravity}. */
export interface ForecastOptions {
  /** The recipe's target final gravity (0.980–1.200); when given, the result says when the curve reaches it. */
  targetFg?: number;
  /** Number of points in the returned curve, 2–1000. Default 50. */
  curvePoints?: number;
}

/** Result of {@link forecastFinalGravity}. */
export interface GravityForecast {
  model: 'exponential-decay';
  /** Fitted asymptote FG∞. */
  predictedFg: number;
  /** When the fitted curve comes within 0.001 of predictedFg (the first reading's time if it already has). */
  readyAt: string;
  /** Fitted decay constant k, per day. */
  decayPerDay: number;
  /** Fitted curve from the first reading to the later of the last reading and readyAt. */
  curve: GravityPoint[];
  /**
   * Only when targetFg was given: when the curve comes within 0.001 of targetFg, or null when the
   * fitted asymptote stays more than 0.001 above it (the batch is not heading for its target).
   */
  targetReachedAt?: string | null;
}

/** Gravity within which the forecast curve counts as finished. */
const READY_TOLERANCE_SG = 0.001;
/** Decay constants searched: half-lives from 1 hour to 60 days. */
const K_MIN = Math.LN2 / 60;
const K_MAX = Math.LN2 * 24;
const K_GRID = 400;

interface DecayFit {
  k: number;
  fg: number;
  amplitude: number;
  sse: number;
}

/** For a fixed k, sg = fg + amplitude·e^(−k t) is linear in (fg, amplitude): closed-form least squares. */
function fitAtK(days: readonly number[], sg: readonly number[], k: number): DecayFit | null {
  const n = days.length;
  const x = days.map((t) => Math.exp(-k * t));
  const meanX = x.reduce((s, v) => s + v, 0) / n;
  const meanY = sg.reduce((s, v) => s + v, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i += 1) {
    const dx = (x[i] ?? 0) - meanX;
    sxx += dx * dx;
    sxy += dx * ((sg[i] ?? 0) - meanY);
  }
  if (!(sxx > 1e-18)) return null;
  const amplitude = sxy / sxx;
  const fg = meanY - amplitude * meanX;
  let sse = 0;
  for (let i = 0; i < n; i += 1) {
    const r = (sg[i] ?? 0) - fg - amplitude * (x[i] ?? 0);
    sse += r * r;
  }
  return { k, fg, amplitude, sse };
}

/**
 * Forecasts the final gravity of a fermenting batch by fitting the exponential decay
 * sg(t) = FG∞ + (SG₀ − FG∞)·e^(−k t) to the readings by least squares: a log-spaced grid search
 * over k (half-lives 1 h – 60 days) refined by golden-section search, with FG∞ and SG₀ − FG∞ fitted
 * in closed form for each k. Returns null with fewer than 3 readings (at distinct times), when the
 * readings show no downward trend, or when they are still on a straight line so that no
 * asymptote can be fitted (best k at the slow end of the search, or FG∞ below 0.980).
 */
export function forecastFinalGravity(readings: readonly GravityReading[], { targetFg, curvePoints = 50 }: ForecastOptions = {}): GravityForecast | null {
  if (targetFg !== undefined) requireGravity('targetFg', targetFg);
  if (!Number.isInteger(curvePoints) || curvePoints < 2 || curvePoints > 1000) {
    throw new RangeError(`curvePoints must be a whole number from 2 to 1000; got ${formatNumber(curvePoints)}`);
  }
  const sorted = normaliseReadings(readings);
  const first = sorted[0];
  const last = sorted[sorted.length - 1];
  if (first === undefined || last === undefined) return null;
  if (new Set(sorted.map((r) => r.time)).size < 3) return null;

  const t0 = first.time;
  const days = sorted.map((r) => (r.time - t0) / MS_PER_DAY);
  const sg = sorted.map((r) => r.sg);

  // Downward trend: the least-squares straight line must fall.
  const meanT = days.reduce((s, v) => s + v, 0) / days.length;
  const meanY = sg.reduce((s, v) => s + v, 0) / sg.length;
  let sty = 0;
  days.forEach((t, i) => {
    sty += (t - meanT) * ((sg[i] ?? 0) - meanY);
  });
  if (!(sty < 0)) return null;

  // Grid search over k, then golden-section refinement inside the best bracket.
  const ratio = (K_MAX / K_MIN) ** (1 / (K_GRID - 1));
  let best: DecayFit | null = null;
  let bestIndex = -1;
  for (let i = 0; i < K_GRID; i += 1) {
    const fit = fitAtK(days, sg, K_MIN * ratio ** i);
    if (fit && (best === null || fit.sse < best.sse)) {
      best = fit;
      bestIndex = i;
    }
  }
  if (best === null || bestIndex === 0) return null;
  let lo = K_MIN * ratio ** Math.max(0, bestIndex - 1);
  let hi = K_MIN * ratio ** Math.min(K_GRID - 1, bestIndex + 1);
  const phi = (Math.sqrt(5) - 1) / 2;
  const sseAt = (k: number): number => fitAtK(days, sg, k)?.sse ?? Number.POSITIVE_INFINITY;
  let a = hi - phi * (hi - lo);
  let b = lo + phi * (hi - lo);
  let fa = sseAt(a);
  let fb = sseAt(b);
  for (let i = 0; i < 80; i += 1) {
    if (fa < fb) {
      hi = b;
      b = a;
      fb = fa;
      a = hi - phi * (hi - lo);
      fa = sseAt(a);
    } else {
      lo = a;
      a = b;
      fa = fb;
      b = lo + phi * (hi - lo);
      fb = sseAt(b);
    }
  }
  const refined = fitAtK(days, sg, (lo + hi) / 2);
  if (refined && refined.sse <= best.sse) best = refined;

  const { k, fg, amplitude } = best;
  if (!(amplitude > 0) || fg < GRAVITY_MIN) return null;

  const readyDays = amplitude > READY_TOLERANCE_SG ? Math.log(amplitude / READY_TOLERANCE_SG) / k : 0;
  const readyTime = t0 + readyDays * MS_PER_DAY;
  const endTime = Math.max(last.time, readyTime);
  const curve: GravityPoint[] = [];
  for (let i = 0; i < curvePoints; i += 1) {
    const time = t0 + ((endTime - t0) * i) / (curvePoints - 1);
    const t = (time - t0) / MS_PER_DAY;
    curve.push({ takenAt: new Date(time).toISOString(), sg: fg + amplitude * Math.exp(-k * t) });
  }

  const forecast: GravityForecast = {
    model: 'exponential-decay',
    predictedFg: fg,
    readyAt: new Date(readyTime).toISOString(),
    decayPerDay: k,
    curve,
  };
  if (targetFg !== undefined) {
    const gap = targetFg + READY_TOLERANCE_SG - fg;
    if (gap <= 0) {
      forecast.targetReachedAt = null;
    } else {
      const targetDays = amplitude > gap ? Math.log(amplitude / gap) / k : 0;
      forecast.targetReachedAt = new Date(t0 + targetDays * MS_PER_DAY).toISOString();
    }
  }
  return forecast;
}

/** Apparent attenuation assumed for the straight-line forecast when a batch has no target FG (common practice for ale yeasts). */
export const TYPICAL_APPARENT_ATTENUATION_SG = 0.75;
/** Readings a fermentation forecast needs at the least (at distinct times, on a falling curve). */
export const FORECAST_MIN_READINGS = 3;

/** A forecast as the screens show it: {@link GravityForecast} or, while the curve is still straight, the trend line. */
export interface FermentationForecast {
  model: 'exponential-decay' | 'linear-trend';
  predictedFg: number;
  readyAt: string;
  /** k of the decay (per day); for the trend line, its fall in SG per day. */
  decayPerDay: number;
  targetReachedAt: string | null;
  curve: GravityPoint[];
}

/**
 * The forecast of a fermenting batch as of `now`, never dated before it:
 * - the exponential decay of {@link forecastFinalGravity} when the readings bend towards an asymptote;
 * - while they still fall on a straight line (no asymptote can be fitted yet), the least-squares
 *   trend line, extended to the target FG, or without one to the FG of a typical apparent
 *   attenuation (75 % in SG points of the first reading), so that steadily falling readings
 *   yield a forecast as soon as there are {@link FORECAST_MIN_READINGS} of them.
 * A forecast whose ready time has already passed (the readings stopped, or the curve says the
 * beer is done) is null: the stable-gravity rule speaks then. A target time that has passed is null.
 */
export function fermentationForecast(
  readings: readonly GravityReading[],
  { now, targetFg, curvePoints = 50 }: ForecastOptions & { now: Date },
): FermentationForecast | null {
  const nowMs = now.getTime();
  if (!Number.isFinite(nowMs)) throw new RangeError('now must be a valid date');
  const sorted = normaliseReadings(readings);
  if (new Set(sorted.map((r) => r.time)).size < FORECAST_MIN_READINGS) return null;
  const notPast = (iso: string | null | undefined) => (iso && Date.parse(iso) > nowMs ? iso : null);
  const decay = forecastFinalGravity(
    sorted.map((r) => ({ takenAt: new Date(r.time), sg: r.sg })),
    { ...(targetFg !== undefined ? { targetFg } : {}), curvePoints },
  );
  if (decay) {
    if (!notPast(decay.readyAt)) return null;
    return { ...decay, targetReachedAt: notPast(decay.targetReachedAt) };
  }
  const first = sorted[0]!;
  const last = sorted[sorted.length - 1]!;
  const days = sorted.map((r) => (r.time - first.time) / MS_PER_DAY);
  const meanT = days.reduce((s, v) => s + v, 0) / days.length;
  const meanY = sorted.reduce((s, r) => s + r.sg, 0) / sorted.length;
  let stt = 0;
  let sty = 0;
  days.forEach((t, i) => {
    stt += (t - meanT) ** 2;
    sty += (t - meanT) * (sorted[i]!.sg - meanY);
  });
  const slope = sty / stt;
  if (!(slope < 0)) return null;
  const expected = targetFg ?? first.sg - TYPICAL_APPARENT_ATTENUATION_SG * (first.sg - 1);
  const lineAt = (t: number) => meanY + slope * (t - meanT);
  const lastDay = days[days.length - 1]!;
  if (!(lineAt(lastDay) > expected)) return null;
  const readyDays = meanT + (expected - meanY) / slope;
  const readyTime = first.time + readyDays * MS_PER_DAY;
  if (!(readyTime > nowMs)) return null;
  const curve: GravityPoint[] = [];
  for (let i = 0; i < curvePoints; i += 1) {
    const time = last.time + ((readyTime - last.time) * i) / (curvePoints - 1);
    curve.push({ takenAt: new Date(time).toISOString(), sg: lineAt((time - first.time) / MS_PER_DAY) });
  }
  const readyAt = new Date(readyTime).toISOString();
  return { model: 'linear-trend', predictedFg: expected, readyAt, decayPerDay: -slope, targetReachedAt: targetFg !== undefined ? readyAt : null, curve };
}
