/**
 * Corrections of a gravity reading: hydrometer sample temperature and refractometer readings after fermentation began (REFERENCE §3 for the hydrometer).
 */
import { HYDROMETER_MAX_C, HYDROMETER_MIN_C, requireExtract, requireGravity, requireRange } from './validation.ts';

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
